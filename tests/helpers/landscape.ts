/**
 * Builders for small invented landscapes (RasterLandscape) that the 2-D verification tests run through the
 * real engine. Geometry in metres; row 0 is the north edge.
 */
import { RASTER_CLASSES, type RasterClass, type RasterLandscape } from '../../server/domain/raster.ts';

export interface LandscapeSpec {
  nx: number;
  ny: number;
  cellM: number;
  /** Class of the cell whose centre is at (x, y) [m from the west and north edges]; host everywhere by default. */
  classAt?: (x: number, y: number) => RasterClass;
  /** Host cover share at a cell centre (1 by default on host cells). */
  hostCoverAt?: (x: number, y: number) => number;
  /** Infested share at a cell centre (0–1). */
  infestedAt: (x: number, y: number) => number;
  sites?: { name: string; at: (x: number, y: number) => boolean }[];
  bands?: { id: string; inside: (x: number, y: number) => boolean; treatment?: 'clearing' | 'nonhost-planting'; widthM?: number }[];
  outside?: 'impassable' | 'lethal';
  stemsPerHa?: number;
}

/** A landscape from cell-centre rules (a band's cover is 1 where its centre lies inside, else 0). */
export function makeLandscape(spec: LandscapeSpec): RasterLandscape {
  const { nx, ny, cellM } = spec;
  const n = nx * ny;
  const classAtCells = new Uint8Array(n);
  const hostCoverAtCells = new Float32Array(n);
  const stemsAtCells = new Float32Array(n);
  const infestedAtCells = new Float32Array(n);
  const centre = (k: number): [number, number] => [((k % nx) + 0.5) * cellM, (Math.floor(k / nx) + 0.5) * cellM];
  for (let k = 0; k < n; k++) {
    const [x, y] = centre(k);
    const cls = spec.classAt?.(x, y) ?? 'host';
    classAtCells[k] = RASTER_CLASSES.indexOf(cls);
    if (cls === 'host') {
      hostCoverAtCells[k] = spec.hostCoverAt?.(x, y) ?? 1;
      stemsAtCells[k] = (spec.stemsPerHa ?? 400) * hostCoverAtCells[k];
      infestedAtCells[k] = spec.infestedAt(x, y);
    }
  }
  const cellsWhere = (f: (x: number, y: number) => boolean) => {
    const out: number[] = [];
    for (let k = 0; k < n; k++) if (f(...centre(k))) out.push(k);
    return Int32Array.from(out);
  };
  return {
    nx,
    ny,
    cellM,
    originXM: 500_000,
    originYM: 6_000_000,
    crs: { code: 'EPSG:25832', proj4: '+proj=utm +zone=32 +ellps=GRS80 +units=m +no_defs', name: 'ETRS89 / UTM zone 32N' },
    classAtCells,
    hostCoverAtCells,
    stemsAtCells,
    outside: spec.outside ?? 'impassable',
    infestedAtCells,
    sites: (spec.sites ?? []).map((s) => ({ name: s.name, cells: cellsWhere(s.at) })),
    bands: (spec.bands ?? []).map((b) => {
      const cover = new Float32Array(n);
      let count = 0;
      for (let k = 0; k < n; k++) if (b.inside(...centre(k))) (cover[k] = 1), count++;
      return { id: b.id, label: b.id, cover, treatment: b.treatment ?? 'clearing', areaM2: count * cellM * cellM, widthM: b.widthM };
    }),
  };
}

/** An invented logistic test pest for small maps (edge avoidance, mortality in the open, no host loss). */
export const LOGISTIC_TEST_PEST = {
  name: 'test pest (invented)',
  illustrative: true,
  diffusionHost: 0.25,
  diffusionOpen: 0.25,
  edgePreferenceOpen: 0.8,
  growth: { form: 'logistic', rate: 1 },
  hostKillRate: 0,
  mortalityOpen: 2,
} as const;
