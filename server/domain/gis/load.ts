import type { RasterLandscape, RasterClass } from '../raster.ts';
import { RASTER_CLASSES } from '../raster.ts';
import {
  coordinatesOf,
  nonHostPestProblems,
  MAX_MAP_FILE_BYTES,
  MAX_MODEL_CELLS,
  type LandscapeScenario,
  type MapHabitat,
  type PointLandscapeScenario,
} from '../../model/landscape.ts';
import { resolveQuantities } from '../../model/quantity.ts';
import type { Problem } from '../../model/errors.ts';
import { projector, type Projector } from './crs.ts';
import { readGeoTiff, type SourceRaster } from './geotiff.ts';
import { readStandMap } from './geojson.ts';
import { areaAverage } from './resample.ts';
import { addPolygonCover, type GridSpec } from './rasterise.ts';
import { makePlacer, placeBands, placeInfestation, placeSites } from './place.ts';
import { bbox, type Polygon, type Xy } from './geometry.ts';
import {
  MapFileError,
  MapFileTooLargeError,
  ScenarioMapError,
  TooManyCellsError,
} from './errors.ts';

/** Map files by the name the scenario uses (relative path or upload name). */
export type MapFiles = Readonly<Record<string, Uint8Array>>;

/** A landscape as loaded: the engine's RasterLandscape plus what maps and downloads need. */
export interface LoadedLandscape extends RasterLandscape {
  /** Transforms between the map CRS and longitude/latitude. */
  projector: Projector;
  /** Band outlines in map metres, in option order. */
  bandPolygons: Polygon[];
  /** Infested places in map metres. */
  infestedPolygons: Polygon[];
  /** Protected sites in map metres: a point, or a polygon. */
  sitePlaces: { name: string; point?: Xy; polygon?: Polygon }[];
  /** What was read, in words (source grid, CRS, resampling). */
  notes: string[];
}

const CLASS_INDEX: Record<MapHabitat, number> = {
  'host-forest': RASTER_CLASSES.indexOf('host'),
  'non-host-forest': RASTER_CLASSES.indexOf('nonhost'),
  clearing: RASTER_CLASSES.indexOf('open'),
  outside: RASTER_CLASSES.indexOf('outside'),
};
const N_CLASSES = RASTER_CLASSES.length;

function fileBytes(files: MapFiles, name: string, path: string): Uint8Array {
  const b = files[name];
  if (b === undefined) throw new MapFileError([{ path, value: name, message: 'was not found (give the file beside the scenario, or upload it with the scenario)' }]);
  if (b.byteLength > MAX_MAP_FILE_BYTES) {
    throw new MapFileTooLargeError({ path, value: name, message: `is ${(b.byteLength / 1048576).toFixed(1)} MB; map files may be at most ${MAX_MAP_FILE_BYTES / 1048576} MB` });
  }
  return b;
}

function checkCells(nx: number, ny: number, cellM: number): void {
  if (nx * ny > MAX_MODEL_CELLS) {
    throw new TooManyCellsError({
      path: 'map.cellM',
      value: cellM,
      message: `gives ${nx} × ${ny} = ${nx * ny} model cells; at most ${MAX_MODEL_CELLS} are allowed (use cells of at least ${Math.ceil(cellM * Math.sqrt((nx * ny) / MAX_MODEL_CELLS))} m)`,
    });
  }
}

/** Per-cell layers on the model grid, before classes are decided. */
interface Layers {
  grid: GridSpec;
  hostShare: Float64Array;
  stems: Float64Array;
  /** Class shares, N_CLASSES arrays. */
  classShare: Float64Array[];
}

async function rasterLayers(s: PointLandscapeScenario & { map: { format: 'geotiff' } }, files: MapFiles, notes: string[]): Promise<{ layers: Layers; crsProjector: Projector }> {
  const m = s.map;
  const host = await readGeoTiff(fileBytes(files, m.file, 'map.file'), 'map.file', m.file, m.crs);
  let cls: SourceRaster | undefined;
  if (m.classes) {
    cls = await readGeoTiff(fileBytes(files, m.classes.file, 'map.classes.file'), 'map.classes.file', m.classes.file, m.crs ?? undefined);
    const same =
      cls.width === host.width && cls.height === host.height && Math.abs(cls.originXM - host.originXM) < 1e-3 * host.resXM &&
      Math.abs(cls.originYM - host.originYM) < 1e-3 * host.resYM && Math.abs(cls.resXM - host.resXM) < 1e-6 * host.resXM;
    if (!same) throw new MapFileError([{ path: 'map.classes.file', value: m.classes.file, message: `must be on the same grid as the host map (${host.width} × ${host.height} cells of ${host.resXM} m from ${host.originXM}, ${host.originYM})` }]);
  }
  const cellM = m.cellM ?? host.resXM;
  const nx = Math.ceil((host.width * host.resXM) / cellM - 1e-9);
  const ny = Math.ceil((host.height * host.resYM) / cellM - 1e-9);
  checkCells(nx, ny, cellM);
  const n = host.width * host.height;
  const hostShare = new Float64Array(n);
  const stems = new Float64Array(n);
  const shares = Array.from({ length: N_CLASSES }, () => new Float64Array(n));
  const codeClass = new Map<number, number>();
  if (m.classes) for (const [h, codes] of Object.entries(m.classes.codes)) for (const c of codes) codeClass.set(c, CLASS_INDEX[h as MapHabitat]);
  const isNodata = (v: number, nd: number | null) => Number.isNaN(v) || (nd !== null && (v === nd || (Number.isNaN(nd) && Number.isNaN(v))));
  const unknownCodes = new Set<number>();
  let badValue: { v: number; i: number } | undefined;
  const full = m.unit === 'basal-area-m2-per-ha' ? m.basalAreaAtFullCover! : m.unit === 'stems-per-ha' ? m.stemsPerHaAtFullCover : 1;
  for (let i = 0; i < n; i++) {
    const v = host.values[i];
    let k: number;
    let share = 0;
    if (isNodata(v, host.nodata)) k = CLASS_INDEX.outside;
    else {
      if (!(v >= 0) || (m.unit === 'share' && v > 1 + 1e-6)) {
        if (!badValue) badValue = { v, i };
        continue;
      }
      share = Math.min(1, v / full);
      k = share > 0 ? CLASS_INDEX['host-forest'] : CLASS_INDEX.clearing;
    }
    if (cls) {
      const c = cls.values[i];
      if (!isNodata(c, cls.nodata)) {
        const kk = codeClass.get(c);
        if (kk === undefined) unknownCodes.add(c);
        else k = kk;
      }
    }
    if (k !== CLASS_INDEX['host-forest']) share = 0;
    hostShare[i] = share;
    stems[i] = m.unit === 'stems-per-ha' && share > 0 ? Math.min(v, m.stemsPerHaAtFullCover) : share * m.stemsPerHaAtFullCover;
    shares[k][i] = 1;
  }
  if (badValue) {
    const range = m.unit === 'share' ? '0–1' : '≥ 0';
    const row = Math.floor(badValue.i / host.width);
    throw new MapFileError([{ path: 'map.file', value: badValue.v, message: `holds ${badValue.v} at row ${row}, column ${badValue.i - row * host.width}; values in ${m.unit} must be ${range} (or the nodata value)` }]);
  }
  if (unknownCodes.size) {
    throw new MapFileError([{ path: 'map.classes.codes', value: [...unknownCodes].slice(0, 10), message: 'the class raster holds codes not listed under any class; list each code under host-forest, non-host-forest, clearing or outside' }]);
  }
  const grid: GridSpec = { nx, ny, cellM, originXM: host.originXM, originYM: host.originYM };
  const [hs, st, ...cs] = areaAverage(host, grid, [hostShare, stems, ...shares]);
  // Model cells that run past the source's east/south edge: the uncovered part is outside the map.
  for (let i = 0; i < nx * ny; i++) {
    let t = 0;
    for (const c of cs) t += c[i];
    if (t < 1) cs[CLASS_INDEX.outside][i] += 1 - t;
  }
  notes.push(
    `Host map ${m.file}: ${host.width} × ${host.height} cells of ${host.resXM} m in ${host.crs.name} (${host.crs.code}), resampled by area averaging to ${nx} × ${ny} model cells of ${cellM} m.`,
  );
  return { layers: { grid, hostShare: hs, stems: st, classShare: cs }, crsProjector: projector(host.crs) };
}

function vectorLayers(s: PointLandscapeScenario & { map: { format: 'geojson' } }, files: MapFiles, notes: string[]): { layers: Layers; crsProjector: Projector } {
  const m = s.map;
  const text = new TextDecoder().decode(fileBytes(files, m.file, 'map.file'));
  const { stands, projector: proj } = readStandMap(text, 'map.file', m.file, 400);
  const cellM = m.cellM ?? 100;
  const [x0, y0, x1, y1] = bbox(stands.flatMap((st) => st.polygons));
  const originXM = Math.floor(x0 / cellM) * cellM;
  const originYM = Math.ceil(y1 / cellM) * cellM;
  const nx = Math.max(1, Math.ceil((x1 - originXM) / cellM));
  const ny = Math.max(1, Math.ceil((originYM - y0) / cellM));
  checkCells(nx, ny, cellM);
  const grid: GridSpec = { nx, ny, cellM, originXM, originYM };
  const n = nx * ny;
  const hostShare = new Float64Array(n);
  const stems = new Float64Array(n);
  const classShare = Array.from({ length: N_CLASSES }, () => new Float64Array(n));
  const frac = new Float64Array(n);
  let nonHost = false;
  for (const st of stands) {
    frac.fill(0);
    for (const p of st.polygons) addPolygonCover(grid, p, frac);
    const k = CLASS_INDEX[st.habitat];
    const host = st.habitat === 'host-forest';
    if (st.habitat === 'non-host-forest') nonHost = true;
    for (let i = 0; i < n; i++) {
      const f = frac[i];
      if (f === 0) continue;
      classShare[k][i] += f;
      if (host) {
        hostShare[i] += f * st.stocking;
        stems[i] += f * st.stemsPerHa;
      }
    }
  }
  const kUncovered = CLASS_INDEX[m.uncovered];
  for (let i = 0; i < n; i++) {
    let t = 0;
    for (const c of classShare) t += c[i];
    if (t < 1) classShare[kUncovered][i] += 1 - t;
    else if (t > 1) for (const c of classShare) c[i] /= t; // overlapping stands: shares scaled to the cell
    if (hostShare[i] > 1) hostShare[i] = 1;
  }
  if (nonHost) {
    const p = nonHostPestProblems(s.pest, 'the stand map has non-host forest');
    if (p.length) throw new ScenarioMapError(p);
  }
  notes.push(
    `Stand map ${m.file}: ${stands.length} stands in longitude/latitude, projected to ${proj.crs.name} (${proj.crs.code}) and rasterised by cover fraction to ${nx} × ${ny} model cells of ${cellM} m.`,
  );
  return { layers: { grid, hostShare, stems, classShare }, crsProjector: proj };
}

/**
 * Resolves a landscape scenario's map onto the model raster: reads the GeoTIFF (area-averaged to the model
 * cell) or the GeoJSON stands (projected to a UTM zone, rasterised by cover fraction), then places the
 * infestation, the protected sites and the band options.
 *
 * Cell class = the class covering the largest share of the cell (host forest, non-host forest, open,
 * outside); host cover = share of the cell that is host × stocking; stems = the cell's mean host stems/ha.
 *
 * @param files - the map files by the names the scenario uses
 * @throws MapFileTooLargeError, TooManyCellsError, CrsError, MapFileError, InfestationOutsideMapError,
 *   BandMissesForestError, MapPlacementError — each naming the field, the value and the limit
 */
export async function loadLandscape(scenario: LandscapeScenario | PointLandscapeScenario, files: MapFiles): Promise<LoadedLandscape> {
  const s = resolveQuantities(scenario) as PointLandscapeScenario;
  const notes: string[] = [];
  const { layers, crsProjector } =
    s.map.format === 'geotiff'
      ? await rasterLayers(s as PointLandscapeScenario & { map: { format: 'geotiff' } }, files, notes)
      : vectorLayers(s as PointLandscapeScenario & { map: { format: 'geojson' } }, files, notes);
  const { grid } = layers;
  const n = grid.nx * grid.ny;
  const classAtCells = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    let best = 0;
    for (let k = 1; k < N_CLASSES; k++) if (layers.classShare[k][i] > layers.classShare[best][i]) best = k;
    classAtCells[i] = best;
  }
  const hostCoverAtCells = Float32Array.from(layers.hostShare);
  const stemsAtCells = Float32Array.from(layers.stems);
  const placer = makePlacer(grid, crsProjector, coordinatesOf(s) === 'lonlat');
  const { infestedAtCells, infestedPolygons } = placeInfestation(placer, s.infestation.places, hostCoverAtCells);
  const placeProblems: Problem[] = [];
  const { sites, sitePlaces } = placeSites(placer, s.sites, placeProblems);
  const { bands, bandPolygons } = placeBands(placer, s.bands.options, hostCoverAtCells, stemsAtCells, placeProblems);

  return {
    ...grid,
    crs: crsProjector.crs,
    classAtCells,
    hostCoverAtCells,
    stemsAtCells,
    outside: s.outside,
    infestedAtCells,
    sites,
    bands,
    projector: crsProjector,
    bandPolygons,
    infestedPolygons,
    sitePlaces,
    notes,
  };
}

/**
 * Host trees inside a region: Σ cover × (cell area in ha) × stems/ha. With stems counted per ha of
 * ground this is the trees a band removes (the band's cover × the cell's mean host stems).
 */
export function treesInCover(l: Pick<RasterLandscape, 'cellM' | 'stemsAtCells'>, cover: Float32Array): number {
  const cellHa = (l.cellM * l.cellM) / 1e4;
  let s = 0;
  for (let i = 0; i < cover.length; i++) if (cover[i] > 0) s += cover[i] * l.stemsAtCells[i];
  return s * cellHa;
}

export type { RasterClass };
