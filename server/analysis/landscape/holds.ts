/**
 * Evidence that a band holds on the map: a verified steady state of the 2-D equations with the protected
 * sites below the threshold, stable against perturbations. Without it the verdict is "not crossed within
 * the horizon" — a front that merely lingers at the horizon is never taken as held (near the critical width
 * fronts linger for a long time before crossing).
 *
 * @remarks
 * Method (pest without host depletion, strong Allee effect):
 * 1. pseudo-time continuation from the run's final state with steps growing ×1.5 up to the largest step the
 *    coupled stage allows (θ dt max g < 0.9), until the change per unit time falls below 1e-9 of the
 *    density scale. The step's fixed points are exactly the steady states of the discrete equations (the
 *    stage corrections vanish there), so this is a Newton-free steady-state solver (pseudo-transient
 *    continuation; Kelley & Keyes 1998, SIAM J. Numer. Anal. 35:508–523);
 * 2. the unsplit residual `L u + u g(u)` evaluated directly, relative to r·max u, must be below 1e-7;
 * 3. every protected site's density must be below θ (the zero of the growth potential above the Allee
 *    threshold: a population below it cannot build a front; the transect's rule);
 * 4. stability: the steady state perturbed by ±1 % (a positive perturbation has a positive component on the
 *    principal mode, whose eigenvector is positive for this Metzler Jacobian) is run for 10/r years at the
 *    normal step; the deviation must shrink in both runs.
 * With host depletion the transect's die-out (upper-solution) bound is not carried over to maps: not verified.
 */
import { strongAllee, potentialThreshold } from '../run/barrier-growth.ts';
import { growthRateScale } from '../../problem/discretise.ts';
import { applyRasterOperator } from '../../numerics/raster/operator.ts';
import { CancelledError } from '../../jobs/task-runner.ts';
import { problemStepper, type LandscapeProblem, type PointPest } from './problem.ts';
import type { RawRun } from './run.ts';
import type { LandscapeOptionResult } from './result.ts';

type Pinning = LandscapeOptionResult['pinning'];

const STAGE_RATE_LIMIT = 0.9;
const THETA = 0.5 * (2 - Math.SQRT2);
const STEADY_CHANGE = 1e-9;
const RESIDUAL_TOLERANCE = 1e-7;
const MAX_PSEUDO_STEPS = 600;

/** Relative residual ‖L u + u g(u)‖∞ / (r · max u) of the unsplit 2-D equations on the whole map. */
export function steadyResidual(p: LandscapeProblem, u: Float64Array, r: number): number {
  const n = u.length;
  const rate = new Float64Array(n);
  for (let k = 0; k < n; k++) rate[k] = p.hostAtCells[k] ? p.perCapita(u[k], p.stockingAtCells[k]) : p.op.insideAtCells[k] ? -p.mortalityAtCells[k] : 0;
  const out = new Float64Array(n);
  applyRasterOperator(p.op, { r0: 0, r1: p.landscape.ny - 1, c0: 0, c1: p.landscape.nx - 1 }, u, out, rate);
  let maxF = 0;
  let maxU = 0;
  for (let k = 0; k < n; k++) {
    if (Math.abs(out[k]) > maxF) maxF = Math.abs(out[k]);
    if (u[k] > maxU) maxU = u[k];
  }
  return maxU > 0 ? maxF / (r * maxU) : 0;
}

export interface HoldSettings {
  horizonYears: number;
  detectionLevel: number;
  sitesReached: boolean;
  shouldCancel?: () => boolean;
}

/** The answer without any computation where the rules settle it (null: the continuation must decide). */
export function holdPrecheck(p: LandscapeProblem, pest: PointPest, o: HoldSettings): Pinning | null {
  const g = pest.growth;
  if (o.sitesReached) return { verified: false, method: 'none', detail: 'A protected site behind the band was reached.' };
  if (p.landscape.sites.length === 0) return { verified: false, method: 'none', detail: 'No protected site to hold the front from.' };
  if (!strongAllee(g, 1)) {
    return { verified: false, method: 'none', detail: 'Without a strong Allee effect no band pins a front in this model: any insects that cross found a growing population.' };
  }
  if (pest.hostKillRate > 0) {
    return {
      verified: false,
      method: 'none',
      detail: 'The pest kills its hosts: the die-out bound that verifies a held front on transects is not carried over to maps, so the band is reported as not crossed within the horizon.',
    };
  }
  return null;
}

/** Evidence that the band holds: the rules first (holdPrecheck), then the continuation from the run's end. */
export function verifyHold(p: LandscapeProblem, raw: Pick<RawRun, 'u' | 'h'>, pest: PointPest, o: HoldSettings): Pinning {
  return holdPrecheck(p, pest, o) ?? continueToSteadyState(p, raw, pest, o);
}

/** Steps 1–4 of the method above, from the run's final state (after holdPrecheck returned null). */
export function continueToSteadyState(p: LandscapeProblem, raw: Pick<RawRun, 'u' | 'h'>, pest: PointPest, o: HoldSettings): Pinning {
  const g = pest.growth;
  const r = growthRateScale(g);
  // Largest per-capita rate up to capacity bounds the step the coupled stage takes without its fallback.
  let gMax = 0;
  for (let i = 1; i <= 400; i++) gMax = Math.max(gMax, p.perCapita((1.2 * i) / 400, 1));
  const dtMax = gMax > 0 ? (0.8 * STAGE_RATE_LIMIT) / (THETA * gMax) : 100 * p.stepYears;
  const stepper = problemStepper(p);
  const u = Float64Array.from(raw.u);
  const h = Float64Array.from(raw.h);
  const before = new Float64Array(u.length);
  let dt = p.stepYears;
  let change = Infinity;
  let steps = 0;
  let scale = 0;
  for (const v of u) if (v > scale) scale = v;
  for (; steps < MAX_PSEUDO_STEPS; steps++) {
    if (o.shouldCancel?.()) throw new CancelledError();
    before.set(u);
    stepper.step(u, h, dt);
    let m = 0;
    for (let k = 0; k < u.length; k++) m = Math.max(m, Math.abs(u[k] - before[k]));
    change = m / (dt * Math.max(scale, 1e-300));
    if (change < STEADY_CHANGE * r) break;
    dt = Math.min(dtMax, dt * 1.5);
  }
  if (stepper.counters().fallbackSteps > 0 || !(change < STEADY_CHANGE * r)) {
    return { verified: false, method: 'none', detail: `No steady state was reached by continuation from the year-${o.horizonYears} state (relative change ${change.toExponential(1)} per year after ${steps} steps).` };
  }
  const residual = steadyResidual(p, u, r);
  if (!(residual < RESIDUAL_TOLERANCE)) {
    return { verified: false, method: 'none', detail: `The continuation stalled at a state whose residual ${residual.toExponential(1)} is not a steady state.` };
  }
  // Sites below θ at their stocking.
  for (const site of p.landscape.sites) {
    for (const k of site.cells) {
      if (!p.hostAtCells[k]) continue;
      const theta = potentialThreshold(g, p.stockingAtCells[k]) ?? Infinity;
      if (!(u[k] < theta)) {
        return { verified: false, method: 'none', detail: `Continued towards a steady state, the run settles with ${site.name} above the threshold θ: the pest gets there after the horizon.` };
      }
    }
  }
  // Stability: ±1 % perturbations must decay.
  const ratios: number[] = [];
  for (const sign of [1, -1]) {
    const s2 = problemStepper(p);
    const w = Float64Array.from(u, (x) => x * (1 + 0.01 * sign));
    const hw = Float64Array.from(h);
    const dev = () => {
      let m = 0;
      for (let k = 0; k < w.length; k++) m = Math.max(m, Math.abs(w[k] - u[k]));
      return m;
    };
    const d0 = dev();
    const n = Math.ceil(10 / r / p.stepYears);
    for (let i = 0; i < n; i++) {
      if (o.shouldCancel?.()) throw new CancelledError();
      s2.step(w, hw, p.stepYears);
    }
    ratios.push(dev() / d0);
  }
  if (!ratios.every((x) => x < 1)) {
    return { verified: false, method: 'none', detail: `A steady state was found but a ±1 % perturbation did not decay (deviation ratios ${ratios.map((x) => x.toFixed(3)).join(', ')}).` };
  }
  return {
    verified: true,
    method: 'steady-state',
    detail:
      `Steady state of the 2-D equations reached by continuation from the year-${o.horizonYears} state (${steps} steps; residual ${residual.toExponential(1)} of r·max u), ` +
      `every protected site below the threshold θ, and ±1 % perturbations decay over ${Math.round(10 / r)} yr (deviation ratios ${ratios.map((x) => x.toFixed(3)).join(', ')}).`,
  };
}
