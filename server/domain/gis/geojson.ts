import { StandPropertiesSchema, type MapHabitat } from '../../model/landscape.ts';
import { resolveQuantities } from '../../model/quantity.ts';
import { problemsFromZod, type Problem } from '../../model/errors.ts';
import { utmCrsFor, projector, type Projector } from './crs.ts';
import { orientPolygon, ringArea, type Polygon, type Xy } from './geometry.ts';
import { MapFileError } from './errors.ts';

/** A stand of a GeoJSON map, projected to metres. */
export interface Stand {
  habitat: MapHabitat;
  name?: string;
  /** Relative host stocking 0–1 (host forest; 1 when absent). */
  stocking: number;
  /** Host stems per ha (host forest). */
  stemsPerHa: number;
  polygons: Polygon[];
}

/** Largest number of features in a stand map. */
export const MAX_FEATURES = 20_000;

/**
 * A feature's polygons as rings of [longitude, latitude], or null after adding the first problem found;
 * every position read is added to `sums` (their mean picks the UTM zone).
 */
function readPolygons(polys: unknown[], where: string, problems: Problem[], sums: { lon: number; lat: number; n: number }): Xy[][][] | null {
  const out: Xy[][][] = [];
  for (const p of polys) {
    if (!Array.isArray(p) || p.length === 0) {
      problems.push({ path: `${where}.geometry`, value: p, message: 'a polygon needs an outer ring' });
      return null;
    }
    const rings: Xy[][] = [];
    for (const r of p) {
      if (!Array.isArray(r) || r.length < 4) {
        problems.push({ path: `${where}.geometry`, value: Array.isArray(r) ? `${r.length} positions` : r, message: 'a linear ring needs at least 4 positions (closed)' });
        return null;
      }
      const ring: Xy[] = [];
      for (const pos of r) {
        const [lon, lat] = Array.isArray(pos) ? pos : [];
        if (typeof lon !== 'number' || typeof lat !== 'number' || !(Math.abs(lon) <= 180) || !(Math.abs(lat) <= 90)) {
          problems.push({ path: `${where}.geometry`, value: pos, message: 'positions must be [longitude, latitude] in degrees (RFC 7946); this one is not (a projected file? export it as WGS84)' });
          return null;
        }
        ring.push([lon, lat]);
        sums.lon += lon;
        sums.lat += lat;
        sums.n++;
      }
      rings.push(ring);
    }
    out.push(rings);
  }
  return out;
}

/**
 * Reads a GeoJSON FeatureCollection of stand polygons (RFC 7946: WGS84 longitude/latitude) and projects it
 * to the WGS84 UTM zone of its centre (named in the result: `projector.crs`). Edges are taken as straight
 * lines in the projected plane (at stand scale the difference from straight lon/lat lines is centimetres).
 * Properties: `habitat` (host-forest, non-host-forest, clearing, outside), `name`, and for host forest
 * `stocking` and `stemsPerHa` (the transect's fields; numbers only here).
 *
 * @param stemsDefault - stems per ha for host stands without `stemsPerHa`
 * @throws MapFileError naming the feature and property at fault
 */
export function readStandMap(text: string, path: string, fileName: string, stemsDefault: number): { stands: Stand[]; projector: Projector } {
  const fail = (problems: Problem[]) => new MapFileError(problems);
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    throw fail([{ path, value: fileName, message: `is not valid JSON (${(e as Error).message})` }]);
  }
  const fc = doc as { type?: unknown; features?: unknown; crs?: unknown };
  if (typeof fc !== 'object' || fc === null || fc.type !== 'FeatureCollection' || !Array.isArray(fc.features)) {
    throw fail([{ path, value: fileName, message: 'must be a GeoJSON FeatureCollection of stand polygons' }]);
  }
  if (fc.crs !== undefined) {
    throw fail([{ path, value: fileName, message: 'carries a "crs" member (pre-RFC 7946 GeoJSON); GeoJSON must be in WGS84 longitude/latitude (export it with RFC 7946 settings)' }]);
  }
  if (fc.features.length > MAX_FEATURES) throw fail([{ path, value: fileName, message: `has ${fc.features.length} features; at most ${MAX_FEATURES}` }]);
  const problems: Problem[] = [];
  const raw: { props: ReturnType<typeof StandPropertiesSchema.parse>; polys: Xy[][][] }[] = [];
  const sums = { lon: 0, lat: 0, n: 0 };
  fc.features.forEach((f: unknown, i: number) => {
    const where = `${fileName} features[${i}]`;
    const feat = f as { type?: unknown; geometry?: { type?: unknown; coordinates?: unknown }; properties?: unknown };
    if (typeof feat !== 'object' || feat === null || feat.type !== 'Feature') {
      problems.push({ path: where, value: feat?.type, message: 'must be a Feature' });
      return;
    }
    const g = feat.geometry;
    let polys: unknown[];
    if (g?.type === 'Polygon') polys = [g.coordinates];
    else if (g?.type === 'MultiPolygon' && Array.isArray(g.coordinates)) polys = g.coordinates;
    else {
      problems.push({ path: `${where}.geometry.type`, value: g?.type, message: 'must be Polygon or MultiPolygon (stands are areas)' });
      return;
    }
    const parsed = StandPropertiesSchema.safeParse(feat.properties ?? {});
    if (!parsed.success) {
      problems.push(...problemsFromZod(parsed.error.issues, feat.properties, [`${where}.properties`]));
      return;
    }
    const out = readPolygons(polys, where, problems, sums);
    if (!out) return;
    raw.push({ props: parsed.data, polys: out });
  });
  if (problems.length) throw fail(problems.slice(0, 20));
  if (sums.n === 0) throw fail([{ path, value: fileName, message: 'has no stand polygons' }]);
  const proj = projector(utmCrsFor(sums.lon / sums.n, sums.lat / sums.n));
  const stands: Stand[] = raw.map(({ props, polys }) => {
    const p = resolveQuantities(props);
    return {
      habitat: p.habitat,
      name: p.name,
      stocking: p.stocking ?? 1,
      stemsPerHa: p.stemsPerHa ?? stemsDefault,
      polygons: polys.map((rings) => orientPolygon(rings.map((r) => r.map(([lon, lat]) => proj.fromLonLat(lon, lat))))),
    };
  });
  return { stands, projector: proj };
}

/** A GeoJSON feature for output. */
export interface OutFeature {
  polygons: Polygon[];
  properties: Record<string, unknown>;
}

/** Degrees kept in output coordinates: 7 decimals ≈ 1 cm. */
const DECIMALS = 1e7;

/**
 * A FeatureCollection in WGS84 longitude/latitude (RFC 7946) from polygons in a projected CRS [m]: closed
 * rings, outer rings counter-clockwise and holes clockwise (checked after projection), 7 decimals.
 */
export function toFeatureCollection(features: readonly OutFeature[], proj: Projector): { type: 'FeatureCollection'; features: unknown[] } {
  const ll = (ring: readonly Xy[], outer: boolean): Xy[] => {
    const r = ring.map(([x, y]) => {
      const [lon, lat] = proj.toLonLat(x, y);
      return [Math.round(lon * DECIMALS) / DECIMALS, Math.round(lat * DECIMALS) / DECIMALS] as Xy;
    });
    if ((ringArea(r) > 0) !== outer) r.reverse();
    r.push([r[0][0], r[0][1]]);
    return r;
  };
  return {
    type: 'FeatureCollection',
    features: features
      .filter((f) => f.polygons.length > 0)
      .map((f) => {
        const polys = f.polygons.map((p) => orientPolygon(p).map((ring, k) => ll(ring, k === 0)));
        return {
          type: 'Feature',
          properties: f.properties,
          geometry: polys.length === 1 ? { type: 'Polygon', coordinates: polys[0] } : { type: 'MultiPolygon', coordinates: polys },
        };
      }),
  };
}
