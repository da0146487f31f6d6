/**
 * Human-carried bypass of a clearing: long-distance introductions from the infested forest that land
 * beyond the barrier and establish there.
 *
 * Stratified-dispersal view (Shigesada, Kawasaki & Takeda 1995, Am. Nat. 146(2):229–251): neighbourhood
 * spread (the simulated front) runs alongside rare long-distance introductions that found new colonies.
 * Here introductions start as a Poisson process at rate σ per km² of infested forest per year; each is
 * carried towards the protected side with probability q, over a distance with survival function
 * S(x) = P(distance > x), and founds a colony with probability p. Poisson thinning (keeping each event
 * independently with probability q·p·S) leaves a Poisson process, so the number of established
 * introductions beyond the barrier by year T is Poisson with mean
 *
 *   Λ(T) = σ q p b ∫_0^T ∫_{infested near side at t} S(distance from x to the barrier's far edge) dx dt,
 *
 * b being the width of the band the transect stands for, and P(at least one by T) = 1 − e^(−Λ(T)).
 * Own formulas, checked against the closed forms and Monte Carlo values of the methods note (server/numerics/README.md) §7.2.
 */
import type { Grid } from '../numerics/grid.ts';
import type { FieldState, Observer } from '../numerics/time-loop.ts';
import type { PointScenario } from '../model/scenario.ts';

export type PointTransport = NonNullable<PointScenario['transport']>;
export type PointKernel = PointTransport['kernel'];

/** Survival function S(x) = P(distance > x) of a transport kernel and its integral I(x) = ∫_0^x S. */
export interface SurvivalKernel {
  survival(xKm: number): number;
  /** ∫_0^x S(r) dr [km]; for x ≤ 0 returns x (S = 1 there: any forward trip passes a point behind it). */
  integral(xKm: number): number;
  /** Mean distance ∫_0^∞ S [km]. */
  readonly meanKm: number;
}

/**
 * The survival function of a kernel.
 * - exponential (mean μ): S(x) = e^(−x/μ), I(x) = μ(1 − e^(−x/μ)).
 * - table: S piecewise linear through the rows (distance, share carried farther), 0 beyond the last row;
 *   I integrates the linear pieces exactly (trapezoids).
 */
export function makeSurvivalKernel(kernel: PointKernel): SurvivalKernel {
  if (kernel.shape === 'exponential') {
    const mu = kernel.meanKm;
    return {
      meanKm: mu,
      survival: (x) => (x <= 0 ? 1 : Math.exp(-x / mu)),
      // -expm1 keeps I accurate for x ≪ μ.
      integral: (x) => (x <= 0 ? x : -mu * Math.expm1(-x / mu)),
    };
  }
  const d = kernel.points.map((p) => p.distanceKm);
  const sv = kernel.points.map((p) => p.shareBeyond);
  const n = d.length;
  // Cumulative integral at each row.
  const cum = [0];
  for (let i = 1; i < n; i++) cum.push(cum[i - 1] + 0.5 * (sv[i - 1] + sv[i]) * (d[i] - d[i - 1]));
  const locate = (x: number): number => {
    let lo = 0;
    let hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (d[mid] <= x) lo = mid;
      else hi = mid;
    }
    return lo;
  };
  const survival = (x: number): number => {
    if (x <= 0) return 1;
    if (x >= d[n - 1]) return 0;
    const i = locate(x);
    const f = (x - d[i]) / (d[i + 1] - d[i]);
    return sv[i] + f * (sv[i + 1] - sv[i]);
  };
  return {
    meanKm: cum[n - 1],
    survival,
    integral(x) {
      if (x <= 0) return x;
      if (x >= d[n - 1]) return cum[n - 1];
      const i = locate(x);
      return cum[i] + 0.5 * (sv[i] + survival(x)) * (x - d[i]);
    },
  };
}

/** Where the protected side lies and where the barrier's far edge is. */
export interface BarrierGeometry {
  /** Near edge (infested side) [km]. */
  nearKm: number;
  /** Far edge (protected side) [km]. */
  farKm: number;
  side: 'right' | 'left';
}

/** Geometry of a clearing option relative to the current infestation. */
export function barrierGeometry(s: PointScenario, option: { fromKm: number; widthM: number }): BarrierGeometry {
  const a = option.fromKm;
  const b = option.fromKm + option.widthM / 1000;
  return a >= s.infestation.toKm ? { nearKm: a, farKm: b, side: 'right' } : { nearKm: b, farKm: a, side: 'left' };
}

/**
 * Per-cell source weight [km²·(share of trips that pass the far edge)]: band width × ∫ over the cell of
 * S(distance to the far edge) for host cells on the near side of the barrier; 0 elsewhere.
 * Exact cell integrals, so a constant infested area gives the closed form without quadrature error.
 */
export function sourceWeights(
  grid: Grid,
  hostAtCells: Uint8Array,
  geometry: BarrierGeometry,
  kernel: SurvivalKernel,
  bandWidthKm: number,
): Float64Array {
  const w = new Float64Array(grid.nCells);
  const f = grid.facesKm;
  for (let i = 0; i < grid.nCells; i++) {
    if (!hostAtCells[i]) continue;
    if (geometry.side === 'right') {
      if (f[i + 1] > geometry.nearKm + 1e-9) continue;
      w[i] = bandWidthKm * (kernel.integral(geometry.farKm - f[i]) - kernel.integral(geometry.farKm - f[i + 1]));
    } else {
      if (f[i] < geometry.nearKm - 1e-9) continue;
      w[i] = bandWidthKm * (kernel.integral(f[i + 1] - geometry.farKm) - kernel.integral(f[i] - geometry.farKm));
    }
  }
  return w;
}

/**
 * Observer accumulating Λ(t) during a run: after each step, the source strength Σ w_i over infested cells
 * (density at or above `level`) times σ q p, integrated in time by the trapezoidal rule (exact while the
 * infested area is constant). Several weight sets (e.g. the option and the option 100 m wider) share one pass.
 */
export class BypassTracker implements Observer {
  /** Λ at each recorded time, per weight set. */
  readonly lambdaAtTimes: number[][];
  readonly timesYears: number[] = [];
  private readonly lambda: Float64Array;
  private readonly lastRate: Float64Array;
  private lastT = 0;
  private nextRecord = 0;
  constructor(
    private readonly weights: readonly Float64Array[],
    /** σ q p [1/(km² yr)] */
    private readonly ratePerKm2: number,
    private readonly level: number,
    /** Times at which Λ is recorded [yr], increasing. */
    private readonly recordYears: readonly number[],
  ) {
    this.lambda = new Float64Array(weights.length);
    this.lastRate = new Float64Array(weights.length);
    this.lambdaAtTimes = weights.map(() => []);
  }
  private rates(u: Float64Array, out: Float64Array): void {
    out.fill(0);
    const n = u.length;
    for (let k = 0; k < this.weights.length; k++) {
      const w = this.weights[k];
      let s = 0;
      for (let i = 0; i < n; i++) if (w[i] !== 0 && u[i] >= this.level) s += w[i];
      out[k] = s * this.ratePerKm2;
    }
  }
  initialize(s: FieldState): void {
    this.rates(s.u, this.lastRate);
    this.lastT = s.t;
    this.record(s.t);
  }
  private readonly scratch = new Float64Array(8);
  handle(s: FieldState): void {
    const r = this.weights.length <= 8 ? this.scratch : new Float64Array(this.weights.length);
    this.rates(s.u, r);
    const dt = s.t - this.lastT;
    for (let k = 0; k < this.weights.length; k++) {
      this.lambda[k] += 0.5 * (this.lastRate[k] + r[k]) * dt;
      this.lastRate[k] = r[k];
    }
    this.lastT = s.t;
    this.record(s.t);
  }
  private record(t: number): void {
    while (this.nextRecord < this.recordYears.length && t >= this.recordYears[this.nextRecord] - 1e-9) {
      this.timesYears.push(this.recordYears[this.nextRecord]);
      for (let k = 0; k < this.weights.length; k++) this.lambdaAtTimes[k].push(this.lambda[k]);
      this.nextRecord++;
    }
  }
  /** Λ at the end of the run, per weight set. */
  total(k = 0): number {
    return this.lambda[k];
  }
}

/** Effective rate σ·q·p [per km² per yr] of introductions that head for the protected side and establish. */
export function effectiveRate(t: PointTransport): number {
  return t.ratePerKm2Year * t.forwardShare * t.establishmentProbability;
}

/** Width of the band the transect stands for [km]: transport.bandWidthKm, else the barrier length, else 1 km. */
export function bandWidth(s: PointScenario): number {
  return s.transport?.bandWidthKm ?? s.barrier?.lengthKm ?? 1;
}

/** P(at least one event) for a Poisson count with mean Λ. */
export function atLeastOne(lambda: number): number {
  return -Math.expm1(-lambda);
}

/** The plain sentence that names the regulator's tool. */
export const REGULATOR_NOTE =
  'Movement controls on firewood, logs, nursery stock and other regulated articles — set and enforced by the plant-protection regulator — ' +
  'are the tool against human-carried spread; no clearing width stops it.';
