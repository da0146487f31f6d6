/**
 * The one barrier geometry: where a clearing sits relative to the infestation, shared by the clearing runs,
 * the crossing watch, the pinning judge and the bypass weights. Its `region` is the clearing as a region of
 * the mesh (an interval on the transect; a cell mask on a map, server/domain/mesh.ts).
 */
import type { Region } from '../domain/mesh.ts';
import type { ClearingSpec } from './layout.ts';

export interface BarrierGeometry {
  /** +1 when the front must travel right to reach the clearing, −1 when left. */
  direction: 1 | -1;
  /** The protected side, in words of the transect ('right' for direction +1). */
  side: 'right' | 'left';
  /** Edge of the clearing that faces the infestation [km]. */
  nearKm: number;
  /** Edge the front must pass to cross [km]. */
  farKm: number;
  /** The clearing between the two edges. */
  region: Region;
}

/** Positions closer than this are equal [km] (1 mm). */
export const SAME_KM = 1e-6;

/** A geometry from its near and far edge (the direction follows from their order). */
export function geometryBetween(nearKm: number, farKm: number, direction: 1 | -1 = farKm >= nearKm ? 1 : -1): BarrierGeometry {
  return {
    direction,
    side: direction > 0 ? 'right' : 'left',
    nearKm,
    farKm,
    region: { kind: 'interval', fromKm: Math.min(nearKm, farKm), toKm: Math.max(nearKm, farKm) },
  };
}

/** The same near edge with the far edge moved (a wider or narrower clearing; width 0 watches the near edge). */
export function withFarEdge(g: BarrierGeometry, farKm: number): BarrierGeometry {
  return geometryBetween(g.nearKm, farKm, g.direction);
}

/** Which way the front meets the clearing (the scenario's cross-checks guarantee no overlap with the infestation). */
export function barrierGeometry(s: { infestation: { toKm: number } }, c: Pick<ClearingSpec, 'fromKm' | 'widthM'>): BarrierGeometry {
  const a = c.fromKm;
  const b = c.fromKm + c.widthM / 1000;
  return a >= s.infestation.toKm - SAME_KM ? geometryBetween(a, b, 1) : geometryBetween(b, a, -1);
}

/** True when x lies beyond the clearing as seen from the infestation. */
export function isBeyond(g: BarrierGeometry, xKm: number): boolean {
  return g.direction * (xKm - g.farKm) > SAME_KM;
}
