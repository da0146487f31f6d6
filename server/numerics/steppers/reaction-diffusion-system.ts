/**
 * The engine's semi-discretisation as a {@link StiffSystem}: insect density u and host fraction h per
 * cell, interleaved in one vector (y[2i] = u_i, y[2i+1] = h_i) so that a window of cells is one range.
 *
 *   u_i' = (L u)_i + u_i g(u_i, h_i),   h_i' = −c u_i h_i      in host cells,
 *   u_i' = (L u)_i − m_i u_i,           h_i' = 0               elsewhere,
 *
 * with L the finite-volume diffusion operator of the residence-index form (numerics/diffusion.ts: edge
 * jumps sit on faces) — exactly the system the coupled TR-BDF2 step (numerics/coupled.ts) integrates.
 *
 * @remarks
 * Jacobian: L plus per-cell 2 × 2 blocks [[p, q], [s, w]] with p = ∂(u g)/∂u, q = u ∂g/∂h, s = −c h,
 * w = −c u (m replaces p off host). The growth form is only known as g(u, h), so ∂g/∂u and ∂g/∂h are
 * forward differences (relative step 1e-7: the Newton matrix only needs an approximation; accuracy is set
 * by the error test, not by J). Linear solve with I − c J: eliminating each cell's host unknown,
 *   δh_i = (r_h,i + c s_i δu_i) / (1 − c w_i),
 * leaves the tridiagonal system
 *   [I − c (L + diag(p + c q s/(1 − c w)))] δu = r_u + c q r_h/(1 − c w),
 * solved by the lockstep (4-block SPIKE) solver with its Thomas fallback (linear/lockstep-tridiagonal.ts).
 */
import type { DiffusionOperator } from '../diffusion.ts';
import type { PerCapitaRate } from '../reaction.ts';
import { makeLockstepTridiagonal } from '../linear/lockstep-tridiagonal.ts';
import type { StiffSystem } from './stiff-system.ts';

export interface ReactionDiffusionCoefficients {
  /** 1 where the cell is host forest (growth form and host loss apply), 0 elsewhere (mortality only). */
  readonly hostAtCells: Uint8Array;
  /** Per-capita mortality in cells without host [1/yr], ≥ 0. */
  readonly mortalityAtCells: Float64Array;
  /** Per-capita growth g(u, h) in host cells [1/yr]. */
  readonly perCapita: PerCapitaRate;
  /** Host kill rate c in dh/dt = −c u h [1/yr per unit relative density], ≥ 0. */
  readonly hostKillRate: number;
}

export interface ReactionDiffusionSystem extends StiffSystem {
  readonly nCells: number;
  /** Packs u and h into a state vector (length 2 nCells). */
  pack(u: Float64Array, h: Float64Array, y?: Float64Array): Float64Array;
  /** Unpacks cells lo…hi−1 of y into u and h. */
  unpack(y: Float64Array, u: Float64Array, h: Float64Array, cellLo?: number, cellHi?: number): void;
  /** Factorisations by path of the tridiagonal solver. */
  readonly linearCounters: { lockstep: number; thomas: number };
}

/** Relative step of the forward differences for ∂g/∂u and ∂g/∂h. */
const DIFF_STEP = 1e-7;

/**
 * Makes the system; all scratch is allocated here.
 *
 * Longer than 80 lines on purpose: the right-hand side, the Jacobian, its factorisation and the solve share
 * the coefficients and scratch of one closure, and each is a single hot loop over the active window.
 */
export function makeReactionDiffusionSystem(
  op: DiffusionOperator,
  coeffs: ReactionDiffusionCoefficients,
  options: { forceThomas?: boolean } = {},
): ReactionDiffusionSystem {
  const n = op.n;
  const { lower, diag, upper } = op;
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: ck } = coeffs;
  const p = new Float64Array(n);
  const q = new Float64Array(n);
  const s = new Float64Array(n);
  const w = new Float64Array(n);
  // Per-factorisation: c q/(1 − c w), c s, 1/(1 − c w).
  const cq = new Float64Array(n);
  const cs = new Float64Array(n);
  const invW = new Float64Array(n);
  const tl = new Float64Array(n);
  const td = new Float64Array(n);
  const tu = new Float64Array(n);
  const buf = new Float64Array(n);
  const solver = makeLockstepTridiagonal(n, options);

  return {
    size: 2 * n,
    nCells: n,
    linearCounters: solver.counters,
    pack(u, h, y = new Float64Array(2 * n)) {
      for (let i = 0; i < n; i++) {
        y[2 * i] = u[i];
        y[2 * i + 1] = h[i];
      }
      return y;
    },
    unpack(y, u, h, cellLo = 0, cellHi = n) {
      for (let i = cellLo; i < cellHi; i++) {
        u[i] = y[2 * i];
        h[i] = y[2 * i + 1];
      }
    },
    rhs(_t, y, out, lo, hi) {
      const c0 = lo >> 1;
      const c1 = hi >> 1;
      for (let i = c0; i < c1; i++) {
        const u = y[2 * i];
        let lu = diag[i] * u;
        if (i > 0) lu += lower[i] * y[2 * i - 2];
        if (i < n - 1) lu += upper[i] * y[2 * i + 2];
        if (hostAtCells[i]) {
          const h = y[2 * i + 1];
          out[2 * i] = lu + u * perCapita(u, h);
          out[2 * i + 1] = -ck * u * h;
        } else {
          out[2 * i] = lu - mortalityAtCells[i] * u;
          out[2 * i + 1] = 0;
        }
      }
    },
    jacobian(_t, y, lo, hi) {
      const c0 = lo >> 1;
      const c1 = hi >> 1;
      for (let i = c0; i < c1; i++) {
        if (hostAtCells[i]) {
          const u = y[2 * i];
          const h = y[2 * i + 1];
          const g = perCapita(u, h);
          const du = DIFF_STEP * Math.max(Math.abs(u), 1e-3);
          const dh = DIFF_STEP * Math.max(Math.abs(h), 1e-3);
          const gu = (perCapita(u + du, h) - g) / du;
          const gh = (perCapita(u, h + dh) - g) / dh;
          p[i] = g + u * gu;
          q[i] = u * gh;
          s[i] = -ck * h;
          w[i] = -ck * u;
        } else {
          p[i] = -mortalityAtCells[i];
          q[i] = 0;
          s[i] = 0;
          w[i] = 0;
        }
      }
    },
    factor(c, lo, hi) {
      const c0 = lo >> 1;
      const c1 = hi >> 1;
      const m = c1 - c0;
      for (let i = c0; i < c1; i++) {
        const iw = 1 / (1 - c * w[i]);
        invW[i] = iw;
        cq[i] = c * q[i] * iw;
        cs[i] = c * s[i];
        const k = i - c0;
        tl[k] = -c * lower[i];
        tu[k] = -c * upper[i];
        td[k] = 1 - c * (diag[i] + p[i] + cq[i] * s[i]);
        if (!Number.isFinite(td[k])) return false;
      }
      solver.factor(tl, td, tu, m);
      return true;
    },
    solve(b, lo, hi) {
      const c0 = lo >> 1;
      const c1 = hi >> 1;
      for (let i = c0; i < c1; i++) buf[i - c0] = b[2 * i] + cq[i] * b[2 * i + 1];
      solver.solve(buf, buf);
      for (let i = c0; i < c1; i++) {
        const x = buf[i - c0];
        b[2 * i] = x;
        b[2 * i + 1] = (b[2 * i + 1] + cs[i] * x) * invW[i];
      }
    },
  };
}
