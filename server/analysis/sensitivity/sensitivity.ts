/**
 * Global sensitivity from ensemble draws: partial rank correlation coefficients (PRCC).
 *
 * @remarks PRCC of parameter j with outcome y: rank-transform every column (average ranks for ties),
 * then correlate the residuals of rank(x_j) and rank(y) after linear regression on the ranks of all
 * other parameters. Computed here through the inverse P of the rank correlation matrix of [x_1 … x_k, y]:
 * PRCC_j = −P_jy / √(P_jj P_yy) (the standard partial-correlation identity). Significance: t = r √(df/(1 − r²)),
 * df = n − 2 − (k − 1). Method: Blower & Dowlatabadi (1994), Int. Stat. Rev. 62(2):229–243; Marino, Hogue,
 * Ray & Kirschner (2008), J. Theor. Biol. 254:178–196 [both from memory].
 */
import { normalQuantile } from '../../model/quantity.ts';
import { centredMoments } from '../run/speed.ts';

/** Average ranks (1-based) with ties sharing their mean rank; +Infinity sorts last (censored outcomes). */
export function rankTransform(x: ArrayLike<number>): Float64Array {
  const n = x.length;
  const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => {
    const xa = x[a];
    const xb = x[b];
    return xa < xb ? -1 : xa > xb ? 1 : 0;
  });
  const r = new Float64Array(n);
  let i = 0;
  while (i < n) {
    let j = i;
    while (j + 1 < n && x[idx[j + 1]] === x[idx[i]]) j++;
    const avg = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) r[idx[k]] = avg;
    i = j + 1;
  }
  return r;
}

/** Inverse of a small symmetric positive definite matrix (Gauss–Jordan with partial pivoting); null if singular. */
export function invert(a: number[][]): number[][] | null {
  const n = a.length;
  const m = a.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r;
    if (Math.abs(m[p][c]) < 1e-12) return null;
    [m[c], m[p]] = [m[p], m[c]];
    const inv = 1 / m[c][c];
    for (let j = 0; j < 2 * n; j++) m[c][j] *= inv;
    for (let r = 0; r < n; r++) {
      if (r === c || m[r][c] === 0) continue;
      const f = m[r][c];
      for (let j = 0; j < 2 * n; j++) m[r][j] -= f * m[c][j];
    }
  }
  return m.map((row) => row.slice(n));
}

function correlation(a: Float64Array, b: Float64Array): number {
  const { saa, sab, sbb } = centredMoments(a, b);
  return saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0;
}

/** Two-sided 5 % critical value of Student's t with df degrees of freedom (Cornish–Fisher expansion about the normal). */
export function tCritical95(df: number): number {
  const z = normalQuantile(0.975);
  if (!(df > 0)) return Infinity;
  return z + (z ** 3 + z) / (4 * df) + (5 * z ** 5 + 16 * z ** 3 + 3 * z) / (96 * df * df);
}

export interface PrccResult {
  /** PRCC per parameter (0 for a parameter that does not vary). */
  prcc: number[];
  significant: boolean[];
}

/**
 * PRCC of each column of `columns` (parameter values per draw) with `y` (outcome per draw; +Infinity allowed
 * for censored outcomes). Returns null when y does not vary or there are too few draws.
 */
export function partialRankCorrelation(columns: readonly ArrayLike<number>[], y: ArrayLike<number>): PrccResult | null {
  const n = y.length;
  const k = columns.length;
  const ry = rankTransform(y);
  const yVaries = ry.some((v) => v !== ry[0]);
  if (!yVaries || k === 0) return null;
  const ranks = columns.map((c) => rankTransform(c));
  const active = ranks.map((r, j) => (r.some((v) => v !== r[0]) ? j : -1)).filter((j) => j >= 0);
  const p = active.length;
  const df = n - 2 - (p - 1);
  if (p === 0 || df < 1) return null;
  const vars = [...active.map((j) => ranks[j]), ry];
  const c = vars.map((a) => vars.map((b) => correlation(a, b)));
  const inv = invert(c);
  const prcc = new Array<number>(k).fill(0);
  const significant = new Array<boolean>(k).fill(false);
  const tc = tCritical95(df);
  active.forEach((j, a) => {
    let r: number;
    if (inv) r = -inv[a][p] / Math.sqrt(inv[a][a] * inv[p][p]);
    else r = c[a][p]; // Collinear ranks (tiny ensembles): fall back to the plain rank correlation.
    r = Math.max(-1, Math.min(1, r));
    prcc[j] = r;
    const t = Math.abs(r) < 1 ? Math.abs(r) * Math.sqrt(df / (1 - r * r)) : Infinity;
    significant[j] = t > tc;
  });
  return { prcc, significant };
}
