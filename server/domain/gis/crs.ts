import proj4 from 'proj4';

/**
 * Coordinate reference systems the tool knows by EPSG code. proj4 ships no EPSG database, so each code
 * needs its definition; this table keeps the common projected CRSs in metres (UTM zones on three datums
 * and a few national/continental grids). Definitions written from the EPSG registry's parameters (from
 * memory); tests/domain/gis/crs.test.ts checks every entry against Debian's `gdaltransform`, which carries
 * the registry. A file with another code can name its CRS in the scenario (`map.crs`, a proj4 string).
 */
export interface Crs {
  /** "EPSG:32633", or "custom" for a proj4 string given by the user or chosen by the tool. */
  code: string;
  /** The proj4 definition. */
  proj4: string;
  /** Readable name, e.g. "WGS 84 / UTM zone 33N". */
  name: string;
}

const WGS84 = '+proj=longlat +datum=WGS84 +no_defs';

const NAMED: Record<number, { name: string; proj4: string }> = {
  3035: { name: 'ETRS89-extended / LAEA Europe', proj4: '+proj=laea +lat_0=52 +lon_0=10 +x_0=4321000 +y_0=3210000 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs' },
  2154: { name: 'RGF93 v1 / Lambert-93', proj4: '+proj=lcc +lat_0=46.5 +lon_0=3 +lat_1=49 +lat_2=44 +x_0=700000 +y_0=6600000 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs' },
  3006: { name: 'SWEREF99 TM', proj4: '+proj=utm +zone=33 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs' },
  3067: { name: 'ETRS89 / TM35FIN(E,N)', proj4: '+proj=utm +zone=35 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs' },
  2193: { name: 'NZGD2000 / New Zealand Transverse Mercator 2000', proj4: '+proj=tmerc +lat_0=0 +lon_0=173 +k=0.9996 +x_0=1600000 +y_0=10000000 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs' },
  3577: { name: 'GDA94 / Australian Albers', proj4: '+proj=aea +lat_0=0 +lon_0=132 +lat_1=-18 +lat_2=-36 +x_0=0 +y_0=0 +ellps=GRS80 +towgs84=0,0,0,0,0,0,0 +units=m +no_defs' },
  5070: { name: 'NAD83 / Conus Albers', proj4: '+proj=aea +lat_0=23 +lon_0=-96 +lat_1=29.5 +lat_2=45.5 +x_0=0 +y_0=0 +datum=NAD83 +units=m +no_defs' },
};

/** Codes of geographic (degree) CRSs met in practice; any of them is refused with a message saying so. */
const GEOGRAPHIC = new Set([4326, 4258, 4269, 4267, 4283, 4617, 4167, 4619, 4618, 4230, 4312, 4314, 4322, 4979, 4937]);

/** Metre-based but not usable for areas and distances (scale grows as 1/cos(latitude)). */
const DISTORTING = new Set([3857, 3395, 900913]);

/** Outcome of looking up an EPSG code. */
export type CrsLookup =
  | { kind: 'projected'; crs: Crs }
  | { kind: 'geographic' }
  | { kind: 'distorting'; name: string }
  | { kind: 'unknown' };

/** The CRS of an EPSG code, or why it cannot be used. */
export function crsFromEpsg(code: number): CrsLookup {
  if (GEOGRAPHIC.has(code)) return { kind: 'geographic' };
  if (DISTORTING.has(code)) return { kind: 'distorting', name: code === 3395 ? 'World Mercator' : 'Web Mercator (Pseudo-Mercator)' };
  const named = NAMED[code];
  if (named) return { kind: 'projected', crs: { code: `EPSG:${code}`, ...named } };
  const zone = code % 100;
  const series = Math.floor(code / 100);
  if (zone >= 1 && zone <= 60) {
    if (series === 326) return utm(code, zone, false, 'WGS 84', '+datum=WGS84');
    if (series === 327) return utm(code, zone, true, 'WGS 84', '+datum=WGS84');
    if (series === 258 && zone >= 28 && zone <= 38) return utm(code, zone, false, 'ETRS89', '+ellps=GRS80 +towgs84=0,0,0,0,0,0,0');
    if (series === 269 && zone >= 1 && zone <= 23) return utm(code, zone, false, 'NAD83', '+datum=NAD83');
  }
  return { kind: 'unknown' };
}

function utm(code: number, zone: number, south: boolean, datumName: string, datum: string): CrsLookup {
  return {
    kind: 'projected',
    crs: {
      code: `EPSG:${code}`,
      name: `${datumName} / UTM zone ${zone}${south ? 'S' : 'N'}`,
      proj4: `+proj=utm +zone=${zone}${south ? ' +south' : ''} ${datum} +units=m +no_defs`,
    },
  };
}

/** The WGS84 UTM zone for a longitude/latitude (the metric CRS the tool picks for a GeoJSON map). */
export function utmCrsFor(lon: number, lat: number): Crs {
  const zone = Math.min(60, Math.max(1, Math.floor((lon + 180) / 6) + 1));
  const r = crsFromEpsg((lat < 0 ? 32700 : 32600) + zone);
  if (r.kind !== 'projected') throw new Error('unreachable: UTM table');
  return r.crs;
}

/** A proj4 definition given by the user: accepted when proj4 parses it and it is projected in metres. */
export function crsFromProj4(def: string): Crs | string {
  let units: string | undefined;
  try {
    const p = proj4.Proj(def) as unknown as { projName?: string; units?: string };
    if (p.projName === 'longlat' || p.projName === 'identity') return 'is a geographic (degree) CRS; give a projected CRS in metres';
    units = p.units;
  } catch (e) {
    return `cannot be read as a proj4 definition (${(e as Error).message})`;
  }
  if (units !== undefined && units !== 'm') return `has units "${units}"; the model needs a projected CRS in metres`;
  return { code: 'custom', proj4: def, name: def };
}

/** Forward and inverse transforms between a projected CRS [m] and WGS84 longitude/latitude [°]. */
export interface Projector {
  crs: Crs;
  toLonLat(x: number, y: number): [number, number];
  fromLonLat(lon: number, lat: number): [number, number];
}

export function projector(crs: Crs): Projector {
  const conv = proj4(crs.proj4, WGS84);
  return {
    crs,
    toLonLat: (x, y) => conv.forward([x, y]) as [number, number],
    fromLonLat: (lon, lat) => conv.inverse([lon, lat]) as [number, number],
  };
}

/** The EPSG number of a CRS code ("EPSG:32633" → 32633), or undefined for a custom one. */
export function epsgNumber(crs: Crs): number | undefined {
  const m = /^EPSG:(\d+)$/.exec(crs.code);
  return m ? Number(m[1]) : undefined;
}
