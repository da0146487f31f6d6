/**
 * Places the scenario's infestation, protected sites and band options on the model raster: points and
 * polygons in map metres (or longitude/latitude, projected), checked against the map's extent, with cover
 * fractions by rasterisation. Each mistake names its field, its value and what is wrong.
 */
import type { RasterLandscape } from '../raster.ts';
import type { PointLandscapeScenario } from '../../model/landscape.ts';
import type { Problem } from '../../model/errors.ts';
import type { Projector } from './crs.ts';
import { addPolygonCover, cellAt, type GridSpec } from './rasterise.ts';
import { bandPolygon, discPolygon, type Polygon, type Xy } from './geometry.ts';
import { BandMissesForestError, InfestationOutsideMapError, MapPlacementError } from './errors.ts';

/** A place after distributions are resolved (tuples become arrays). */
type LoosePlace = { point: readonly number[]; radiusM?: number } | { polygon: readonly (readonly (readonly number[])[])[] };

/** Places on one model raster: coordinates to map metres, the extent check and its wording. */
export interface Placer {
  grid: GridSpec;
  n: number;
  lonlat: boolean;
  toMap(p: readonly number[]): Xy;
  inside(p: Xy): boolean;
  /** "the map (x …, y … in CRS)", for messages. */
  extent: string;
  /** A point, or a polygon (given, or a disc of the place's radius). */
  shape(pl: LoosePlace): Polygon | Xy;
}

const isPoint = (g: Polygon | Xy): g is Xy => typeof g[0] === 'number';
const pointsOf = (g: Polygon | Xy): Xy[] => (isPoint(g) ? [g] : g.flat());

export function makePlacer(grid: GridSpec, proj: Projector, lonlat: boolean): Placer {
  const ext = { x0: grid.originXM, x1: grid.originXM + grid.nx * grid.cellM, y0: grid.originYM - grid.ny * grid.cellM, y1: grid.originYM };
  const toMap = (p: readonly number[]): Xy => (lonlat ? proj.fromLonLat(p[0], p[1]) : [p[0], p[1]]);
  return {
    grid,
    n: grid.nx * grid.ny,
    lonlat,
    toMap,
    inside: ([x, y]) => x >= ext.x0 && x <= ext.x1 && y >= ext.y0 && y <= ext.y1,
    extent: `the map (x ${ext.x0}–${ext.x1} m, y ${ext.y0}–${ext.y1} m in ${proj.crs.name})`,
    shape(pl) {
      if ('polygon' in pl) return pl.polygon.map((r) => r.map(toMap));
      const c = toMap(pl.point);
      return pl.radiusM !== undefined ? discPolygon(c[0], c[1], pl.radiusM) : c;
    },
  };
}

/** Cover fraction of a polygon on every cell. */
function coverOf(grid: GridSpec, n: number, poly: Polygon): Float32Array {
  const cover = new Float32Array(n);
  addPolygonCover(grid, poly, cover);
  return cover;
}

/**
 * The infested share of every cell (places added, at most 1) and the outlines the maps draw.
 * @throws InfestationOutsideMapError for a place (partly) outside the map or on no host forest
 */
export function placeInfestation(
  pc: Placer,
  places: readonly LoosePlace[],
  hostCoverAtCells: Float32Array,
): { infestedAtCells: Float32Array; infestedPolygons: Polygon[] } {
  const { grid, n } = pc;
  const infestedAtCells = new Float32Array(n);
  const infestedPolygons: Polygon[] = [];
  const problems: Problem[] = [];
  places.forEach((pl, i) => {
    const g = pc.shape(pl);
    const path = `infestation.places[${i}]`;
    const out = pointsOf(g).find((p) => !pc.inside(p));
    if (out) {
      problems.push({ path, value: pc.lonlat ? pl : out.map((v) => Math.round(v)), message: `lies (partly) outside ${pc.extent}` });
      return;
    }
    let cover: Float32Array;
    if (isPoint(g)) {
      cover = new Float32Array(n);
      cover[cellAt(grid, g[0], g[1])] = 1;
    } else {
      cover = coverOf(grid, n, g);
      infestedPolygons.push(g);
    }
    let onHost = 0;
    for (let c = 0; c < n; c++) {
      if (cover[c] > 0) {
        infestedAtCells[c] = Math.min(1, infestedAtCells[c] + cover[c]);
        onHost += cover[c] * hostCoverAtCells[c];
      }
    }
    if (isPoint(g)) infestedPolygons.push(discPolygon(g[0], g[1], grid.cellM / 2, 16));
    if (!(onHost > 0)) problems.push({ path, value: pl, message: 'lies on no host forest: an infestation must touch host forest on the map' });
  });
  if (problems.length) throw new InfestationOutsideMapError(problems);
  return { infestedAtCells, infestedPolygons };
}

/** The protected sites' cells and outlines; a site outside the map adds a problem to `problems`. */
export function placeSites(
  pc: Placer,
  given: PointLandscapeScenario['sites'],
  problems: Problem[],
): { sites: RasterLandscape['sites']; sitePlaces: { name: string; point?: Xy; polygon?: Polygon }[] } {
  const { grid, n } = pc;
  const sites: RasterLandscape['sites'] = [];
  const sitePlaces: { name: string; point?: Xy; polygon?: Polygon }[] = [];
  given.forEach((site, i) => {
    const g = pc.shape(site.place);
    if (pointsOf(g).some((p) => !pc.inside(p))) {
      problems.push({ path: `sites[${i}].place`, value: site.place, message: `lies (partly) outside ${pc.extent}` });
      return;
    }
    let cells: number[];
    if (isPoint(g)) {
      cells = [cellAt(grid, g[0], g[1])];
      sitePlaces.push({ name: site.name, point: g });
    } else {
      const cover = coverOf(grid, n, g);
      cells = [];
      for (let c = 0; c < n; c++) if (cover[c] > 0) cells.push(c);
      sitePlaces.push({ name: site.name, polygon: g });
    }
    sites.push({ name: site.name, cells: Int32Array.from(cells) });
  });
  return { sites, sitePlaces };
}

/**
 * The band options' cover and outlines.
 * @throws MapPlacementError for these and the earlier `problems` (a band or site outside the map, a centre
 *   line that makes no band); then BandMissesForestError for a band on no host forest
 */
export function placeBands(
  pc: Placer,
  options: PointLandscapeScenario['bands']['options'],
  hostCoverAtCells: Float32Array,
  stemsAtCells: Float32Array,
  problems: Problem[],
): { bands: RasterLandscape['bands']; bandPolygons: Polygon[] } {
  const { grid, n } = pc;
  const bands: RasterLandscape['bands'] = [];
  const bandPolygons: Polygon[] = [];
  const missProblems: Problem[] = [];
  options.forEach((o, i) => {
    const path = `bands.options[${i}]`;
    let poly: Polygon;
    if (o.line) {
      const b = bandPolygon(o.line.map(pc.toMap), o.widthM!);
      if (!Array.isArray(b)) {
        problems.push({ path: `${path}.line[${b.index}]`, value: o.line[b.index], message: b.message });
        return;
      }
      poly = b;
    } else poly = o.polygon!.map((r) => r.map(pc.toMap));
    const cover = coverOf(grid, n, poly);
    let area = 0;
    let host = 0;
    for (let c = 0; c < n; c++) {
      if (cover[c] > 0) {
        area += cover[c];
        host += cover[c] * hostCoverAtCells[c] * stemsAtCells[c];
      }
    }
    if (!(area > 0)) {
      problems.push({ path, value: o.name, message: `lies wholly outside ${pc.extent}` });
      return;
    }
    if (!(host > 0)) {
      missProblems.push({ path, value: o.name, message: 'covers no host forest on the map: the band misses the forest (check its coordinates and the coordinates setting)' });
      return;
    }
    bands.push({
      id: `option-${i + 1}`,
      label: o.name,
      cover,
      treatment: o.cover === 'clearing' ? 'clearing' : 'nonhost-planting',
      areaM2: area * grid.cellM * grid.cellM,
      ...(o.line ? { widthM: o.widthM } : {}),
    });
    bandPolygons.push(poly);
  });
  if (problems.length) throw new MapPlacementError(problems);
  if (missProblems.length) throw new BandMissesForestError(missProblems);
  return { bands, bandPolygons };
}
