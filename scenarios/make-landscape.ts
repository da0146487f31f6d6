/**
 * Generates the invented demo landscape "Ossenvale valley" (scenarios/landscapes/): a forested valley
 * about 30 × 20 km between two lakes, farmland north and south, a town in the east, non-host stands, and
 * the scenario files that put three band options of different length and width on it.
 *
 *   npx tsx scenarios/make-landscape.ts     # rewrites the files
 *
 * Everything is invented. The map sits in WGS 84 / UTM zone 28N at coordinates that fall in open sea, so it
 * cannot be mistaken for a real forest. The output is deterministic (no randomness, fixed rounding); the
 * test suite regenerates the files in memory and compares them byte for byte with the committed ones.
 */
import { writeFileSync, mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { writeGeoTiff } from '../server/domain/gis/geotiff.ts';
import { crsFromEpsg, projector, type Crs } from '../server/domain/gis/crs.ts';
import { toFeatureCollection } from '../server/domain/gis/geojson.ts';

/** EPSG code of the demo map (WGS 84 / UTM zone 28N). */
export const DEMO_EPSG = 32628;
/** South-west corner of the map [m, EPSG:32628]: open sea west of the continental shelf. */
export const DEMO_X0 = 480_000;
export const DEMO_Y0 = 4_010_000;
/** Source raster: 300 × 200 cells of 100 m. */
export const DEMO_NX = 300;
export const DEMO_NY = 200;
export const DEMO_CELL_M = 100;

/** Class codes of the class raster. */
export const DEMO_CODES = { host: 1, nonhost: 2, farmland: 3, water: 4, town: 5 } as const;
const NODATA_STEMS = 65535;

const crsOf = (): Crs => {
  const r = crsFromEpsg(DEMO_EPSG);
  if (r.kind !== 'projected') throw new Error('demo CRS missing');
  return r.crs;
};

/** Map point from local km (x east, y north, from the south-west corner). */
export const at = (xKm: number, yKm: number): [number, number] => [DEMO_X0 + xKm * 1000, DEMO_Y0 + yKm * 1000];

const inEllipse = (x: number, y: number, cx: number, cy: number, rx: number, ry: number) => ((x - cx) / rx) ** 2 + ((y - cy) / ry) ** 2 <= 1;

/** The class and host stems of the point (x, y) [local km]. */
function ground(x: number, y: number): { code: number; stems: number } {
  if (inEllipse(x, y, 15, 15.6, 3.2, 2.7) || inEllipse(x, y, 15.4, 3.9, 3.0, 2.5)) return { code: DEMO_CODES.water, stems: 0 };
  if (inEllipse(x, y, 26.2, 10.2, 1.6, 1.3)) return { code: DEMO_CODES.town, stems: 0 };
  // Valley floor forest between wavy edges; farmland beyond.
  const south = 3.0 + 0.35 * Math.sin(x / 2.3) + 0.2 * Math.sin(x / 0.9 + 1);
  const north = 17.4 + 0.3 * Math.sin(x / 3.1 + 2) + 0.2 * Math.sin(x / 1.3);
  if (y < south || y > north) return { code: DEMO_CODES.farmland, stems: 0 };
  // Two non-host (broadleaf) stands.
  if (inEllipse(x, y, 21.5, 14.2, 2.0, 1.3) || inEllipse(x, y, 7.5, 5.0, 1.6, 0.9)) return { code: DEMO_CODES.nonhost, stems: 0 };
  const stems = 560 + 90 * Math.sin(x / 2.7 + 0.5) * Math.cos(y / 3.3) + 30 * Math.sin(x / 0.8 + y / 1.1);
  return { code: DEMO_CODES.host, stems: Math.round(Math.max(80, stems)) };
}

/** The demo files by name (relative to scenarios/landscapes/). */
export async function makeDemoLandscape(): Promise<Record<string, Uint8Array>> {
  const crs = crsOf();
  const n = DEMO_NX * DEMO_NY;
  const stems = new Uint16Array(n);
  const codes = new Uint8Array(n);
  for (let r = 0; r < DEMO_NY; r++) {
    for (let c = 0; c < DEMO_NX; c++) {
      const x = (c + 0.5) * (DEMO_CELL_M / 1000);
      const y = (DEMO_NY - r - 0.5) * (DEMO_CELL_M / 1000);
      const g = ground(x, y);
      const i = r * DEMO_NX + c;
      codes[i] = g.code;
      stems[i] = g.code === DEMO_CODES.water || g.code === DEMO_CODES.town ? NODATA_STEMS : g.stems;
    }
  }
  const grid = { nx: DEMO_NX, ny: DEMO_NY, cellM: DEMO_CELL_M, originXM: DEMO_X0, originYM: DEMO_Y0 + DEMO_NY * DEMO_CELL_M, crs };
  const hostTif = await writeGeoTiff({ ...grid, values: stems, nodata: NODATA_STEMS });
  const classTif = await writeGeoTiff({ ...grid, values: codes });

  // Stand map: 1 km rows, runs of one class merged into rectangles, mean stems per run.
  const proj = projector(crs);
  const habitatOf: Record<number, string> = { 1: 'host-forest', 2: 'non-host-forest', 3: 'clearing', 4: 'outside', 5: 'outside' };
  const features: { polygons: [number, number][][][]; properties: Record<string, unknown> }[] = [];
  const BLOCK = 10; // source cells per 1 km block
  for (let br = 0; br < DEMO_NY / BLOCK; br++) {
    let runStart = 0;
    let runCode = -1;
    let runStems: number[] = [];
    const flush = (end: number) => {
      if (runCode < 0) return;
      const x0 = DEMO_X0 + runStart * 1000;
      const x1 = DEMO_X0 + end * 1000;
      const yTop = DEMO_Y0 + (DEMO_NY / BLOCK - br) * 1000;
      const props: Record<string, unknown> = { habitat: habitatOf[runCode] };
      if (runCode === DEMO_CODES.host) {
        props.stocking = 1;
        props.stemsPerHa = Math.round(runStems.reduce((a, b) => a + b, 0) / runStems.length);
      }
      features.push({ polygons: [[[[x0, yTop - 1000], [x1, yTop - 1000], [x1, yTop], [x0, yTop]]]], properties: props });
    };
    for (let bc = 0; bc < DEMO_NX / BLOCK; bc++) {
      // The block's class is its most common code; its stems the mean over host cells.
      const count = new Map<number, number>();
      const hostStems: number[] = [];
      for (let r = br * BLOCK; r < (br + 1) * BLOCK; r++) {
        for (let c = bc * BLOCK; c < (bc + 1) * BLOCK; c++) {
          const k = codes[r * DEMO_NX + c];
          count.set(k, (count.get(k) ?? 0) + 1);
          if (k === DEMO_CODES.host) hostStems.push(stems[r * DEMO_NX + c]);
        }
      }
      let code = -1;
      let best = -1;
      for (const [k, v] of [...count].sort((a, b) => a[0] - b[0])) if (v > best) [code, best] = [k, v];
      const mean = hostStems.length ? hostStems.reduce((a, b) => a + b, 0) / hostStems.length : 0;
      const key = code === DEMO_CODES.town ? DEMO_CODES.water : code;
      if (key !== (runCode === DEMO_CODES.town ? DEMO_CODES.water : runCode) || (key === DEMO_CODES.host && Math.abs(mean - runStems[0]) > 60)) {
        flush(bc);
        runStart = bc;
        runCode = code;
        runStems = [];
      }
      if (code === DEMO_CODES.host) runStems.push(mean);
    }
    flush(DEMO_NX / BLOCK);
  }
  const stands = toFeatureCollection(features, proj);
  const enc = (o: unknown) => new TextEncoder().encode(`${JSON.stringify(o, null, 1)}\n`);
  const lonlat = (p: [number, number]) => proj.toLonLat(p[0], p[1]).map((v) => Math.round(v * 1e6) / 1e6) as [number, number];

  const common = demoCommon();
  const valley = {
    version: 1,
    kind: 'landscape',
    title: 'Ossenvale valley: which band stops the borer between the two lakes?',
    description:
      'Purpose: show a barrier band on a map, and the pest going through it or around its ends. An invented forested valley (30 × 20 km) runs west to east between two lakes, with farmland beyond the forest edges and a town in the east. An infestation in the west threatens the town edge and a seed orchard. Three bands: a narrow cut across the whole neck from lake to lake, a wide but short cut in the middle of the neck (open ground is left at both ends), and a long, wide cut across the whole valley west of the lakes. Invented place, map and pest; numbers are illustrative.',
    region: 'Ossenvale Forest District (invented)',
    ...common,
    map: {
      format: 'geotiff',
      file: 'ossenvale-valley-host.tif',
      unit: 'stems-per-ha',
      stemsPerHaAtFullCover: 600,
      classes: { file: 'ossenvale-valley-classes.tif', codes: { 'host-forest': [1], 'non-host-forest': [2], clearing: [3], outside: [4, 5] } },
      cellM: 200,
    },
    coordinates: 'map',
    infestation: { places: [{ polygon: [[at(0, 7.5), at(2.5, 7.2), at(3.4, 10.0), at(2.6, 13.0), at(0, 13.2)]] }], density: 1 },
    sites: [
      { name: 'Ossenvale town edge', place: { point: at(24.0, 10.2) } },
      { name: 'Marrowin seed orchard', place: { polygon: [[at(27.2, 14.0), at(28.4, 14.0), at(28.4, 15.0), at(27.2, 15.0)]] } },
    ],
    bands: {
      costPerStem: 35,
      costPerHa: 400,
      costUnit: 'credits',
      options: [
        { name: 'Neck cut, lake to lake (600 m)', line: [at(15.3, 6.0), at(15.1, 9.5), at(15.0, 13.3)], widthM: 600, cover: 'clearing' },
        { name: 'Short wide cut mid-neck (1.2 km)', line: [at(16.6, 7.8), at(16.6, 11.4)], widthM: 1200, cover: 'clearing' },
        { name: 'Long cut across the valley (1.5 km)', line: [at(10.0, 2.0), at(10.0, 18.5)], widthM: 1500, cover: 'clearing' },
      ],
    },
  };
  const standsScenario = {
    version: 1,
    kind: 'landscape',
    title: 'Ossenvale valley from a stand map (GeoJSON): the neck cut',
    description:
      'Purpose: show a stand map in GeoJSON (longitude/latitude, RFC 7946) projected to a UTM zone and rasterised by cover fraction. The same invented valley as ossenvale-valley.json, drawn as 1 km stand blocks, with the lake-to-lake neck cut given in longitude/latitude. Invented place, map and pest; numbers are illustrative.',
    region: 'Ossenvale Forest District (invented)',
    ...common,
    map: { format: 'geojson', file: 'ossenvale-valley-stands.geojson', uncovered: 'clearing', cellM: 250 },
    coordinates: 'lonlat',
    infestation: { places: [{ polygon: [[lonlat(at(0.1, 7.5)), lonlat(at(2.5, 7.2)), lonlat(at(3.4, 10.0)), lonlat(at(2.6, 13.0)), lonlat(at(0.1, 13.2))]] }] },
    sites: [{ name: 'Ossenvale town edge', place: { point: lonlat(at(24.0, 10.2)) } }],
    bands: {
      costPerStem: 35,
      costUnit: 'credits',
      options: [{ name: 'Neck cut, lake to lake (600 m)', line: [lonlat(at(15.3, 6.0)), lonlat(at(15.1, 9.5)), lonlat(at(15.0, 13.3))], widthM: 600, cover: 'clearing' }],
    },
  };
  return {
    'ossenvale-valley-host.tif': hostTif,
    'ossenvale-valley-classes.tif': classTif,
    'ossenvale-valley-stands.geojson': enc(stands),
    'ossenvale-valley.json': enc(valley),
    'ossenvale-valley-stands.json': enc(standsScenario),
  };
}

/** Pest, horizon and detection shared by both demo scenarios (the Allee borer of clearing-holds.json). */
function demoCommon() {
  return {
    pest: {
      name: 'Ossenvale bark-borer (illustrative profile)',
      illustrative: true,
      notes: 'Invented pest profile for demonstration. Not calibrated to any real species.',
      diffusionHost: 1,
      diffusionOpen: 1,
      diffusionNonHost: 1,
      edgePreferenceOpen: 0.85,
      edgePreferenceNonHost: 0.6,
      growth: { form: 'mate-finding', birthRate: 4, deathRate: 0.5, crowding: 2.577, mating: 'saturating', mateScale: 0.25 },
      hostKillRate: 0.1,
      mortalityOpen: 4,
      mortalityNonHost: 1.5,
    },
    outside: 'impassable',
    horizonYears: 30,
    detectionLevel: 0.01,
  };
}

/** Folder the demo files live in. */
export const DEMO_DIR = join(dirname(fileURLToPath(import.meta.url)), 'landscapes');

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const files = await makeDemoLandscape();
  mkdirSync(DEMO_DIR, { recursive: true });
  for (const [name, bytes] of Object.entries(files)) {
    writeFileSync(join(DEMO_DIR, name), bytes);
    console.log(`wrote scenarios/landscapes/${name} (${bytes.byteLength} bytes)`);
  }
}
