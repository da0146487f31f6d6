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
 */
import { applyDiffusion, type DiffusionCounters, type DiffusionOperator } from './diffusion.ts';
import type { PerCapitaRate, ReactionCounters } from './reaction.ts';
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
 */
export function makeCoupledStepper(op: DiffusionOperator, coeffs: CoupledCoefficients): FieldStepper {
  const n = op.n;
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: c } = coeffs;
  const solver = makeTridiagonalSolver(n);
  const lo = new Float64Array(n);
  const di = new Float64Array(n);
  const up = new Float64Array(n);
  const rate = new Float64Array(n);
  const lu = new Float64Array(n);
  const mid = new Float64Array(n);
  const hMid = new Float64Array(n);
  const u0 = new Float64Array(n);
  const h0 = new Float64Array(n);
  const predictor = makeTridiagonalSolver(n);
  let predictorDt = NaN; // step length the predictor matrix I − dt/2 L was factorised for
  const diffusion: DiffusionCounters = { trbdf2Steps: 0, fallbackSteps: 0, factorisations: 0 };
  const reaction: ReactionCounters = { substeps: 0 };
  // With gamma = 2 − √2 both TR-BDF2 stages solve with I − θ dt A, θ = gamma/2 = (1 − gamma)/(2 − gamma):
  // one factorisation serves both.
  const theta = 0.5 * GAMMA;
  const cStar = 1 / (GAMMA * (2 - GAMMA));
  const cOld = ((1 - GAMMA) * (1 - GAMMA)) / (GAMMA * (2 - GAMMA));

  /** rate[i] = per-capita rate at (u, h) (negative densities read as 0); returns the largest positive rate. */
  function rates(u: Float64Array, h: Float64Array): number {
    let maxPositive = 0;
    for (let i = 0; i < n; i++) {
      const g = hostAtCells[i] ? perCapita(Math.max(u[i], 0), Math.max(h[i], 0)) : -mortalityAtCells[i];
      rate[i] = g;
      if (g > maxPositive) maxPositive = g;
    }
    return maxPositive;
  }

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

  /**
   * Mid-step state (mid, hMid), accurate to O(dt²): growth over dt/2 at the start rates, then implicit
   * movement over dt/2, `(I − dt/2 L) ũ = max(1 + dt/2 g⁰, 0) uⁿ` — positive, and the matrix depends on dt
   * only, so its factorisation is reused from step to step.
   */
  function predict(dt: number): void {
    if (dt !== predictorDt) {
      for (let i = 0; i < n; i++) {
        lo[i] = -0.5 * dt * op.lower[i];
        di[i] = 1 - 0.5 * dt * op.diag[i];
        up[i] = -0.5 * dt * op.upper[i];
      }
      predictor.factor(lo, di, up);
      diffusion.factorisations++;
      predictorDt = dt;
    }
    rates(u0, h0);
    for (let i = 0; i < n; i++) mid[i] = Math.max(1 + 0.5 * dt * rate[i], 0) * u0[i];
    predictor.solve(mid, mid);
    for (let i = 0; i < n; i++) hMid[i] = c > 0 && hostAtCells[i] ? h0[i] * Math.exp(-0.25 * c * dt * (u0[i] + mid[i])) : h0[i];
  }

  function substep(u: Float64Array, h: Float64Array, dt: number): void {
    u0.set(u);
    h0.set(h);
    predict(dt);
    const maxPositive = rates(mid, hMid);
    let ok = theta * dt * maxPositive < STAGE_RATE_LIMIT;
    if (ok) {
      const tau = theta * dt;
      factor(tau, false);
      applyDiffusion(op, u0, lu);
      for (let i = 0; i < n; i++) mid[i] = u0[i] + tau * (lu[i] + rate[i] * u0[i]);
      solver.solve(mid, mid);
      for (let i = 0; i < n; i++) u[i] = cStar * mid[i] - cOld * u0[i];
      solver.solve(u, u);
      let min = 0;
      let max = 0;
      for (let i = 0; i < n; i++) {
        const x = u[i];
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
    if (c > 0) for (let i = 0; i < n; i++) if (hostAtCells[i]) h[i] = h0[i] * Math.exp(-0.5 * c * dt * (u0[i] + u[i]));
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
