/**
 * One 2-D run: the time loop over the raster stepper, recording per cell the first year the density reached
 * the detection level and the established level, the sites' arrivals, and the occupied area over time.
 */
import { CancelledError } from '../../jobs/task-runner.ts';
import type { LandscapeProblem, PointPest } from './problem.ts';
import { problemStepper } from './problem.ts';
import { establishedLevel } from '../run/barrier-growth.ts';
import { hasStrongAllee } from '../../model/growth.ts';
import type { LandscapeNumerics } from './result.ts';

export interface RunSettings {
  horizonYears: number;
  detectionLevel: number;
  shouldCancel?: () => boolean;
  /** Fraction of this run's simulated time done. */
  onProgress?: (fraction: number) => void;
  /**
   * Stop early once every site is reached (detection level; with an Allee threshold, the established level
   * too) and the run has gone `stopMarginYears(arrival)` past each site's arrival (default false). The
   * per-cell arrival maps, host and series then cover only the years run.
   */
  stopWhenSitesReached?: boolean;
  /** Years a run goes on past a site's arrival before it may stop (default 0). */
  stopMarginYears?: (arrivalYears: number) => number;
  /** Record the occupied area every this many years (default 0.5). */
  seriesEveryYears?: number;
}

export interface RawRun {
  /** First year at the detection level per cell (NaN: never). */
  detected: Float32Array;
  /** First year at the established level per cell (NaN: never or not host). */
  established: Float32Array;
  u: Float64Array;
  h: Float64Array;
  series: { timesYears: number[]; occupiedKm2: number[]; totalInsects: number[] };
  endYears: number;
  numerics: LandscapeNumerics;
}

/**
 * Established levels kept per growth form and map while they are in use: an evaluation's runs (baseline and
 * options) share the pest, the map and almost all host cells, and a level costs an equilibrium search. Per
 * cell, the stocking a level was found for (NaN: none yet), so a cell whose stocking differs is looked up anew.
 */
interface LevelCache {
  stocking: Float64Array;
  level: Float64Array;
  byStocking: Map<number, number>;
}
const levelCaches = new WeakMap<object, WeakMap<object, LevelCache>>();

function levelCache(p: LandscapeProblem, pest: PointPest): LevelCache {
  let byMap = levelCaches.get(pest.growth);
  if (byMap === undefined) levelCaches.set(pest.growth, (byMap = new WeakMap()));
  let cache = byMap.get(p.landscape);
  if (cache === undefined || cache.level.length !== p.hostAtCells.length) {
    const n = p.hostAtCells.length;
    cache = { stocking: new Float64Array(n).fill(NaN), level: new Float64Array(n), byStocking: new Map() };
    byMap.set(p.landscape, cache);
  }
  return cache;
}

/** Established level per raster cell (Infinity where not host). */
export function establishedAtCells(p: LandscapeProblem, pest: PointPest): Float64Array {
  const n = p.hostAtCells.length;
  const out = new Float64Array(n).fill(Infinity);
  const { stocking, level, byStocking } = levelCache(p, pest);
  for (let k = 0; k < n; k++) {
    if (!p.hostAtCells[k]) continue;
    const h0 = p.stockingAtCells[k];
    if (stocking[k] !== h0) {
      let v = byStocking.get(h0);
      if (v === undefined) byStocking.set(h0, (v = establishedLevel(pest.growth, h0)));
      stocking[k] = h0;
      level[k] = v;
    }
    out[k] = level[k];
  }
  return out;
}

/** Per cell: when the density first reached the detection level and its established level (NaN: not yet). */
interface Passages {
  detected: Float32Array;
  established: Float32Array;
  /** Cells detected so far. */
  occupied: number;
  /** 1 once a cell has passed both levels (or the detection level where it cannot establish): nothing left to note. */
  done: Uint8Array;
}

/** True when cell k has nothing left to note: detected, and established unless it cannot establish. */
function passedBoth(detected: Float32Array, established: Float32Array, estLevel: ArrayLike<number>, k: number): boolean {
  return detected[k] >= 0 && (established[k] >= 0 || estLevel[k] === Infinity);
}

function initialPassages(u: Float64Array, level: number, estLevel: ArrayLike<number>): Passages {
  const n = u.length;
  const detected = new Float32Array(n).fill(NaN);
  const established = new Float32Array(n).fill(NaN);
  let occupied = 0;
  for (let k = 0; k < n; k++) {
    if (u[k] >= level) {
      detected[k] = 0;
      occupied++;
    }
    if (u[k] >= estLevel[k]) established[k] = 0;
  }
  const done = new Uint8Array(n);
  for (let k = 0; k < n; k++) done[k] = passedBoth(detected, established, estLevel, k) ? 1 : 0;
  return { detected, established, occupied, done };
}

/**
 * Passages of the two levels in the step t → tNew over the stepper's window, at the time interpolated
 * linearly between the step's ends; `prev` (the state before the step) becomes the state after it in the cells not yet done.
 */
function notePassages(
  ps: Passages,
  u: Float64Array,
  prev: Float64Array,
  w: { r0: number; r1: number; c0: number; c1: number },
  nx: number,
  level: number,
  estLevel: ArrayLike<number>,
  t: number,
  tNew: number,
): void {
  const { detected, established, done } = ps;
  const { r0, r1, c0, c1 } = w;
  for (let r = r0; r <= r1; r++) {
    for (let q = c0, k = r * nx + c0; q <= c1; q++, k++) {
      // A cell past both levels needs no previous state any more.
      if (done[k]) continue;
      const now = u[k];
      const before = prev[k];
      if (now >= level && !(detected[k] >= 0)) {
        const frac = now > before ? (level - before) / (now - before) : 1;
        detected[k] = t + Math.min(1, Math.max(0, frac)) * (tNew - t);
        ps.occupied++;
      }
      if (now >= estLevel[k] && !(established[k] >= 0)) {
        const e = estLevel[k];
        const frac = now > before ? (e - before) / (now - before) : 1;
        established[k] = t + Math.min(1, Math.max(0, frac)) * (tNew - t);
      }
      if (passedBoth(detected, established, estLevel, k)) done[k] = 1;
      prev[k] = now;
    }
  }
}

/** True when the pest has an Allee threshold (small groups fail): then a detected fringe need not breed. */
export function fringeMatters(pest: PointPest): boolean {
  return hasStrongAllee(pest.growth, 1);
}

/** Earliest non-negative value of a per-cell field over the cells (NaN: never), or null. */
export function minOver(field: Float32Array | Float64Array, cells: Int32Array): number | null {
  let m = Infinity;
  for (const k of cells) if (field[k] >= 0 && field[k] < m) m = field[k];
  return Number.isFinite(m) ? m : null;
}

/**
 * True when every site was reached by time t (some cell detected; with an Allee threshold some cell
 * established, as siteArrivals in option.ts reads it) and t is at least the margin past each site's arrival.
 */
function sitesDecided(siteCells: Int32Array[], detected: Float32Array, established: Float32Array, fringe: boolean, t: number, margin?: (a: number) => number): boolean {
  for (const cells of siteCells) {
    const d = minOver(detected, cells);
    if (d === null || (fringe && minOver(established, cells) === null)) return false;
    if (t < d + (margin ? margin(d) : 0)) return false;
  }
  return true;
}

export function runLandscapeProblem(p: LandscapeProblem, pest: PointPest, s: RunSettings): RawRun {
  const started = Date.now();
  const { nx, ny } = p.landscape;
  const n = nx * ny;
  const stepper = problemStepper(p);
  const u = Float64Array.from(p.u0);
  const h = Float64Array.from(p.stockingAtCells);
  const prev = Float64Array.from(u);
  const estLevel = establishedAtCells(p, pest);
  const level = s.detectionLevel;
  const cellKm2 = p.mesh.cellKm * p.mesh.cellKm;
  const ps = initialPassages(u, level, estLevel);
  // Outside cells hold no insects: nothing to note there.
  for (let k = 0; k < n; k++) if (!p.op.insideAtCells[k]) ps.done[k] = 1;
  const { detected, established } = ps;
  const series = { timesYears: [] as number[], occupiedKm2: [] as number[], totalInsects: [] as number[] };
  const every = s.seriesEveryYears ?? 0.5;
  let nextRecord = 0;
  const record = (t: number) => {
    let total = 0;
    const w = stepper.window();
    for (let r = w.r0; r <= w.r1; r++) for (let q = w.c0, k = r * nx + w.c0; q <= w.c1; q++, k++) total += u[k];
    series.timesYears.push(t);
    series.occupiedKm2.push(ps.occupied * cellKm2);
    series.totalInsects.push(total * cellKm2);
  };
  record(0);
  nextRecord = every;
  const dt = p.stepYears;
  const nSteps = Math.max(1, Math.ceil(s.horizonYears / dt - 1e-9));
  const siteCells = p.landscape.sites.map((site) => site.cells);
  const fringe = fringeMatters(pest);
  let t = 0;
  let steps = 0;
  for (let i = 0; i < nSteps; i++) {
    const step = Math.min(dt, s.horizonYears - t);
    if (!(step > 0)) break;
    if (s.shouldCancel?.()) throw new CancelledError();
    stepper.step(u, h, step);
    steps++;
    const tNew = i === nSteps - 1 ? s.horizonYears : t + step;
    notePassages(ps, u, prev, stepper.window(), nx, level, estLevel, t, tNew);
    t = tNew;
    if (t >= nextRecord - 1e-9 || i === nSteps - 1) {
      record(t);
      nextRecord += every;
    }
    if (i % 20 === 0) s.onProgress?.(t / s.horizonYears);
    if (s.stopWhenSitesReached && siteCells.length > 0 && sitesDecided(siteCells, detected, established, fringe, t, s.stopMarginYears)) break;
  }
  // Outside cells carry no arrival.
  for (let k = 0; k < n; k++) if (!p.op.insideAtCells[k]) detected[k] = NaN;
  const c = stepper.counters();
  return {
    detected,
    established,
    u,
    h,
    series,
    endYears: t,
    numerics: {
      cellM: p.landscape.cellM,
      stepYears: dt,
      steps,
      fallbackSteps: c.fallbackSteps,
      activeCellsMax: c.activeCellsMax,
      mapCells: n,
      method:
        'finite volumes on the square raster (residence-index form, harmonic face conductances), ' +
        'TR-BDF2 with rates frozen at mid-step and each stage solved by an approximately factorised line correction',
      wallMs: Date.now() - started,
    },
  };
}
