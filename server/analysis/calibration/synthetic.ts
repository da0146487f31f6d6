/**
 * Synthetic survey records: the engine run from known parameters, observed through the detection model
 * with random misses. Used by the demo-record generator, the recovery tests and the coverage bench — the
 * truth is known, so a fit can be checked against it.
 */
import type { PointScenario } from '../../model/scenario.ts';
import type { SurveyRecord } from '../../model/survey.ts';
import type { Rng } from '../../numerics/rng.ts';
import { buildLayout } from '../../problem/layout.ts';
import { chooseResolution, type Resolution } from '../../problem/discretise.ts';
import { detectionProbability, simulateAtPositions, type PositionSeries, type StartStretch } from './likelihood.ts';

/** Where and when the team surveys: the same positions every year, with one effort. */
export interface SurveyDesign {
  years: number[];
  positionsKm: number[];
  /** Effort per record (1 when absent). */
  effort?: number;
}

/** The true density at the design's positions over the survey years (one engine run). */
export interface TruthRun {
  series: PositionSeries;
  startYear: number;
  design: SurveyDesign;
  level: number;
}

/**
 * Runs the true model once from the starting stretch at `startYear` to the last survey year.
 * @param resolution - the automatic resolution when absent
 */
export function truthRun(truth: PointScenario, start: StartStretch, startYear: number, design: SurveyDesign, resolution?: Resolution): TruthRun {
  const last = Math.max(...design.years);
  const years = last - startYear;
  if (!(years > 0)) throw new RangeError(`the start year ${startYear} must come before the last survey year ${last}`);
  const res = resolution ?? chooseResolution(truth, buildLayout(truth));
  return { series: simulateAtPositions(truth, start, design.positionsKm, years, res), startYear, design, level: truth.detectionLevel };
}

/** Density at position index p and time since start tau, linear between steps. */
function densityAt(series: PositionSeries, p: number, tau: number): number {
  const t = series.times;
  const u = series.densityAt[p];
  if (tau <= 0) return u[0];
  let lo = 0;
  let hi = t.length - 1;
  if (tau >= t[hi]) return u[hi];
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t[mid] <= tau) lo = mid;
    else hi = mid;
  }
  const w = (tau - t[lo]) / (t[hi] - t[lo]);
  return u[lo] + w * (u[hi] - u[lo]);
}

/**
 * One replicate of survey records: each (year, position) is detected with the detection model's probability
 * (detection chance q, no stray detections: the truth has none), in year order.
 */
export function drawRecords(run: TruthRun, detectionChance: number, rng: Rng): SurveyRecord[] {
  const out: SurveyRecord[] = [];
  const effort = run.design.effort ?? 1;
  for (const year of [...run.design.years].sort((a, b) => a - b)) {
    run.design.positionsKm.forEach((x, p) => {
      const u = densityAt(run.series, p, year - run.startYear);
      const prob = detectionProbability(u, effort, detectionChance, run.level, 0);
      out.push({ year, atKm: x, detected: rng.next() < prob, ...(run.design.effort !== undefined ? { effort } : {}) });
    });
  }
  return out;
}

/** A survey on a map: random points each year (uniform over the map), seen where the pest has arrived. */
export interface MapSurveyDesign {
  years: number[];
  pointsPerYear: number;
  /** Decimal year the spread started (arrival year 0 of the run). */
  startYear: number;
}

/**
 * One replicate of map records from a 2-D run's arrival years per cell (first year at the detection level;
 * NaN: never): a point is detected with chance `detectionChance` where the pest had arrived by that year,
 * never elsewhere (the truth has no stray detections). Points fall uniformly over the map, new each year.
 */
export function drawMapRecords(
  arrivalYears: ArrayLike<number>,
  grid: { nx: number; ny: number; cellM: number; originXM: number; originYM: number },
  design: MapSurveyDesign,
  detectionChance: number,
  rng: Rng,
): SurveyRecord[] {
  const out: SurveyRecord[] = [];
  const w = grid.nx * grid.cellM;
  const h = grid.ny * grid.cellM;
  for (const year of [...design.years].sort((a, b) => a - b)) {
    for (let k = 0; k < design.pointsPerYear; k++) {
      const ex = rng.next() * w;
      const ny = rng.next() * h;
      const cell = Math.min(grid.ny - 1, Math.floor(ny / grid.cellM)) * grid.nx + Math.min(grid.nx - 1, Math.floor(ex / grid.cellM));
      const present = arrivalYears[cell] <= year - design.startYear;
      out.push({ year, x: grid.originXM + ex, y: grid.originYM - ny, detected: present && rng.next() < detectionChance });
    }
  }
  return out;
}
