import type { Habitat, PointScenario } from '../model/scenario.ts';
import { segmentBreaks } from '../model/scenario.ts';

/** A stretch of uniform habitat along the transect after any barrier option has been applied. */
export interface Piece {
  fromKm: number;
  toKm: number;
  habitat: Habitat;
  /** Host stocking 0–1 (0 where there is no host). */
  stocking: number;
  /** Host stems per hectare at that stocking [trees/ha] (0 where there is no host). */
  stemsPerHa: number;
  /** Index of the scenario segment this piece comes from. */
  segment: number;
  /** True when the piece is (part of) the barrier option's clearing. */
  barrier: boolean;
}

/** A clearing to cut: [fromKm, fromKm + widthM/1000], and what the ground becomes. */
export interface ClearingSpec {
  fromKm: number;
  widthM: number;
  cover: 'clearing' | 'non-host-forest';
}

/** Positions closer than this [km] (1 mm) are treated as equal when cutting pieces. */
const SAME_POSITION_KM = 1e-6;

/**
 * The transect as pieces of uniform habitat, with an optional clearing cut into it.
 * The baseline is the layout without the clearing (the stand as it stands).
 */
export function buildLayout(s: PointScenario, clearing?: ClearingSpec): Piece[] {
  const breaks = segmentBreaks(s.transect);
  const pieces: Piece[] = s.transect.segments.map((seg, k) => ({
    fromKm: breaks[k],
    toKm: breaks[k + 1],
    habitat: seg.habitat,
    stocking: seg.habitat === 'host-forest' ? seg.stocking : 0,
    stemsPerHa: seg.habitat === 'host-forest' ? seg.stemsPerHa : 0,
    segment: k,
    barrier: false,
  }));
  if (!clearing) return pieces;
  const a = clearing.fromKm;
  const b = clearing.fromKm + clearing.widthM / 1000;
  const out: Piece[] = [];
  for (const p of pieces) {
    if (p.toKm <= a + SAME_POSITION_KM || p.fromKm >= b - SAME_POSITION_KM) {
      out.push(p);
      continue;
    }
    if (p.fromKm < a - SAME_POSITION_KM) out.push({ ...p, toKm: a });
    out.push({
      ...p,
      fromKm: Math.max(p.fromKm, a),
      toKm: Math.min(p.toKm, b),
      habitat: clearing.cover,
      stocking: 0,
      stemsPerHa: 0,
      barrier: true,
    });
    if (p.toKm > b + SAME_POSITION_KM) out.push({ ...p, fromKm: b });
  }
  return mergeAdjacent(out);
}

/** Joins neighbouring pieces that are identical in everything but position (keeps grids small). */
function mergeAdjacent(pieces: Piece[]): Piece[] {
  const out: Piece[] = [];
  for (const p of pieces) {
    const q = out[out.length - 1];
    if (q && q.habitat === p.habitat && q.stocking === p.stocking && q.stemsPerHa === p.stemsPerHa && q.barrier === p.barrier && q.segment === p.segment) {
      q.toKm = p.toKm;
    } else out.push({ ...p });
  }
  return out;
}

/**
 * Host stems removed by cutting the clearing [trees]: Σ stemsPerHa × cut length [km] × barrier length [km] × 100 ha/km².
 * (The stem density is already the density at the segment's stocking.)
 */
export function stemsRemoved(s: PointScenario, clearing: ClearingSpec, barrierLengthKm: number): number {
  const base = buildLayout(s);
  const a = clearing.fromKm;
  const b = clearing.fromKm + clearing.widthM / 1000;
  let stems = 0;
  for (const p of base) {
    const overlap = Math.min(p.toKm, b) - Math.max(p.fromKm, a);
    if (overlap > 0 && p.habitat === 'host-forest') stems += p.stemsPerHa * overlap * barrierLengthKm * HA_PER_KM2;
  }
  return stems;
}

/** Hectares per square kilometre. */
export const HA_PER_KM2 = 100;
