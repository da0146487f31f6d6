/**
 * Observers of the barrier analysis: the crossing watch (front established beyond the far edge), the
 * approach watch (did the pest reach the clearing), and the levels and probes they use.
 */
import { firstPassage, type FieldState, type Observer } from '../../numerics/time-loop.ts';
import { cellIndexAt, type Grid } from '../../numerics/grid.ts';
import { alleeThreshold, lowDensityRate } from '../../model/growth.ts';
import type { PointScenario } from '../../model/scenario.ts';
import { type TransectProblem } from '../../problem/discretise.ts';
import { establishedLevel, potentialThreshold } from './barrier-growth.ts';

import { isBeyond, type BarrierGeometry } from '../../problem/geometry.ts';
import { fringeLengthKm, movementLengthKm } from './lengths.ts';

/**
 * Records the first time the front is established beyond the far edge: any host cell beyond it at or above
 * its established level, or the detection level reached at a probe far enough beyond the clearing that a
 * pinned front's low-density fringe cannot reach it (this catches fronts whose peak density stays below the
 * established level, e.g. consumer–resource pulses). Optionally stops the run there.
 */
export class CrossingWatch implements Observer {
  crossedYears: number | null = null;
  private readonly beyond: number[];
  private readonly probeCell: number;
  constructor(
    grid: Grid,
    geometry: BarrierGeometry,
    private readonly levels: Float64Array,
    private readonly stop: boolean,
    probeKm: number,
    private readonly detection: number,
  ) {
    this.beyond = [];
    for (let i = 0; i < grid.nCells; i++) if (isBeyond(geometry, grid.centersKm[i]) && Number.isFinite(levels[i])) this.beyond.push(i);
    const x = geometry.farKm + geometry.direction * probeKm;
    const inside = x > grid.facesKm[0] && x < grid.facesKm[grid.nCells];
    this.probeCell = inside ? cellIndexAt(grid, x) : -1;
  }
  initialize(s: FieldState): void {
    this.handle(s);
  }
  handle(s: FieldState): boolean {
    if (this.crossedYears !== null) return this.stop;
    let crossed = false;
    let when = s.t;
    // Dated inside the step by the dense output, when there is one (each cell that is above its level now
    // was below it at the previous look); else at the step's end.
    const at = s.densityAt && s.t > s.tPrevious ? s.densityAt : null;
    const note = (cell: number, level: number) => {
      crossed = true;
      if (!at) return;
      const v0 = at(cell, s.tPrevious);
      if (v0 < level) when = Math.min(when, firstPassage((tq) => at(cell, tq), s.tPrevious, v0, s.t, s.u[cell], level));
    };
    if (this.probeCell >= 0 && s.u[this.probeCell] >= this.detection) note(this.probeCell, this.detection);
    if (!crossed || at) for (const i of this.beyond) if (s.u[i] >= this.levels[i]) note(i, this.levels[i]);
    if (!crossed) return false;
    this.crossedYears = when;
    return this.stop;
  }
}

/** Smallest positive host stocking on the transect (sets the longest low-density fringe). */
export function smallestStocking(s: PointScenario): number {
  let h = Infinity;
  for (const seg of s.transect.segments) if (seg.habitat === 'host-forest' && seg.stocking > 0) h = Math.min(h, seg.stocking);
  return Number.isFinite(h) ? h : 1;
}

/**
 * Distance beyond the far edge [km] at which the detection level (or another `level`) means the front has
 * crossed: a pinned front's fringe starts below θ at the edge and decays like exp(−x/ℓ), ℓ = √(D/|g(0)|) at
 * the lowest stocking, so it falls below the level within ℓ·ln(θ/level); two movement lengths are added as
 * a margin.
 */
export function crossingProbeKm(s: PointScenario, level = s.detectionLevel): number {
  const h = smallestStocking(s);
  const g = s.pest.growth;
  const theta = potentialThreshold(g, 1);
  const g0 = Math.abs(lowDensityRate(g, h));
  const lf = g0 > 0 ? Math.sqrt(s.pest.diffusionHost / g0) : fringeLengthKm(s);
  const ratio = theta !== null && Number.isFinite(theta) ? Math.max(theta / level, 1) : 1 / level;
  return lf * Math.log(ratio) + 2 * movementLengthKm(s);
}

/**
 * Density [of capacity] by which the computational windows of the barrier analysis are sized, whatever
 * the scenario's detection level (1 %): window runs start when it arrives a few movement lengths before the
 * clearing, and the window reaches beyond the clearing past where a pinned front's fringe falls below it.
 * Tied to the detection level, a low level started the runs while the breeding front was still outside the
 * window, and a level above θ cut the window a few movement lengths beyond the clearing, where its
 * reflecting end shifted the critical width by tens of metres.
 */
export const WINDOW_LEVEL = 0.01;

/** How far beyond the far edge the windows of the barrier analysis reach [km]: twice the fringe's reach (see {@link WINDOW_LEVEL}) plus two movement lengths. */
export function windowAheadKm(s: PointScenario): number {
  return 2 * crossingProbeKm(s, Math.min(s.detectionLevel, WINDOW_LEVEL)) + 2 * movementLengthKm(s);
}

/** Established levels per cell for a discretised layout (Infinity off host). */
export function establishedLevels(s: PointScenario, problem: TransectProblem): Float64Array {
  const out = new Float64Array(problem.grid.nCells);
  const cache = new Map<number, number>();
  for (let i = 0; i < problem.grid.nCells; i++) {
    const h0 = problem.stockingAtCells[i];
    if (!problem.hostAtCells[i] || !(h0 > 0)) {
      out[i] = Infinity;
      continue;
    }
    let v = cache.get(h0);
    if (v === undefined) {
      v = establishedLevel(s.pest.growth, h0);
      cache.set(h0, v);
    }
    out[i] = v;
  }
  return out;
}


/**
 * The host cells just before a clearing, where a front that reached it stands: host forest within three
 * movement lengths of the near edge, counted along host forest only (an existing clearing or non-host
 * stand right before the cut is stepped over), with the density that counts as a population in each: the
 * Allee threshold at the cell's stocking (above it a local group grows; a consumer–resource pulse can
 * stay below the established level), or the established level where there is no threshold.
 */
export function approachCells(s: PointScenario, problem: TransectProblem, g: BarrierGeometry): { cells: number[]; level: Float64Array } {
  const { grid, hostAtCells, stockingAtCells } = problem;
  const reach = 3 * movementLengthKm(s);
  const levels = establishedLevels(s, problem);
  const cells: number[] = [];
  const level: number[] = [];
  let length = 0;
  const n = grid.nCells;
  for (let k = 0; k < n; k++) {
    const i = g.direction > 0 ? n - 1 - k : k;
    if (g.direction * (g.nearKm - grid.centersKm[i]) <= 0) continue;
    if (!hostAtCells[i] || !(stockingAtCells[i] > 0)) continue;
    if (length >= reach) break;
    length += grid.widthsKm[i];
    const lv = alleeThreshold(s.pest.growth, stockingAtCells[i]) ?? levels[i];
    cells.push(i);
    level.push(lv);
  }
  return { cells, level: Float64Array.from(level) };
}

export function isPresent(approach: { cells: number[]; level: Float64Array }, u: Float64Array): boolean {
  const { cells, level } = approach;
  for (let k = 0; k < cells.length; k++) if (u[cells[k]] >= level[k]) return true;
  return false;
}

/** Watches, every step, whether a population has reached the host forest just before a clearing ({@link approachCells}). */
export class ApproachWatch implements Observer {
  arrived = false;
  private readonly approach: { cells: number[]; level: Float64Array };
  constructor(s: PointScenario, problem: TransectProblem, geometry: BarrierGeometry) {
    this.approach = approachCells(s, problem, geometry);
  }
  initialize(st: FieldState): void {
    this.handle(st);
  }
  handle(st: FieldState): void {
    if (!this.arrived && isPresent(this.approach, st.u)) this.arrived = true;
  }
}
