/**
 * Non-finite values (NaN, ±Infinity) never become a verdict: every run checks its coefficients before the
 * first step and its state while it steps, and stops with a NonFiniteError naming where and, as far as the
 * numbers tell, why. Pure functions on typed arrays; imports nothing from the model.
 */

/** Code carried by NonFiniteError (the web layer and the CLI report it as a failed run, never as a result). */
export const NON_FINITE_CODE = 'NON_FINITE';

/** Every NonFiniteError message starts so (it survives a worker thread boundary, which drops the class). */
export const NON_FINITE_PREFIX = 'The computation broke down: ';

/** A run whose numbers stopped being finite numbers; the message says where and the likely cause. */
export class NonFiniteError extends Error {
  readonly code = NON_FINITE_CODE;
  /** Time [yr] of the state found non-finite (undefined for a coefficient found before the first step). */
  readonly t: number | undefined;
  /** Index of the first cell found. */
  readonly cell: number;
  constructor(message: string, cell: number, t?: number) {
    super(message.startsWith(NON_FINITE_PREFIX) ? message : NON_FINITE_PREFIX + message);
    this.name = 'NonFiniteError';
    this.cell = cell;
    this.t = t;
  }
}

/** Index of the first entry that is NaN or ±Infinity, or -1 when every entry is finite. */
export function firstNonFinite(values: ArrayLike<number>): number {
  for (let i = 0; i < values.length; i++) {
    // x - x is 0 for finite x and NaN for NaN and ±Infinity: one subtraction, no call, in the scan.
    const x = values[i];
    if (x - x !== 0) return i;
  }
  return -1;
}

/**
 * Checks the density and host fraction of a run after a step.
 * @param u - density per cell [of capacity]
 * @param h - remaining host fraction per cell
 * @param t - time of the state [yr]
 * @throws NonFiniteError naming the field, the time and the cell
 */
export function checkFiniteState(u: ArrayLike<number>, h: ArrayLike<number>, t: number): void {
  for (const [values, what] of [
    [u, 'insect density'],
    [h, 'host fraction'],
  ] as const) {
    const i = firstNonFinite(values);
    if (i >= 0) {
      throw new NonFiniteError(
        `the ${what} became ${values[i]} at t = ${t.toPrecision(4)} yr in cell ${i + 1} of ${values.length}. ` +
          'No verdict is given. This comes from inputs at the edge of what the arithmetic carries (an extreme ratio of ' +
          'movement, edge preference or mortality between habitats, or a very narrow piece); bring them into the typical range.',
        i,
        t,
      );
    }
  }
}

/** The per-cell coefficients of a discretised layout that a run divides by or multiplies with. */
export interface CoefficientArrays {
  grid: { centersKm: ArrayLike<number>; widthsKm: ArrayLike<number> };
  /** Movement D [km²/yr] per cell. */
  diffusionAtCells: ArrayLike<number>;
  /** Residence index ρ = w/D [yr/km²] per cell (w: edge weight from the edge preference). */
  residenceAtCells: ArrayLike<number>;
  /** Off-host mortality [1/yr] per cell. */
  mortalityAtCells: ArrayLike<number>;
}

/**
 * Checks the coefficients of a layout before its run: every cell width and movement must be a positive
 * finite number, the residence index finite and not zero where it divides (an edge preference of 5e-324
 * makes the edge weight (1 − a)/a infinite), mortality finite.
 * @throws NonFiniteError naming the quantity, its value and where on the transect it is
 */
export function checkFiniteCoefficients(p: CoefficientArrays): void {
  const n = p.grid.widthsKm.length;
  const at = (i: number) => `at ${Number(p.grid.centersKm[i]).toPrecision(6)} km`;
  for (let i = 0; i < n; i++) {
    const dx = p.grid.widthsKm[i];
    if (!(dx > 0) || !Number.isFinite(dx) || dx * dx === 0) {
      throw new NonFiniteError(`a piece of the layout is too narrow to compute: a cell ${at(i)} is ${dx} km wide (widths and lengths must be at least 1 m).`, i);
    }
    const d = p.diffusionAtCells[i];
    if (!(d > 0) || !Number.isFinite(d)) throw new NonFiniteError(`the movement ${at(i)} is ${d} km²/yr; it must be a positive finite number.`, i);
    const rho = p.residenceAtCells[i];
    // ρ·D is the edge weight; it must stay a positive finite number, and so must its inverse.
    const w = rho * d;
    if (!(rho > 0) || !Number.isFinite(rho) || !(w > 0) || !Number.isFinite(w) || !Number.isFinite(1 / w)) {
      throw new NonFiniteError(
        `the edge weight ${at(i)} is ${w} (residence index ${rho} yr/km²): an edge preference this close to 0 or 1 is beyond ` +
          'what the arithmetic carries. Use an edge preference between 1e-6 and 1 − 1e-6.',
        i,
      );
    }
    const m = p.mortalityAtCells[i];
    if (!Number.isFinite(m) || m < 0) throw new NonFiniteError(`the mortality ${at(i)} is ${m} 1/yr; it must be a finite number ≥ 0.`, i);
  }
}

/** A number in a result that is not finite, by its path in the document. */
export interface NonFiniteAt {
  path: string;
  value: number;
}

/**
 * The non-finite numbers in a plain data value (a result document), at most `max` of them. `null` is not
 * counted (results use it for "none"); NaN and ±Infinity are, since JSON would silently turn them into null.
 * Iterative, so a deep value cannot overflow the stack.
 */
export function nonFiniteNumbers(value: unknown, max = 5): NonFiniteAt[] {
  const out: NonFiniteAt[] = [];
  const stack: [unknown, string][] = [[value, '']];
  while (stack.length && out.length < max) {
    const [v, path] = stack.pop()!;
    if (typeof v === 'number') {
      if (!Number.isFinite(v)) out.push({ path, value: v });
    } else if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
      const i = firstNonFinite(v as unknown as ArrayLike<number>);
      if (i >= 0) out.push({ path: `${path}[${i}]`, value: (v as unknown as ArrayLike<number>)[i] });
    } else if (Array.isArray(v)) {
      for (let i = v.length - 1; i >= 0; i--) stack.push([v[i], `${path}[${i}]`]);
    } else if (v !== null && typeof v === 'object') {
      const entries = Object.entries(v);
      for (let i = entries.length - 1; i >= 0; i--) stack.push([entries[i][1], path ? `${path}.${entries[i][0]}` : entries[i][0]]);
    }
  }
  return out;
}

/**
 * Refuses a result with non-finite numbers.
 * @throws NonFiniteError listing the first paths found
 */
export function checkFiniteResult(doc: unknown): void {
  const found = nonFiniteNumbers(doc);
  if (found.length) {
    throw new NonFiniteError(
      `the result has non-finite numbers (${found.map((f) => `${f.path} = ${f.value}`).join(', ')}). ` +
        'No verdict is given; bring extreme inputs into the typical range.',
      -1,
    );
  }
}
