/**
 * The engine's predicted detection pattern and the binomial likelihood of the records.
 *
 * Detection model (common practice in occupancy surveys, no single source; the repeated-visit form follows
 * MacKenzie et al. 2002, Ecology 83:2248–2255): a survey unit of effort E at density u finds the pest with
 * probability P = ε + (1 − ε)(1 − (1 − q(1 − e^(−u/L)))^E), where L is the scenario's detection level, q the
 * chance that one unit of effort finds an established population (fitted), and ε a small rate of detections
 * no density explains (a floor that keeps one stray record from deciding the fit).
 *
 * The run starts from the starting stretch at an unknown year T0 (the start year, fitted); the record of
 * year y is compared with the density at time y − T0 of that one run, so T0 costs no extra runs.
 */
import type { PointScenario } from '../../model/scenario.ts';
import type { Observer, FieldState } from '../../numerics/time-loop.ts';
import { buildLayout } from '../../problem/layout.ts';
import { runLayout } from '../run/simulate.ts';
import { discretise, type Resolution } from '../../problem/discretise.ts';
import { makeProbe, probeValue, type PointProbe } from '../run/trackers.ts';
import { goldenSectionMin } from '../../numerics/minimise.ts';

/** Rate of detections that no density explains (ε). */
export const STRAY_DETECTION_RATE = 1e-3;

/** Detection probability of one record. */
export function detectionProbability(u: number, effort: number, q: number, level: number, eps = STRAY_DETECTION_RATE): number {
  const single = q * -Math.expm1(-Math.max(0, u) / level);
  const found = effort === 1 ? single : -Math.expm1(effort * Math.log1p(-Math.min(single, 1 - 1e-15)));
  return eps + (1 - eps) * found;
}

/** The starting stretch: where the pest was established at the start year [km], and its density. */
export interface StartStretch {
  fromKm: number;
  toKm: number;
  density: number;
}

/** Density at fixed positions, every step of one run. */
export interface PositionSeries {
  /** Run times [yr since the start year], from 0. */
  times: number[];
  /** densityAt[p][k]: density at position p at times[k]. */
  densityAt: Float64Array[];
  status: string;
}

class PositionRecorder implements Observer {
  readonly times: number[] = [];
  readonly values: number[][];
  constructor(private readonly probes: PointProbe[]) {
    this.values = probes.map(() => []);
  }
  private take(st: FieldState): void {
    this.times.push(st.t);
    this.probes.forEach((p, i) => this.values[i].push(probeValue(p, st.u)));
  }
  initialize(st: FieldState): void {
    this.take(st);
  }
  handle(st: FieldState): boolean {
    this.take(st);
    return false;
  }
}

/**
 * Runs the model from the starting stretch for `years` and records the density at each position every step.
 * @param resolution - the fit's fixed resolution (one grid for every trial value keeps the likelihood smooth)
 */
export function simulateAtPositions(
  s: PointScenario,
  start: StartStretch,
  positionsKm: readonly number[],
  years: number,
  resolution: Resolution,
  shouldCancel?: () => boolean,
): PositionSeries {
  const run: PointScenario = { ...s, infestation: { ...start }, horizonYears: years, sites: [], barrier: undefined, uncertainty: undefined, transport: undefined, mosaics: undefined };
  const pieces = buildLayout(run);
  const problem = discretise(run, pieces, resolution);
  const recorder = new PositionRecorder(positionsKm.map((x) => makeProbe(problem.grid, x)));
  const out = runLayout({ scenario: run, pieces, problem, resolution, record: false, observers: [recorder], shouldCancel });
  return { times: recorder.times, densityAt: recorder.values.map((v) => Float64Array.from(v)), status: out.solver.status };
}

/** Records in the compact form the likelihood loops over. */
export interface RecordArrays {
  year: Float64Array;
  position: Int32Array;
  detected: Uint8Array;
  effort: Float64Array;
  /** Distinct positions [km], indexed by `position`. */
  positionsKm: number[];
}

export function recordArrays(records: readonly { year: number; atKm?: number; detected: boolean; effort?: number }[]): RecordArrays {
  const positionsKm: number[] = [];
  const index = new Map<number, number>();
  const n = records.length;
  const out: RecordArrays = { year: new Float64Array(n), position: new Int32Array(n), detected: new Uint8Array(n), effort: new Float64Array(n), positionsKm };
  records.forEach((r, i) => {
    const x = r.atKm as number;
    let k = index.get(x);
    if (k === undefined) {
      k = positionsKm.length;
      index.set(x, k);
      positionsKm.push(x);
    }
    out.year[i] = r.year;
    out.position[i] = k;
    out.detected[i] = r.detected ? 1 : 0;
    out.effort[i] = r.effort ?? 1;
  });
  return out;
}

/** Density of every record for start year t0 (linear in time between steps; 0 before the start). */
export function densitiesAtStart(series: PositionSeries, rec: RecordArrays, t0: number, out: Float64Array): Float64Array {
  const { times } = series;
  const last = times.length - 1;
  const dt = last > 0 ? times[1] - times[0] : 1;
  for (let i = 0; i < rec.year.length; i++) {
    const tau = rec.year[i] - t0;
    const u = series.densityAt[rec.position[i]];
    if (tau <= 0) {
      out[i] = tau === 0 ? u[0] : 0;
      continue;
    }
    // Steps are uniform except possibly the last (the time loop lands on the end time).
    let k = Math.min(last - 1, Math.floor(tau / dt));
    while (k > 0 && times[k] > tau) k--;
    while (k < last - 1 && times[k + 1] < tau) k++;
    if (tau >= times[last]) {
      out[i] = u[last];
      continue;
    }
    const w = (tau - times[k]) / (times[k + 1] - times[k]);
    out[i] = u[k] + w * (u[k + 1] - u[k]);
  }
  return out;
}

/** Binomial log-likelihood of the records at densities u, detection chance q and detection level L. */
export function logLikelihood(u: Float64Array, rec: RecordArrays, q: number, level: number): number {
  let ll = 0;
  for (let i = 0; i < u.length; i++) {
    const p = detectionProbability(u[i], rec.effort[i], q, level);
    ll += rec.detected[i] ? Math.log(p) : Math.log1p(-p);
  }
  return ll;
}

export interface NuisanceFit {
  logLik: number;
  /** Start year T0 (fractional). */
  startYear: number;
  /** Detection chance q of one unit of effort in an established population. */
  detectionChance: number;
  /** T0 at the earliest allowed start (the lead was not enough). */
  startAtBound: boolean;
}

const logit = (p: number) => Math.log(p / (1 - p));
const expit = (x: number) => 1 / (1 + Math.exp(-x));

/**
 * Best detection chance for fixed densities (golden section on logit q ∈ [−6, 6]). The density part
 * 1 − e^(−u/L) of each record does not depend on q, so it is computed once (`sat`) and each trial q costs one
 * logarithm per record — the same arithmetic as `logLikelihood`, rearranged.
 */
function bestChance(u: Float64Array, rec: RecordArrays, level: number, sat: Float64Array): { q: number; ll: number } {
  const n = u.length;
  let unitEffort = true;
  for (let i = 0; i < n; i++) {
    sat[i] = -Math.expm1(-Math.max(0, u[i]) / level);
    if (rec.effort[i] !== 1) unitEffort = false;
  }
  const eps = STRAY_DETECTION_RATE;
  const ll = (q: number): number => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const single = q * sat[i];
      const found = unitEffort || rec.effort[i] === 1 ? single : -Math.expm1(rec.effort[i] * Math.log1p(-Math.min(single, 1 - 1e-15)));
      const p = eps + (1 - eps) * found;
      s += rec.detected[i] ? Math.log(p) : Math.log1p(-p);
    }
    return s;
  };
  const m = goldenSectionMin((x) => -ll(expit(x)), -6, 6, 2e-3, 40);
  return { q: expit(m.x), ll: -m.value };
}

/**
 * Maximises the likelihood of one run over the start year T0 ∈ [earliest, latest] (grid of half years, then
 * golden section around the best) and the detection chance q.
 */
export function fitNuisance(series: PositionSeries, rec: RecordArrays, level: number, earliest: number, latest: number): NuisanceFit {
  const u = new Float64Array(rec.year.length);
  const sat = new Float64Array(rec.year.length);
  const at = (t0: number) => bestChance(densitiesAtStart(series, rec, t0, u), rec, level, sat);
  const step = 0.5;
  const n = Math.max(1, Math.ceil((latest - earliest) / step));
  let bestT = latest;
  let best = at(latest);
  for (let k = 0; k < n; k++) {
    const t0 = earliest + k * step;
    const v = at(t0);
    if (v.ll > best.ll) {
      best = v;
      bestT = t0;
    }
  }
  const lo = Math.max(earliest, bestT - step);
  const hi = Math.min(latest, bestT + step);
  const m = goldenSectionMin((t0) => -at(t0).ll, lo, hi, 0.02, 30);
  if (-m.value > best.ll) {
    bestT = m.x;
    best = at(m.x);
  }
  return { logLik: best.ll, startYear: bestT, detectionChance: best.q, startAtBound: bestT - earliest < 0.05 && earliest < latest };
}

/** logit q, for callers that report it on that scale. */
export { logit };
