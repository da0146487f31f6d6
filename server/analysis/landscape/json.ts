/**
 * Landscapes and runs as plain JSON for task payloads and results (they may cross threads, processes and
 * machines): typed arrays as number arrays, NaN (never reached) as null. Both directions are exact:
 * JSON numbers carry every double, and Float32 values read back into Float32 arrays unchanged.
 */
import type { RasterLandscape } from '../../domain/raster.ts';
import type { RawRun } from './run.ts';

/** A RasterLandscape as plain JSON (typed arrays as number arrays), for task payloads. */
export interface LandscapeJson extends Omit<RasterLandscape, 'classAtCells' | 'hostCoverAtCells' | 'stemsAtCells' | 'infestedAtCells' | 'sites' | 'bands'> {
  classAtCells: number[];
  hostCoverAtCells: number[];
  stemsAtCells: number[];
  infestedAtCells: number[];
  sites: { name: string; cells: number[] }[];
  bands: (Omit<RasterLandscape['bands'][number], 'cover'> & { cover: number[] })[];
}

export function landscapeToJson(l: RasterLandscape): LandscapeJson {
  // Only the landscape's own fields: a loaded map also carries functions (its projector) that cannot travel.
  return {
    nx: l.nx,
    ny: l.ny,
    cellM: l.cellM,
    originXM: l.originXM,
    originYM: l.originYM,
    crs: { code: l.crs.code, proj4: l.crs.proj4, name: l.crs.name },
    outside: l.outside,
    classAtCells: Array.from(l.classAtCells),
    hostCoverAtCells: Array.from(l.hostCoverAtCells),
    stemsAtCells: Array.from(l.stemsAtCells),
    infestedAtCells: Array.from(l.infestedAtCells),
    sites: l.sites.map((s) => ({ name: s.name, cells: Array.from(s.cells) })),
    bands: l.bands.map((b) => ({ id: b.id, label: b.label, treatment: b.treatment, areaM2: b.areaM2, ...(b.widthM !== undefined ? { widthM: b.widthM } : {}), cover: Array.from(b.cover) })),
  };
}

export function landscapeFromJson(j: LandscapeJson): RasterLandscape {
  return {
    ...j,
    classAtCells: Uint8Array.from(j.classAtCells),
    hostCoverAtCells: Float32Array.from(j.hostCoverAtCells),
    stemsAtCells: Float32Array.from(j.stemsAtCells),
    infestedAtCells: Float32Array.from(j.infestedAtCells),
    sites: j.sites.map((s) => ({ name: s.name, cells: Int32Array.from(s.cells) })),
    bands: j.bands.map((b) => ({ ...b, cover: Float32Array.from(b.cover) })),
  };
}

/** A RawRun as plain JSON (NaN as null). */
export interface RawRunJson extends Omit<RawRun, 'detected' | 'established' | 'u' | 'h'> {
  detected: (number | null)[];
  established: (number | null)[];
  u: number[];
  h: number[];
}

const orNull = (v: number) => (Number.isNaN(v) ? null : v);
const orNaN = (v: number | null) => (v === null ? NaN : v);

export function rawToJson(r: RawRun): RawRunJson {
  return { ...r, detected: Array.from(r.detected, orNull), established: Array.from(r.established, orNull), u: Array.from(r.u), h: Array.from(r.h) };
}

export function rawFromJson(j: RawRunJson): RawRun {
  return {
    ...j,
    detected: Float32Array.from(j.detected, orNaN),
    established: Float32Array.from(j.established, orNaN),
    u: Float64Array.from(j.u),
    h: Float64Array.from(j.h),
  };
}
