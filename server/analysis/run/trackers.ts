import type { Grid } from '../../numerics/grid.ts';
import { cellIndexAt } from '../../numerics/grid.ts';
import { LevelCrossings, Schedule, type FieldState, type Observer } from '../../numerics/time-loop.ts';

/**
 * Position of the farthest point to the right where u ≥ level [km], or NaN when no cell reaches the level.
 * Between the last cell above and the first below, the position is interpolated in log-density
 * (fronts decay exponentially ahead), which makes front positions smooth in time.
 */
export function rightFrontKm(grid: Grid, u: Float64Array, level: number): number {
  const c = grid.centersKm;
  for (let i = grid.nCells - 1; i >= 0; i--) {
    if (u[i] >= level) {
      if (i === grid.nCells - 1) return c[i];
      const next = u[i + 1];
      if (next <= 0) return c[i];
      return c[i] + ((c[i + 1] - c[i]) * Math.log(u[i] / level)) / Math.log(u[i] / next);
    }
  }
  return NaN;
}

/** Mirror of {@link rightFrontKm}: the farthest point to the left where u ≥ level [km], or NaN. */
export function leftFrontKm(grid: Grid, u: Float64Array, level: number): number {
  const c = grid.centersKm;
  for (let i = 0; i < grid.nCells; i++) {
    if (u[i] >= level) {
      if (i === 0) return c[0];
      const prev = u[i - 1];
      if (prev <= 0) return c[i];
      return c[i] - ((c[i] - c[i - 1]) * Math.log(u[i] / level)) / Math.log(u[i] / prev);
    }
  }
  return NaN;
}

/** ∫ u dx over the transect [km × relative density]. */
export function totalInsects(grid: Grid, u: Float64Array): number {
  let s = 0;
  const w = grid.widthsKm;
  for (let i = 0; i < grid.nCells; i++) s += u[i] * w[i];
  return s;
}

/** Records, after every step, the two front positions and the total number of insects. */
export class FrontTracker implements Observer {
  readonly times: number[] = [];
  readonly rightKm: number[] = [];
  readonly leftKm: number[] = [];
  readonly total: number[] = [];
  constructor(
    private readonly grid: Grid,
    private readonly level: number,
  ) {}
  initialize(s: FieldState): void {
    this.handle(s);
  }
  handle(s: FieldState): void {
    this.times.push(s.t);
    this.rightKm.push(rightFrontKm(this.grid, s.u, this.level));
    this.leftKm.push(leftFrontKm(this.grid, s.u, this.level));
    this.total.push(totalInsects(this.grid, s.u));
  }
}

/**
 * Interpolation stencil for the density at a point: the two nearest cell centres of the same habitat piece
 * (geometric weights, exact for the exponential leading edge of a front; linear where a value is 0).
 * Within half a cell of a piece end the cell value is used, because density may jump at habitat edges.
 * A point on the edge between two pieces reads both adjacent cells and takes the larger density: the
 * site sees the detection level as soon as either side does (which side a face "belongs" to must not
 * depend on the direction the transect is drawn in).
 */
export interface PointProbe {
  /** Cell containing the point. */
  cell: number;
  /** Neighbouring cell used for interpolation (equal to `cell` when none). */
  other: number;
  /** Weight of `other` in [0, 1]. */
  weight: number;
  /** For a point on a piece edge: the cell on the other side (the larger of the two values is read). */
  across?: number;
}

/** Positions within this distance [km] (1 mm) of a piece edge lie on it. */
const ON_EDGE_KM = 1e-6;

/** Builds the interpolation stencil for position x [km]. */
export function makeProbe(grid: Grid, xKm: number): PointProbe {
  const cell = cellIndexAt(grid, xKm);
  const f = grid.facesKm;
  const seg = grid.segmentAtCells;
  if (cell > 0 && Math.abs(xKm - f[cell]) <= ON_EDGE_KM && seg[cell - 1] !== seg[cell]) return { cell, other: cell, weight: 0, across: cell - 1 };
  if (cell < grid.nCells - 1 && Math.abs(xKm - f[cell + 1]) <= ON_EDGE_KM && seg[cell + 1] !== seg[cell]) return { cell, other: cell, weight: 0, across: cell + 1 };
  const c = grid.centersKm;
  const other = xKm >= c[cell] ? cell + 1 : cell - 1;
  if (other < 0 || other >= grid.nCells || grid.segmentAtCells[other] !== grid.segmentAtCells[cell]) {
    return { cell, other: cell, weight: 0 };
  }
  return { cell, other, weight: Math.min(1, Math.abs(xKm - c[cell]) / Math.abs(c[other] - c[cell])) };
}

/** Density at a probe. */
export function probeValue(p: PointProbe, u: Float64Array): number {
  return probeOf(p, u[p.cell], p.across !== undefined ? u[p.across] : p.weight === 0 ? 0 : u[p.other]);
}

/** Density at a probe at time tq inside the last step, from the integrator's dense output. */
export function probeValueAt(p: PointProbe, densityAt: (cell: number, t: number) => number, tq: number): number {
  return probeOf(p, densityAt(p.cell, tq), p.across !== undefined ? densityAt(p.across, tq) : p.weight === 0 ? 0 : densityAt(p.other, tq));
}

/** The probe's value from its cell's density a and its neighbour's b (the cell across an edge, or the interpolation partner). */
function probeOf(p: PointProbe, a: number, b: number): number {
  if (p.across !== undefined) return Math.max(a, b);
  if (p.weight === 0) return a;
  if (a > 0 && b > 0) return a * Math.pow(b / a, p.weight);
  return a + p.weight * (b - a);
}

/**
 * First time the density at each site reaches the level [yr]; null if never. The density is read at the
 * site's position (see {@link makeProbe}), not at the centre of its cell, so arrival times carry no error of
 * up to half a cell divided by the front speed; between steps the time is interpolated linearly.
 */
export class ArrivalTracker implements Observer {
  private readonly probes: PointProbe[];
  private readonly crossings: LevelCrossings;
  constructor(grid: Grid, sitesKm: readonly number[], level: number) {
    this.probes = sitesKm.map((x) => makeProbe(grid, x));
    this.crossings = new LevelCrossings(sitesKm.length, level);
  }
  /** First year each site reaches the level; null if not (yet). */
  get arrivalYears(): (number | null)[] {
    return this.crossings.times;
  }
  initialize(s: FieldState): void {
    this.crossings.start(s.t, (k) => probeValue(this.probes[k], s.u));
  }
  handle(s: FieldState): void {
    const at = s.densityAt;
    this.crossings.update(s.t, (k) => probeValue(this.probes[k], s.u), at && ((k, tq) => probeValueAt(this.probes[k], at, tq)));
  }
  /** True once every site has been reached. */
  allArrived(): boolean {
    return this.crossings.allPassed();
  }
}

/**
 * Chooses which cells represent a profile in outputs: every habitat piece keeps at least `minPerPiece`
 * cells (its first, last and evenly spaced ones), so narrow clearings remain visible, and the total
 * stays near `maxPoints`.
 */
export function profileCells(grid: Grid, maxPoints = 600, minPerPiece = 3): Int32Array {
  const total = grid.facesKm[grid.nCells] - grid.facesKm[0];
  const picked: number[] = [];
  const nPieces = grid.firstCellOfSegment.length - 1;
  for (let k = 0; k < nPieces; k++) {
    const first = grid.firstCellOfSegment[k];
    const last = grid.firstCellOfSegment[k + 1] - 1;
    const n = last - first + 1;
    const length = grid.facesKm[last + 1] - grid.facesKm[first];
    const m = Math.min(n, Math.max(minPerPiece, Math.round((maxPoints * length) / total)));
    if (m === 1) picked.push(first);
    else for (let j = 0; j < m; j++) picked.push(first + Math.round((j * (n - 1)) / (m - 1)));
  }
  return Int32Array.from(new Set(picked));
}

/** Profiles of density and host at chosen times (at the first step ending at or after each target time). */
export interface Snapshot {
  timeYears: number;
  density: number[];
  host: number[];
}

/** Records density and host at the target times, at the chosen cells. */
export class SnapshotRecorder implements Observer {
  readonly snapshots: Snapshot[] = [];
  private readonly schedule: Schedule;
  constructor(
    private readonly cells: Int32Array,
    targetsYears: readonly number[],
  ) {
    this.schedule = Schedule.at(targetsYears);
  }
  initialize(s: FieldState): void {
    this.handle(s);
  }
  handle(s: FieldState): void {
    for (let n = this.schedule.take(s.t); n > 0; n--) {
      this.snapshots.push({
        timeYears: s.t,
        density: Array.from(this.cells, (c) => s.u[c]),
        host: Array.from(this.cells, (c) => s.h[c]),
      });
    }
  }
  /** Makes sure the final state is recorded even if the run stopped early. */
  finalize(s: FieldState): void {
    const last = this.snapshots[this.snapshots.length - 1];
    if (!last || last.timeYears < s.t) {
      this.snapshots.push({
        timeYears: s.t,
        density: Array.from(this.cells, (c) => s.u[c]),
        host: Array.from(this.cells, (c) => s.h[c]),
      });
    }
  }
}
