/**
 * An invented map for the landscape benches, shaped like the demo: 30 × 20 km, a forested valley between two
 * lakes (impassable), a town (impassable) and farmland (open), non-host stands, an infestation in the west,
 * three protected sites in the east and three band options of different length and width. Built in code so
 * that the engine bench does not depend on the GIS files (the demo scenario's maps are read by the GIS loader).
 */
import { RASTER_CLASSES, type RasterClass, type RasterLandscape } from '../server/domain/raster.ts';

export function benchLandscape(cellM: number): RasterLandscape {
  const nx = Math.round(30000 / cellM);
  const ny = Math.round(20000 / cellM);
  const n = nx * ny;
  const cls = (x: number, y: number): RasterClass => {
    // y measured from the north edge [m].
    if ((x - 15000) ** 2 / 4500 ** 2 + (y - 2500) ** 2 / 2300 ** 2 < 1) return 'outside'; // north lake
    if ((x - 16000) ** 2 / 5000 ** 2 + (y - 17800) ** 2 / 2000 ** 2 < 1) return 'outside'; // south lake
    if (Math.hypot(x - 25000, y - 16500) < 1200) return 'outside'; // town
    if (y > 15500 && x < 9000) return 'open'; // farmland
    if (Math.hypot(x - 21000, y - 7000) < 1500) return 'nonhost';
    return 'host';
  };
  const classAtCells = new Uint8Array(n);
  const hostCoverAtCells = new Float32Array(n);
  const stemsAtCells = new Float32Array(n);
  const infestedAtCells = new Float32Array(n);
  const centre = (k: number): [number, number] => [((k % nx) + 0.5) * cellM, (Math.floor(k / nx) + 0.5) * cellM];
  for (let k = 0; k < n; k++) {
    const [x, y] = centre(k);
    const c = cls(x, y);
    classAtCells[k] = RASTER_CLASSES.indexOf(c);
    if (c === 'host') {
      hostCoverAtCells[k] = 0.7 + 0.3 * Math.cos(x / 2300) * Math.sin(y / 1700) ** 2;
      stemsAtCells[k] = 450 * hostCoverAtCells[k];
      infestedAtCells[k] = Math.hypot(x - 4000, y - 9500) < 1500 ? 1 : 0;
    }
  }
  const cellsWhere = (f: (x: number, y: number) => boolean) => {
    const out: number[] = [];
    for (let k = 0; k < n; k++) if (f(...centre(k))) out.push(k);
    return Int32Array.from(out.length > 0 ? out : [0]);
  };
  const band = (id: string, x0: number, widthM: number, yFrom: number, yTo: number) => {
    const cover = new Float32Array(n);
    let area = 0;
    for (let k = 0; k < n; k++) {
      const [x, y] = centre(k);
      if (x > x0 && x < x0 + widthM && y > yFrom && y < yTo) (cover[k] = 1), (area += cellM * cellM);
    }
    return { id, label: id, cover, treatment: 'clearing' as const, areaM2: area, widthM };
  };
  return {
    nx,
    ny,
    cellM,
    originXM: 480_000,
    originYM: 5_720_000,
    crs: { code: 'EPSG:25832', proj4: '+proj=utm +zone=32 +ellps=GRS80 +units=m +no_defs', name: 'ETRS89 / UTM zone 32N' },
    classAtCells,
    hostCoverAtCells,
    stemsAtCells,
    outside: 'impassable',
    infestedAtCells,
    sites: [
      { name: 'east stand', cells: cellsWhere((x, y) => Math.abs(x - 26000) < cellM && Math.abs(y - 9000) < cellM) },
      { name: 'valley seed orchard', cells: cellsWhere((x, y) => Math.hypot(x - 19000, y - 11000) < 400) },
      { name: 'north slope', cells: cellsWhere((x, y) => Math.abs(x - 24000) < cellM && Math.abs(y - 6500) < cellM) },
    ],
    bands: [band('short wide cut', 11000, 800, 7000, 13000), band('long narrow cut', 11000, 300, 4500, 15500), band('valley-wide cut', 11000, 600, 0, 20000)],
  };
}

/** An invented pest profile for the landscape benches (logistic growth, edge avoidance, mortality in the open). */
export const BENCH_PEST = {
  name: 'bench borer (invented)',
  illustrative: true,
  diffusionHost: 0.3,
  diffusionOpen: 1.2,
  edgePreferenceOpen: 0.8,
  growth: { form: 'logistic' as const, rate: 0.8 },
  hostKillRate: 0.3,
  mortalityOpen: 1.5,
};
