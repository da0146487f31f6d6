/**
 * Runs used by the barrier analysis: a computational window around a clearing that can start from any
 * state (a snapshot of the baseline, or the end of an option run), watchers that stop a run when the
 * front is established beyond the clearing, and the judge that verifies a pinned front.
 */
import type { DiffusionOperator } from '../numerics/diffusion.ts';
import { Schedule, runTimeLoop, type FieldState, type FieldStepper, type Observer } from '../numerics/time-loop.ts';
import { solveSteadyState, linearStability } from '../numerics/steady.ts';
import { cellIndexAt, type Grid } from '../numerics/grid.ts';
import { alleeThreshold, equilibria, lowDensityRate } from '../model/growth.ts';
import type { PointScenario } from '../model/scenario.ts';
import { segmentBreaks } from '../model/scenario.ts';
import { discretise, growthRateScale, type Resolution, type TransectProblem } from './discretise.ts';
import type { ClearingSpec, Piece } from './layout.ts';
import { cellReaction, establishedLevel, potentialThreshold, smallGroupsFail, strongAllee } from './barrier-growth.ts';
import { ArrivalTracker } from './trackers.ts';
import { makeEngineStepper } from './simulate.ts';

/** Where a clearing sits relative to the infestation. */
export interface BarrierGeometry {
  /** +1 when the front must travel right to reach the clearing, −1 when left. */
  direction: 1 | -1;
  /** Edge of the clearing that faces the infestation [km]. */
  nearKm: number;
  /** Edge the front must pass to cross [km]. */
  farKm: number;
}

/** Positions closer than this are equal [km] (1 mm). */
const SAME_KM = 1e-6;

/** Which way the front meets the clearing (the scenario's cross-checks guarantee no overlap with the infestation). */
export function barrierGeometry(s: PointScenario, c: ClearingSpec): BarrierGeometry {
  const a = c.fromKm;
  const b = c.fromKm + c.widthM / 1000;
  if (a >= s.infestation.toKm - SAME_KM) return { direction: 1, nearKm: a, farKm: b };
  return { direction: -1, nearKm: b, farKm: a };
}

/** True when x lies beyond the clearing as seen from the infestation. */
export function isBeyond(g: BarrierGeometry, xKm: number): boolean {
  return g.direction * (xKm - g.farKm) > SAME_KM;
}

/** Movement length in host forest √(D/r) [km]: the distance over which a front profile changes. */
export function movementLengthKm(s: PointScenario): number {
  return Math.sqrt(s.pest.diffusionHost / growthRateScale(s.pest.growth));
}

/** Decay length of a low-density fringe in host forest √(D/|g(0)|) [km] (the movement length when g(0) = 0). */
export function fringeLengthKm(s: PointScenario): number {
  const g0 = Math.abs(lowDensityRate(s.pest.growth, 1));
  return g0 > 0 ? Math.sqrt(s.pest.diffusionHost / g0) : movementLengthKm(s);
}

/** A discretised stretch of the layout with its steppers, ready to run from any state. */
export interface WindowSolver {
  scenario: PointScenario;
  problem: TransectProblem;
  op: DiffusionOperator;
  /** The engine's coupled step (the same as full-transect runs use). */
  stepper: FieldStepper;
  windowKm: [number, number];
  /** Density at which each cell counts as established (Infinity off host); per cell. */
  establishedAtCells: Float64Array;
}

/** The layout restricted to [lo, hi] (pieces clipped). */
export function slicePieces(pieces: Piece[], lo: number, hi: number): Piece[] {
  const out: Piece[] = [];
  for (const p of pieces) {
    const a = Math.max(p.fromKm, lo);
    const b = Math.min(p.toKm, hi);
    if (b - a > SAME_KM) out.push({ ...p, fromKm: a, toKm: b });
  }
  return out;
}

/**
 * Builds a solver on [lo, hi] of a layout. Cut ends are reflecting (no flux); where the window reaches a
 * transect end, that end's own condition applies. `resolution` should be the full layout's, so that window
 * and full runs use the same cells and step; `horizonYears` is only used for the step-count limit.
 */
export function makeWindowSolver(
  s: PointScenario,
  pieces: Piece[],
  windowKm: [number, number],
  resolution: Resolution,
  horizonYears: number,
): WindowSolver {
  const breaks = segmentBreaks(s.transect);
  const lo = Math.max(windowKm[0], breaks[0]);
  const hi = Math.min(windowKm[1], breaks[breaks.length - 1]);
  const sliced = slicePieces(pieces, lo, hi);
  const ends = {
    left: lo <= breaks[0] + SAME_KM ? s.transect.ends.left : ('reflecting' as const),
    right: hi >= breaks[breaks.length - 1] - SAME_KM ? s.transect.ends.right : ('reflecting' as const),
  };
  const sw: PointScenario = { ...s, transect: { ...s.transect, ends }, horizonYears };
  const problem = discretise(sw, sliced, resolution);
  const { op, stepper } = makeEngineStepper(problem);
  const establishedAtCells = establishedLevels(s, problem);
  return { scenario: s, problem, op, stepper, windowKm: [lo, hi], establishedAtCells };
}

/**
 * Cell averages of a piecewise-constant field (cells of `from`) over the cells of `to` (overlap-weighted).
 * Positions outside `from` take the nearest end value.
 */
export function remap(from: Grid, values: Float64Array, to: Grid): Float64Array {
  const out = new Float64Array(to.nCells);
  const ff = from.facesKm;
  let j = 0;
  for (let i = 0; i < to.nCells; i++) {
    const a = to.facesKm[i];
    const b = to.facesKm[i + 1];
    while (j < from.nCells - 1 && ff[j + 1] <= a) j++;
    let k = j;
    let acc = 0;
    let covered = 0;
    while (k < from.nCells && ff[k] < b) {
      const o = Math.min(b, ff[k + 1]) - Math.max(a, ff[k]);
      if (o > 0) {
        acc += o * values[k];
        covered += o;
      }
      k++;
    }
    if (covered > 0) out[i] = acc / covered;
    else out[i] = a < ff[0] ? values[0] : values[from.nCells - 1];
  }
  return out;
}

/** A state to start a window run from: fields on some grid at an absolute time [yr]. */
export interface StartState {
  grid: Grid;
  u: Float64Array;
  h: Float64Array;
  /** Years since the start of the scenario. */
  t: number;
}

/**
 * Initial fields of a window run: remapped density; host fraction remapped but never above the
 * window cell's own stocking (the clearing has none).
 */
export function initialFields(solver: WindowSolver, start: StartState): { u: Float64Array; h: Float64Array } {
  const { grid, stockingAtCells, hostAtCells } = solver.problem;
  const u = remap(start.grid, start.u, grid);
  const hr = remap(start.grid, start.h, grid);
  const h = new Float64Array(grid.nCells);
  for (let i = 0; i < grid.nCells; i++) h[i] = hostAtCells[i] ? Math.min(hr[i], stockingAtCells[i]) : 0;
  return { u, h };
}

/** An observer that sees absolute time (run time + offset). */
export function withOffset(o: Observer, offset: number): Observer {
  const shift = (s: FieldState): FieldState => ({ t: s.t + offset, tPrevious: s.tPrevious + offset, u: s.u, h: s.h });
  return {
    initialize: o.initialize ? (s) => o.initialize!(shift(s)) : undefined,
    handle: (s) => o.handle(shift(s)),
    finalize: o.finalize ? (s) => o.finalize!(shift(s)) : undefined,
  };
}

/**
 * Records the first time the front is established beyond the far edge: any host cell beyond it at or above
 * its established level, or the detection level reached at a probe far enough beyond the clearing that a
 * pinned front's low-density fringe cannot reach it (this catches fronts whose peak density stays below the
 * established level, e.g. consumer–resource pulses). Optionally stops the run there.
 */
export class CrossingWatch implements Observer {
  crossedYears: number | null = null;
  private readonly beyond: number[];
  private readonly probeCell: number;
  constructor(
    grid: Grid,
    geometry: BarrierGeometry,
    private readonly levels: Float64Array,
    private readonly stop: boolean,
    probeKm: number,
    private readonly detection: number,
  ) {
    this.beyond = [];
    for (let i = 0; i < grid.nCells; i++) if (isBeyond(geometry, grid.centersKm[i]) && Number.isFinite(levels[i])) this.beyond.push(i);
    const x = geometry.farKm + geometry.direction * probeKm;
    const inside = x > grid.facesKm[0] && x < grid.facesKm[grid.nCells];
    this.probeCell = inside ? cellIndexAt(grid, x) : -1;
  }
  initialize(s: FieldState): void {
    this.handle(s);
  }
  handle(s: FieldState): boolean {
    if (this.crossedYears !== null) return this.stop;
    if (this.probeCell >= 0 && s.u[this.probeCell] >= this.detection) {
      this.crossedYears = s.t;
      return this.stop;
    }
    for (const i of this.beyond) {
      if (s.u[i] >= this.levels[i]) {
        this.crossedYears = s.t;
        return this.stop;
      }
    }
    return false;
  }
}

/** Smallest positive host stocking on the transect (sets the longest low-density fringe). */
export function smallestStocking(s: PointScenario): number {
  let h = Infinity;
  for (const seg of s.transect.segments) if (seg.habitat === 'host-forest' && seg.stocking > 0) h = Math.min(h, seg.stocking);
  return Number.isFinite(h) ? h : 1;
}

/**
 * Distance beyond the far edge [km] at which the detection level (or another `level`) means the front has
 * crossed: a pinned front's fringe starts below θ at the edge and decays like exp(−x/ℓ), ℓ = √(D/|g(0)|) at
 * the lowest stocking, so it falls below the level within ℓ·ln(θ/level); two movement lengths are added as
 * a margin.
 */
export function crossingProbeKm(s: PointScenario, level = s.detectionLevel): number {
  const h = smallestStocking(s);
  const g = s.pest.growth;
  const theta = potentialThreshold(g, 1);
  const g0 = Math.abs(lowDensityRate(g, h));
  const lf = g0 > 0 ? Math.sqrt(s.pest.diffusionHost / g0) : fringeLengthKm(s);
  const ratio = theta !== null && Number.isFinite(theta) ? Math.max(theta / level, 1) : 1 / level;
  return lf * Math.log(ratio) + 2 * movementLengthKm(s);
}

/**
 * Density [of capacity] by which the computational windows of the barrier analysis are sized, whatever
 * the scenario's detection level (1 %): window runs start when it arrives a few movement lengths before the
 * clearing, and the window reaches beyond the clearing past where a pinned front's fringe falls below it.
 * Tied to the detection level, a low level started the runs while the breeding front was still outside the
 * window, and a level above θ cut the window a few movement lengths beyond the clearing, where its
 * reflecting end shifted the critical width by tens of metres.
 */
export const WINDOW_LEVEL = 0.01;

/** How far beyond the far edge the windows of the barrier analysis reach [km]: twice the fringe's reach (see {@link WINDOW_LEVEL}) plus two movement lengths. */
export function windowAheadKm(s: PointScenario): number {
  return 2 * crossingProbeKm(s, Math.min(s.detectionLevel, WINDOW_LEVEL)) + 2 * movementLengthKm(s);
}

/** Established levels per cell for a discretised layout (Infinity off host). */
export function establishedLevels(s: PointScenario, problem: TransectProblem): Float64Array {
  const out = new Float64Array(problem.grid.nCells);
  const cache = new Map<number, number>();
  for (let i = 0; i < problem.grid.nCells; i++) {
    const h0 = problem.stockingAtCells[i];
    if (!problem.hostAtCells[i] || !(h0 > 0)) {
      out[i] = Infinity;
      continue;
    }
    let v = cache.get(h0);
    if (v === undefined) {
      v = establishedLevel(s.pest.growth, h0);
      cache.set(h0, v);
    }
    out[i] = v;
  }
  return out;
}

/** How a pinned front was (or could be) verified. */
export type PinningMode = 'steady-state' | 'dies-out' | 'none';

export interface Judgement {
  verified: boolean;
  mode: PinningMode;
  method: string;
  detail: string;
  /** Year of verification. */
  atYears: number | null;
  /** The verified steady state (cells of the judge's problem), when one was computed. */
  steady: Float64Array | null;
  leadingEigenvalue: number | null;
}

/** Which verification applies: exact steady state (hosts not depleted), die-out (hosts depleted), or none. */
export function pinningMode(s: PointScenario, hBeyond: number): PinningMode {
  const g = s.pest.growth;
  // With host loss the test is die-out, which needs only an Allee threshold (a population without crowding
  // is still bounded by the hosts it eats); a steady front needs a carrying capacity as well.
  if (s.pest.hostKillRate > 0) return smallGroupsFail(g, hBeyond) ? 'dies-out' : 'none';
  return strongAllee(g, hBeyond) ? 'steady-state' : 'none';
}

/** Shortest guarantee [yr] the cubic die-out bound must give before the pest counts as gone. */
export const DIE_OUT_GUARANTEE_YEARS = 1e6;

export const PINNING_METHODS: Record<PinningMode, string> = {
  'steady-state':
    "Newton on the unsplit finite-volume steady-state equations from the run's state, then a Sturm count on the symmetrised Jacobian (no unstable mode)",
  'dies-out':
    'die-out check: with hosts being consumed there is no steady front, so the pest must die out at the clearing; a comparison (upper-solution) bound on the density everywhere in the computational window shows it cannot regrow',
  none: 'no pinning is possible: the forest beyond has no strong Allee effect, so any insects that cross found a growing population',
};

/**
 * Verifies pinning during a run (called every few steps).
 *
 * - steady-state (no host depletion): Newton on the unsplit residual from the run's state must converge to
 *   a state that is linearly stable (Sturm count 0), keeps the density beyond the clearing below the
 *   potential threshold θ (front on the near side), and that the run is close to and not moving away from
 *   (checked again one interval later).
 * - dies-out (host depletion): w = max_i u_i ρ_max/ρ_i bounds the density by the upper solution
 *   W ρ/ρ_max (constant in the residence-index variable, so diffusion leaves it unchanged). For growth that
 *   does not rise as hosts fall (logistic, mate-finding), W = w is an upper solution for ever once w lies
 *   below every cell's Allee threshold. For the cubic, whose threshold a·h falls with the hosts, the per-capita
 *   rate never exceeds k w² with k = r(1−a)²/(4a) whatever the hosts do, so W(t) = w/√(1 − 2k w² t) is an
 *   upper solution; it stays below 2w for 3/(8 k w²) years, and the check requires that to exceed
 *   {@link DIE_OUT_GUARANTEE_YEARS}.
 */
export class PinningJudge {
  readonly mode: PinningMode;
  private candidate: { t: number; u: Float64Array; distance: number } | null = null;
  private readonly beyondHost: number[] = [];
  private readonly thetaAtCells: Float64Array;
  private readonly capScale: number;
  private readonly rScale: number;
  /** Host cells just before the clearing (see {@link approachCells}) and the density that counts as a population there. */
  private readonly approach: { cells: number[]; level: Float64Array };
  /** True once a population was seen at the clearing's near side (die-out mode needs it to have arrived); callers may set it from an earlier run. */
  arrived = false;
  attempts = 0;
  constructor(
    private readonly solver: WindowSolver,
    geometry: BarrierGeometry,
  ) {
    const s = solver.scenario;
    const { grid, hostAtCells, stockingAtCells } = solver.problem;
    this.approach = approachCells(s, solver.problem, geometry);
    let hBeyond = 0;
    this.thetaAtCells = new Float64Array(grid.nCells).fill(Infinity);
    let capMax = 0;
    for (let i = 0; i < grid.nCells; i++) {
      if (!hostAtCells[i]) continue;
      capMax = Math.max(capMax, equilibria(s.pest.growth, stockingAtCells[i]).capacity ?? 0);
      if (isBeyond(geometry, grid.centersKm[i]) && stockingAtCells[i] > 0) {
        this.beyondHost.push(i);
        hBeyond = Math.max(hBeyond, stockingAtCells[i]);
        this.thetaAtCells[i] = potentialThreshold(s.pest.growth, stockingAtCells[i]) ?? 0;
      }
    }
    this.mode = this.beyondHost.length ? pinningMode(s, hBeyond) : 'none';
    this.capScale = capMax > 0 ? capMax : 1;
    this.rScale = growthRateScale(s.pest.growth);
  }

  /** True when some cell just before the clearing holds a population (density at its level). */
  private present(u: Float64Array): boolean {
    return isPresent(this.approach, u);
  }

  /** Notes whether the pest has reached the clearing (call every step; checks run only every few). */
  note(u: Float64Array): void {
    if (!this.arrived && this.present(u)) this.arrived = true;
  }

  /** Returns a verified judgement, or null when pinning is not (yet) shown. */
  check(t: number, u: Float64Array, h: Float64Array): Judgement | null {
    this.note(u);
    switch (this.mode) {
      case 'none':
        return null;
      case 'dies-out':
        // Dying out is only "held at the clearing" once the pest has arrived there; before that (a window
        // ahead of a distant front, or a pest dying out on its own) nothing was held.
        if (!this.arrived) return null;
        return this.checkDiesOut(t, u, h);
      default:
        return this.checkSteady(t, u, h);
    }
  }

  private checkDiesOut(t: number, u: Float64Array, h: Float64Array): Judgement | null {
    const s = this.solver.scenario;
    const g = s.pest.growth;
    const { hostAtCells, residenceAtCells } = this.solver.problem;
    const n = u.length;
    let rhoMax = 0;
    for (let i = 0; i < n; i++) rhoMax = Math.max(rhoMax, residenceAtCells[i]);
    let w = 0;
    for (let i = 0; i < n; i++) w = Math.max(w, (u[i] * rhoMax) / residenceAtCells[i]);
    const base = { verified: true, mode: 'dies-out' as const, method: PINNING_METHODS['dies-out'], atYears: t, steady: null, leadingEigenvalue: null };
    if (g.form === 'allee-cubic') {
      const k = (g.rate * (1 - g.alleeThreshold) ** 2) / (4 * g.alleeThreshold);
      const guarantee = w > 0 ? 3 / (8 * k * w * w) : Infinity;
      if (!(guarantee >= DIE_OUT_GUARANTEE_YEARS)) return null;
      return {
        ...base,
        detail:
          `at year ${t.toFixed(1)} the density is at most ${w.toExponential(2)} everywhere in the computational window; ` +
          `whatever the hosts do, it cannot exceed twice that for ${guarantee === Infinity ? 'ever' : `${guarantee.toExponential(1)} years`} (comparison bound)`,
      };
    }
    let minThreshold = Infinity;
    for (let i = 0; i < n; i++) {
      if (!hostAtCells[i]) continue;
      const hi = h[i];
      if (lowDensityRate(g, hi) > 0) return null;
      const th = alleeThreshold(g, hi);
      if (th !== null) minThreshold = Math.min(minThreshold, th);
      if (w >= minThreshold) return null;
    }
    return {
      ...base,
      detail:
        `at year ${t.toFixed(1)} the density is at most ${w.toExponential(2)} everywhere in the computational window, below the smallest Allee threshold ` +
        `${Number.isFinite(minThreshold) ? minThreshold.toExponential(2) : '(none: the hosts left cannot support growth)'}; growth does not rise as hosts are consumed, so it can only decline`,
    };
  }

  private checkSteady(t: number, u: Float64Array, h: Float64Array): Judgement | null {
    const closeTol = 0.05 * this.capScale;
    const distance = (a: Float64Array) => {
      let d = 0;
      for (let i = 0; i < u.length; i++) d = Math.max(d, Math.abs(u[i] - a[i]));
      return d;
    };
    const reaction = cellReaction(this.solver.problem, h);
    if (this.candidate) {
      // Second look: the run must not be moving away from the candidate (a saddle or a slow crossing would).
      const c = this.candidate;
      this.candidate = null;
      const d2 = distance(c.u);
      if (d2 <= 1.05 * c.distance + 1e-9 * this.capScale) {
        const st = linearStability(this.solver.op, reaction, c.u);
        return {
          verified: true,
          mode: 'steady-state',
          method: PINNING_METHODS['steady-state'],
          detail:
            `steady state found at year ${c.t.toFixed(1)} and confirmed at year ${t.toFixed(1)} (run within ${d2.toExponential(1)} of it and not moving away); ` +
            `leading eigenvalue ${st.leadingEigenvalue.toExponential(2)} /yr, so every perturbation decays`,
          atYears: t,
          steady: c.u,
          leadingEigenvalue: st.leadingEigenvalue,
        };
      }
    }
    this.attempts++;
    const r = solveSteadyState(this.solver.op, reaction, u, { tolerance: 1e-9 * this.rScale * this.capScale });
    if (!r.converged) return null;
    for (const i of this.beyondHost) if (!(r.u[i] < this.thetaAtCells[i])) return null;
    // A pinned front has a population standing before the clearing; the empty state (no front in the
    // window yet, or a pest that died out on its own) is steady and stable too, but holds nothing.
    if (!this.present(r.u)) return null;
    const d = distance(r.u);
    if (d > closeTol) return null;
    if (!linearStability(this.solver.op, reaction, r.u).stable) return null;
    this.candidate = { t, u: r.u, distance: d };
    return null;
  }
}

/**
 * The host cells just before a clearing, where a front that reached it stands: host forest within three
 * movement lengths of the near edge, counted along host forest only (an existing clearing or non-host
 * stand right before the cut is stepped over), with the density that counts as a population in each: the
 * Allee threshold at the cell's stocking (above it a local group grows; a consumer–resource pulse can
 * stay below the established level), or the established level where there is no threshold.
 */
export function approachCells(s: PointScenario, problem: TransectProblem, g: BarrierGeometry): { cells: number[]; level: Float64Array } {
  const { grid, hostAtCells, stockingAtCells } = problem;
  const reach = 3 * movementLengthKm(s);
  const levels = establishedLevels(s, problem);
  const cells: number[] = [];
  const level: number[] = [];
  let length = 0;
  const n = grid.nCells;
  for (let k = 0; k < n; k++) {
    const i = g.direction > 0 ? n - 1 - k : k;
    if (g.direction * (g.nearKm - grid.centersKm[i]) <= 0) continue;
    if (!hostAtCells[i] || !(stockingAtCells[i] > 0)) continue;
    if (length >= reach) break;
    length += grid.widthsKm[i];
    const lv = alleeThreshold(s.pest.growth, stockingAtCells[i]) ?? levels[i];
    cells.push(i);
    level.push(lv);
  }
  return { cells, level: Float64Array.from(level) };
}

function isPresent(approach: { cells: number[]; level: Float64Array }, u: Float64Array): boolean {
  const { cells, level } = approach;
  for (let k = 0; k < cells.length; k++) if (u[cells[k]] >= level[k]) return true;
  return false;
}

/** Watches, every step, whether a population has reached the host forest just before a clearing ({@link approachCells}). */
export class ApproachWatch implements Observer {
  arrived = false;
  private readonly approach: { cells: number[]; level: Float64Array };
  constructor(s: PointScenario, problem: TransectProblem, geometry: BarrierGeometry) {
    this.approach = approachCells(s, problem, geometry);
  }
  initialize(st: FieldState): void {
    this.handle(st);
  }
  handle(st: FieldState): void {
    if (!this.arrived && isPresent(this.approach, st.u)) this.arrived = true;
  }
}

/** Result of a window run. */
export interface WindowOutcome {
  outcome: 'crossed' | 'pinned' | 'open';
  /** Year the front was established beyond the clearing, if it was. */
  crossedYears: number | null;
  judgement: Judgement | null;
  /** Year the run ended. */
  endYears: number;
  /** First year each requested position reached the detection level (null if not). */
  arrivals: (number | null)[];
  u: Float64Array;
  h: Float64Array;
  steps: number;
}

export interface WindowRunOptions {
  start: StartState;
  /** Absolute end time [yr]. */
  tEnd: number;
  geometry: BarrierGeometry;
  /** Stop as soon as the front is established beyond the clearing. */
  stopOnCross: boolean;
  /** Verify pinning every `checkYears` and stop once verified. */
  judge?: boolean;
  checkYears?: number;
  /** Positions whose arrival (detection level) to record [km]; the run continues until they are all reached when stopOnArrivals. */
  sitesKm?: number[];
  stopOnArrivals?: boolean;
  /** The pest had already reached the clearing before the start state (e.g. during the run this one extends). */
  arrivedBefore?: boolean;
  shouldCancel?: () => boolean;
}

/** Runs a window solver from a start state until crossing, verified pinning, all arrivals, or tEnd. */
export function runWindow(solver: WindowSolver, o: WindowRunOptions): WindowOutcome {
  const { grid } = solver.problem;
  const s = solver.scenario;
  const f = initialFields(solver, o.start);
  const u = f.u;
  const h = f.h;
  const watch = new CrossingWatch(grid, o.geometry, solver.establishedAtCells, o.stopOnCross, crossingProbeKm(s), s.detectionLevel);
  const judge = o.judge ? new PinningJudge(solver, o.geometry) : null;
  if (judge && o.arrivedBefore) judge.arrived = true;
  const dt = solver.problem.resolution.stepYears;
  // Pinning checks every whole number of steps nearest to checkYears, scheduled by time from the start state.
  const checkEvery = Math.max(1, Math.round((o.checkYears ?? Math.max(0.5, 2 / growthRateScale(s.pest.growth))) / dt));
  const checks = Schedule.periodic(checkEvery * dt, o.start.t);
  let judgement: Judgement | null = null;
  const sites = o.sitesKm ?? [];
  const arrivalTracker = new ArrivalTracker(grid, sites, s.detectionLevel);
  const observer: Observer = {
    initialize: (st) => {
      watch.initialize(st);
      arrivalTracker.initialize(st);
      judge?.note(st.u);
    },
    handle: (st) => {
      let stop = watch.handle(st);
      arrivalTracker.handle(st);
      judge?.note(st.u);
      // Arrivals alone do not end the run while the crossing is still to be seen (a site can see the
      // fringe at the detection level long before the front passes the clearing).
      if (o.stopOnArrivals && sites.length && arrivalTracker.allArrived() && watch.crossedYears !== null) stop = true;
      if (checks.due(st.t) && judge && watch.crossedYears === null) {
        const j = judge.check(st.t, st.u, st.h);
        if (j) {
          judgement = j;
          stop = true;
        }
      }
      return stop;
    },
  };
  const t0 = o.start.t;
  const span = o.tEnd - t0;
  let steps = 0;
  let endYears = t0;
  if (span > 1e-12) {
    const res = runTimeLoop(solver.stepper, u, h, {
      tEnd: span,
      dt,
      observers: [withOffset(observer, t0)],
      shouldCancel: o.shouldCancel,
    });
    steps = res.info.steps;
    endYears = t0 + res.t;
  }
  // A last look at the horizon: a run that ends exactly there still gets its pinning check.
  if (judge && !judgement && watch.crossedYears === null) judgement = judge.check(endYears, u, h);
  const j = judgement as Judgement | null;
  return {
    outcome: watch.crossedYears !== null ? 'crossed' : j?.verified ? 'pinned' : 'open',
    crossedYears: watch.crossedYears,
    judgement: j,
    endYears,
    // A site already at the detection level when the window run starts counts as reached at its start.
    arrivals: arrivalTracker.arrivalYears.map((a) => (a === null ? null : Math.max(a, t0))),
    u,
    h,
    steps,
  };
}
