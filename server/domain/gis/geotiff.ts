import { fromArrayBuffer, writeArrayBuffer } from 'geotiff';
import { crsFromEpsg, crsFromProj4, epsgNumber, type Crs } from './crs.ts';
import { CrsError, MapFileError } from './errors.ts';

/** A single-band raster as read from a GeoTIFF: north-up, cell sizes in metres, CRS resolved. */
export interface SourceRaster {
  width: number;
  height: number;
  /** Cell width and height [m] (both positive). */
  resXM: number;
  resYM: number;
  /** West edge of column 0 and north edge of row 0 [m]. */
  originXM: number;
  originYM: number;
  crs: Crs;
  nodata: number | null;
  /** Cell values, row-major, row 0 north. */
  values: Float64Array;
}

/** Largest raster accepted, in source pixels (guards memory before decoding). */
export const MAX_SOURCE_PIXELS = 40_000_000;

/** GeoKey values (GeoTIFF 1.0 spec, OGC 19-008r4 §7). */
const MODEL_TYPE_PROJECTED = 1;
const MODEL_TYPE_GEOGRAPHIC = 2;
const RASTER_PIXEL_IS_POINT = 2;
const USER_DEFINED = 32767;
const LINEAR_UNIT_METRE = 9001;

/**
 * Reads a single-band GeoTIFF: georeference (tie point + pixel scale; rotated transforms refused), nodata
 * (the GDAL_NODATA tag) and the CRS from its GeoKeys. A geographic (degree) raster is refused with a
 * message saying so; a projected CRS not in the tool's table needs `crsOverride` (a proj4 string).
 *
 * @param path - the scenario field that named the file, for the problems (e.g. "map.file")
 * @throws MapFileError for a file that is not a readable single-band GeoTIFF; CrsError for its CRS
 */
export async function readGeoTiff(bytes: Uint8Array, path: string, fileName: string, crsOverride?: string): Promise<SourceRaster> {
  const bad = (message: string) => new MapFileError([{ path, value: fileName, message }]);
  let image;
  try {
    const ab = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
    const tiff = await fromArrayBuffer(ab);
    image = await tiff.getImage();
  } catch (e) {
    throw bad(`is not a readable GeoTIFF (${(e as Error).message})`);
  }
  const width = image.getWidth();
  const height = image.getHeight();
  if (width * height > MAX_SOURCE_PIXELS) throw bad(`has ${width} × ${height} pixels; at most ${MAX_SOURCE_PIXELS} are accepted (coarsen it first)`);
  if (image.getSamplesPerPixel() !== 1) throw bad(`has ${image.getSamplesPerPixel()} bands; a host map must be a single-band GeoTIFF`);
  const fd = image.getFileDirectory() as unknown as Record<string, unknown>;
  if (fd.ModelTransformation) {
    const m = fd.ModelTransformation as number[];
    if (Math.abs(m[1]) > 1e-12 || Math.abs(m[4]) > 1e-12) throw bad('is rotated or sheared (ModelTransformation); give a north-up raster (e.g. gdalwarp it)');
  }
  let origin: number[], res: number[];
  try {
    origin = image.getOrigin();
    res = image.getResolution();
  } catch {
    throw bad('has no georeference (no tie point and pixel scale): the map position cannot be read');
  }
  const keys = (image.getGeoKeys() ?? {}) as Record<string, number | string | undefined>;
  let crs: Crs;
  if (crsOverride !== undefined) {
    const c = crsFromProj4(crsOverride);
    if (typeof c === 'string') throw new CrsError({ path: 'map.crs', value: crsOverride, message: c });
    crs = c;
  } else {
    crs = crsFromKeys(keys, path, fileName);
  }
  if (!(res[1] < 0)) throw bad('is not north-up (its rows run south to north); flip it to the usual north-up layout');
  const resXM = Math.abs(res[0]);
  const resYM = Math.abs(res[1]);
  if (!(resXM > 0) || !Number.isFinite(resXM) || !Number.isFinite(resYM)) throw bad(`has a cell size ${res[0]} × ${res[1]} that is not usable`);
  let originXM = origin[0];
  let originYM = origin[1];
  if (keys.GTRasterTypeGeoKey === RASTER_PIXEL_IS_POINT) {
    // Tie point at the centre of the first pixel: its west/north edges lie half a cell away.
    originXM -= resXM / 2;
    originYM += resYM / 2;
  }
  const rasters = (await image.readRasters({ interleave: false })) as unknown as ArrayLike<number>[];
  const values = Float64Array.from(rasters[0]);
  const nd = image.getGDALNoData();
  return { width, height, resXM, resYM, originXM, originYM, crs, nodata: nd, values };
}

function crsFromKeys(keys: Record<string, number | string | undefined>, path: string, fileName: string): Crs {
  const fail = (message: string) => new CrsError({ path, value: fileName, message });
  const model = keys.GTModelTypeGeoKey;
  const pcs = keys.ProjectedCSTypeGeoKey;
  if (model === MODEL_TYPE_GEOGRAPHIC || (pcs === undefined && keys.GeographicTypeGeoKey !== undefined && model !== MODEL_TYPE_PROJECTED)) {
    throw fail('is in a geographic CRS (degrees of longitude and latitude); the model needs a projected CRS in metres — reproject the raster first (e.g. gdalwarp -t_srs EPSG:326xx for the UTM zone of the area)');
  }
  if (keys.ProjLinearUnitsGeoKey !== undefined && keys.ProjLinearUnitsGeoKey !== LINEAR_UNIT_METRE) {
    throw fail(`has linear unit code ${keys.ProjLinearUnitsGeoKey}, not metres (9001); reproject it to a CRS in metres`);
  }
  if (typeof pcs !== 'number' || pcs === USER_DEFINED) {
    throw fail('has no EPSG code for its projected CRS that the tool can read; give the CRS in the scenario as a proj4 definition (map.crs, e.g. "+proj=utm +zone=33 +datum=WGS84 +units=m")');
  }
  const r = crsFromEpsg(pcs);
  if (r.kind === 'projected') return r.crs;
  if (r.kind === 'geographic') throw fail(`is in a geographic CRS (EPSG:${pcs}, degrees); the model needs a projected CRS in metres — reproject the raster first`);
  if (r.kind === 'distorting') throw fail(`is in ${r.name} (EPSG:${pcs}), whose metres are stretched by 1/cos(latitude): areas and widths would be wrong — reproject to a UTM zone or an equal-area CRS`);
  throw fail(`is in EPSG:${pcs}, which the tool does not know; give the CRS in the scenario as a proj4 definition (map.crs)`);
}

/** What to write: a north-up grid of values in a known CRS. */
export interface GeoTiffOut {
  nx: number;
  ny: number;
  cellM: number;
  originXM: number;
  originYM: number;
  crs: Crs;
  values: Float32Array | Uint16Array | Uint8Array;
  nodata?: number;
}

/**
 * Writes a single-band GeoTIFF (uncompressed, strips) with tie point, pixel scale, the EPSG code of the CRS
 * (a custom CRS is written as a citation only) and the GDAL_NODATA tag.
 */
export async function writeGeoTiff(o: GeoTiffOut): Promise<Uint8Array> {
  const epsg = epsgNumber(o.crs);
  const isFloat = o.values instanceof Float32Array;
  const bits = o.values instanceof Uint8Array ? 8 : o.values instanceof Uint16Array ? 16 : 32;
  const meta: Record<string, unknown> = {
    width: o.nx,
    height: o.ny,
    ModelPixelScale: [o.cellM, o.cellM, 0],
    ModelTiepoint: [0, 0, 0, o.originXM, o.originYM, 0],
    GTModelTypeGeoKey: MODEL_TYPE_PROJECTED,
    GTRasterTypeGeoKey: 1,
    BitsPerSample: [bits],
    SampleFormat: [isFloat ? 3 : 1],
  };
  if (epsg !== undefined) meta.ProjectedCSTypeGeoKey = epsg;
  else meta.GTCitationGeoKey = o.crs.proj4;
  if (o.nodata !== undefined) meta.GDAL_NODATA = String(o.nodata);
  const ab = await writeArrayBuffer(o.values as unknown as number[], meta);
  return new Uint8Array(ab);
}
