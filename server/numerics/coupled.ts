/**
 * Coupled (unsplit) step for movement and growth: TR-BDF2 on `u' = L u + diag(g) u` with the per-capita
 * rates g frozen at a predicted mid-step state; host loss integrated alongside.
 *
 * Why not operator splitting: at a habitat edge the growth (or mortality) differs on the two sides, so a
 * separate growth substep breaks the edge conditions (continuous v = u/rho, continuous flux) that the
 * implicit diffusion step then has to repair. In the stiff regime (D dt/dx² ≫ 1, every practical run) this
 * reduces Strang splitting to about first order near edges: at the automatic step the local density at an
 * edge was off by a few per cent and the critical width of a clearing by ≈ 0.4 % (tests/verification/
 * convergence.test.ts measures both schemes). Treating L and the growth rates in one implicit solve keeps
 * the edge conditions in every stage and restores second order.
 *
 * makeCoupledStepper is one long factory on purpose: the step is a closure over buffers allocated once per
 * problem, and its stages share them; the bench's engine run spends most of its time in this loop.
 */
import type { DiffusionCounters, DiffusionOperator } from './diffusion.ts';
import { expSmall, type PerCapitaRate, type ReactionCounters } from './reaction.ts';
import type { FieldStepper } from './time-loop.ts';
import { makeTridiagonalSolver } from './tridiagonal.ts';

export interface CoupledCoefficients {
  /** 1 where the cell is host forest (growth form and host loss apply), 0 elsewhere (mortality only). */
  readonly hostAtCells: Uint8Array;
  /** Per-capita mortality in cells without host [1/yr], ≥ 0. */
  readonly mortalityAtCells: Float64Array;
  /** Per-capita growth g(u, h) in host cells [1/yr]. */
  readonly perCapita: PerCapitaRate;
  /** Host kill rate c in dh/dt = −c u h [1/yr per unit relative density], ≥ 0. */
  readonly hostKillRate: number;
  /**
   * Bound on |∂g/∂ln u| and on the positive rates [1/yr]. A step longer than MAX_RATE_STEP / stiffness is
   * cut into equal substeps, because frozen rates are only accurate while they change little within a step.
   */
  readonly stiffness: number;
}

/** TR-BDF2 parameter gamma = 2 − √2 (Bank et al. 1985; Hosea & Shampine 1996). */
const GAMMA = 2 - Math.SQRT2;
/** Largest `stiffness × substep`; the automatic step gives about 0.05–0.2. */
const MAX_RATE_STEP = 1;
/** Negative densities below this fraction of the maximum are round-off and cleared; larger ones trigger the fallback. */
const NEGATIVE_TOLERANCE = 1e-13;
/**
 * The stage matrix `I − θ dt (L + diag g)` stays an M-matrix (hence invertible and positivity-friendly)
 * while θ dt g < 1; beyond this margin the step uses the positive first-order fallback instead.
 */
const STAGE_RATE_LIMIT = 0.9;

/**
 * Makes the coupled stepper.
 *
 * @remarks
 * One step from (uⁿ, hⁿ) over dt:
 * 1. rates g⁰ = g(uⁿ, hⁿ) in host cells, −m elsewhere;
 * 2. mid-step predictor, positive by construction (M-matrix, non-negative right side):
 *    `(I − dt/2 L) ũ = max(1 + dt/2 g⁰, 0) uⁿ`, `h̃ = hⁿ exp(−c dt/4 (uⁿ + ũ))`;
 * 3. mid-step rates g = g(ũ, h̃), and A = L + diag(g);
 * 4. TR-BDF2 on the frozen linear system u' = A u, with θ = γ/2 = (1−γ)/(2−γ) for γ = 2 − √2, so one
 *    factorisation of `I − θ dt A` serves both stages:
 *    `(I − θ dt A) u_s = (I + θ dt A) uⁿ`, `(I − θ dt A) uⁿ⁺¹ = u_s/(γ(2−γ)) − (1−γ)²/(γ(2−γ)) uⁿ`;
 * 5. if that produced a negative density (or θ dt max g ≥ 0.9), the step is redone with the positive
 *    first-order scheme `(I − dt (L + diag g₋)) uⁿ⁺¹ = (1 + dt g₊) uⁿ`;
 * 6. host loss by the trapezoidal rule in log h: `hⁿ⁺¹ = hⁿ exp(−c dt (uⁿ + uⁿ⁺¹)/2)` (positive).
 * Freezing the operator at an O(dt²)-accurate mid-step state and integrating the frozen linear system with
 * a second-order L-stable method gives a second-order step (the frozen operator matches the exact one to
 * O(dt²) at the midpoint, the first term of the Magnus expansion). Own construction from standard parts;
 * its order is measured against exact solutions in tests/verification/convergence.test.ts.
 * TR-BDF2: Bank, Coughran, Fichtner, Grosse, Rose & Smith (1985), IEEE Trans. Electron Devices 32:1992–2007.
 *
 * Longer than 80 lines on purpose: one closure owns the fused factorisations (kept while the step stays the
 * same) and the stage arrays that the substep reuses on every step.
 */
export function makeCoupledStepper(op: DiffusionOperator, coeffs: CoupledCoefficients): FieldStepper {
  const n = op.n;
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: c } = coeffs;
  const solver = makeTridiagonalSolver(n);
  const lo = new Float64Array(n);
  const di = new Float64Array(n);
  const up = new Float64Array(n);
  const rate = new Float64Array(n);
  const mid = new Float64Array(n);
  const hMid = new Float64Array(n);
  const u0 = new Float64Array(n);
  const h0 = new Float64Array(n);
  const diffusion: DiffusionCounters = { trbdf2Steps: 0, fallbackSteps: 0, factorisations: 0 };
  const reaction: ReactionCounters = { substeps: 0 };
  // With gamma = 2 − √2 both TR-BDF2 stages solve with I − θ dt A, θ = gamma/2 = (1 − gamma)/(2 − gamma):
  // one factorisation serves both.
  const theta = 0.5 * GAMMA;
  const cStar = 1 / (GAMMA * (2 - GAMMA));
  const cOld = ((1 - GAMMA) * (1 - GAMMA)) / (GAMMA * (2 - GAMMA));

  /** Factorises I − tau (L + diag(rate)), with only the negative rates when `sinksOnly`. */
  function factor(tau: number, sinksOnly: boolean): void {
    for (let i = 0; i < n; i++) {
      const g = sinksOnly ? Math.min(rate[i], 0) : rate[i];
      lo[i] = -tau * op.lower[i];
      di[i] = 1 - tau * (op.diag[i] + g);
      up[i] = -tau * op.upper[i];
    }
    solver.factor(lo, di, up);
    diffusion.factorisations++;
  }

  /** Positive first-order step over tau from `from` into `out`: (I − tau(L + g₋)) out = (1 + tau g₊) from. */
  function positiveStep(from: Float64Array, out: Float64Array, tau: number): void {
    factor(tau, true);
    for (let i = 0; i < n; i++) out[i] = (1 + tau * Math.max(rate[i], 0)) * from[i];
    solver.solve(out, out);
  }

  // Thomas factors of the predictor matrix I − dt/2 L (fixed per dt) and of the stage matrix
  // I − θ dt (L + diag g) (new every step), kept here so that the step runs in six fused sweeps over
  // memory instead of about fifteen. Same arithmetic, in the same order, as makeTridiagonalSolver.
  const pSub = new Float64Array(n);
  const pInv = new Float64Array(n);
  const pCp = new Float64Array(n);
  const sSub = new Float64Array(n);
  const sInv = new Float64Array(n);
  const sCp = new Float64Array(n);
  let fusedPredictorDt = NaN;

  function factorPredictor(dt: number): void {
    const t = 0.5 * dt;
    let cpPrev = 0;
    for (let i = 0; i < n; i++) {
      const a = -t * op.lower[i];
      const piv = 1 - t * op.diag[i] - (i > 0 ? a * cpPrev : 0);
      const ip = 1 / piv;
      pSub[i] = a;
      pInv[i] = ip;
      cpPrev = i < n - 1 ? -t * op.upper[i] * ip : 0;
      pCp[i] = cpPrev;
    }
    diffusion.factorisations++;
    fusedPredictorDt = dt;
  }

  /**
   * One step of the six-part scheme above. Longer than 80 lines on purpose: the parts run in sequence on
   * the same stage arrays, with the fused tridiagonal solves written inline (the 1-D fast path).
   */
  function substep(u: Float64Array, h: Float64Array, dt: number): void {
    if (dt !== fusedPredictorDt) factorPredictor(dt);
    const lower = op.lower;
    const diag = op.diag;
    const upper = op.upper;
    const halfDt = 0.5 * dt;
    // Sweep 1 (forward): save the state; start rates; predictor right side and its forward elimination.
    let y = 0;
    for (let i = 0; i < n; i++) {
      const ui = u[i];
      const hi = h[i];
      u0[i] = ui;
      h0[i] = hi;
      const g = hostAtCells[i] ? perCapita(ui > 0 ? ui : 0, hi > 0 ? hi : 0) : -mortalityAtCells[i];
      const f = 1 + halfDt * g;
      const r = (f > 0 ? f : 0) * ui;
      y = i === 0 ? r * pInv[0] : (r - pSub[i] * y) * pInv[i];
      mid[i] = y;
    }
    // Sweep 2 (backward): predictor back substitution; mid-step host; mid-step rates.
    let maxPositive = 0;
    let x = 0;
    const quarter = 0.25 * c * dt;
    for (let i = n - 1; i >= 0; i--) {
      x = i === n - 1 ? mid[i] : mid[i] - pCp[i] * x;
      mid[i] = x;
      let g: number;
      if (hostAtCells[i]) {
        const hm = c > 0 ? h0[i] * expSmall(-quarter * (u0[i] + x)) : h0[i];
        hMid[i] = hm;
        g = perCapita(x > 0 ? x : 0, hm > 0 ? hm : 0);
      } else {
        hMid[i] = h0[i];
        g = -mortalityAtCells[i];
      }
      rate[i] = g;
      if (g > maxPositive) maxPositive = g;
    }
    let ok = theta * dt * maxPositive < STAGE_RATE_LIMIT;
    if (ok) {
      const tau = theta * dt;
      // Sweep 3 (forward): factorise I − τ(L + diag g); stage-1 right side (I + τ(L + diag g))u⁰; forward elimination.
      let cpPrev = 0;
      y = 0;
      for (let i = 0; i < n; i++) {
        const g = rate[i];
        const a = i > 0 ? -tau * lower[i] : 0;
        const piv = 1 - tau * (diag[i] + g) - (i > 0 ? a * cpPrev : 0);
        const ip = 1 / piv;
        sSub[i] = a;
        sInv[i] = ip;
        cpPrev = i < n - 1 ? -tau * upper[i] * ip : 0;
        sCp[i] = cpPrev;
        const u0i = u0[i];
        // Same summation order as applyDiffusion.
        const lu =
          n === 1
            ? diag[0] * u0i
            : i === 0
              ? diag[0] * u0i + upper[0] * u0[1]
              : i === n - 1
                ? lower[i] * u0[i - 1] + diag[i] * u0i
                : lower[i] * u0[i - 1] + diag[i] * u0i + upper[i] * u0[i + 1];
        const r = u0i + tau * (lu + g * u0i);
        y = i === 0 ? r * ip : (r - a * y) * ip;
        mid[i] = y;
      }
      // Sweep 4 (backward): stage-1 back substitution; stage-2 right side.
      x = 0;
      for (let i = n - 1; i >= 0; i--) {
        x = i === n - 1 ? mid[i] : mid[i] - sCp[i] * x;
        u[i] = cStar * x - cOld * u0[i];
      }
      // Sweep 5 (forward): stage-2 forward elimination.
      y = 0;
      for (let i = 0; i < n; i++) {
        y = i === 0 ? u[0] * sInv[0] : (u[i] - sSub[i] * y) * sInv[i];
        u[i] = y;
      }
      // Sweep 6 (backward): stage-2 back substitution and the range of the result.
      let min = 0;
      let max = 0;
      x = 0;
      for (let i = n - 1; i >= 0; i--) {
        x = i === n - 1 ? u[i] : u[i] - sCp[i] * x;
        u[i] = x;
        if (x < min) min = x;
        else if (x > max) max = x;
      }
      ok = min >= -NEGATIVE_TOLERANCE * max;
      // Round-off negatives are cleared so that growth terms never see u < 0.
      if (ok && min < 0) for (let i = 0; i < n; i++) if (u[i] < 0) u[i] = 0;
    }
    if (ok) diffusion.trbdf2Steps++;
    else {
      positiveStep(u0, u, dt);
      diffusion.fallbackSteps++;
    }
    if (c > 0) {
      const halfC = 0.5 * c * dt;
      for (let i = 0; i < n; i++) if (hostAtCells[i]) h[i] = h0[i] * expSmall(-halfC * (u0[i] + u[i]));
    }
  }

  return {
    step(u, h, dt) {
      const nSub = Math.max(1, Math.ceil((coeffs.stiffness * dt) / MAX_RATE_STEP));
      const tau = dt / nSub;
      for (let s = 0; s < nSub; s++) substep(u, h, tau);
      reaction.substeps += nSub;
    },
    counters: () => ({ diffusion: { ...diffusion }, reaction: { ...reaction } }),
  };
}
