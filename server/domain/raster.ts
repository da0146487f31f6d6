/**
 * A landscape map resolved onto the model's square raster: what the GIS loader (server/domain/gis/) hands
 * to the 2-D engine and the landscape analyses. Geometry and layers only — no pest parameters.
 *
 * Layout: row-major, row 0 at the NORTH edge (as GeoTIFF stores it); cell (row, col) has index
 * row·nx + col. Coordinates are in the map's projected CRS, metres; the model works in km.
 */
export interface RasterGeometry {
  nx: number;
  ny: number;
  /** Cell side [m] (square cells). */
  cellM: number;
  /** Map x of the west edge of column 0 [m, projected CRS]. */
  originXM: number;
  /** Map y of the north edge of row 0 [m, projected CRS]. */
  originYM: number;
  /** The projected CRS: an EPSG code ("EPSG:25832") or a proj4 definition, and a readable name. */
  crs: { code: string; proj4: string; name: string };
}

/** Habitat classes of a map cell (the transect's habitats plus "outside": nodata, water, built-up). */
export const RASTER_CLASSES = ['host', 'nonhost', 'open', 'outside'] as const;
export type RasterClass = (typeof RASTER_CLASSES)[number];

export interface RasterLandscape extends RasterGeometry {
  /** Class index per cell (index into RASTER_CLASSES), length nx·ny. */
  classAtCells: Uint8Array;
  /** Share of the cell that is host forest (0–1), length nx·ny. */
  hostCoverAtCells: Float32Array;
  /** Stems per ha of host trees (0 where there is no host), length nx·ny. */
  stemsAtCells: Float32Array;
  /** Cells outside the habitat (nodata, water, built-up): impassable or lethal, as the scenario says. */
  outside: 'impassable' | 'lethal';
  /** Share of each cell infested at the start (0–1), length nx·ny. */
  infestedAtCells: Float32Array;
  /** Protected sites: name and the cells they cover (a point is one cell). */
  sites: { name: string; cells: Int32Array }[];
  /** Barrier options: id, label and the share of each cell inside the band (0–1). */
  bands: {
    id: string;
    label: string;
    cover: Float32Array;
    treatment: 'clearing' | 'nonhost-planting';
    areaM2: number;
    /** Band width across its centre line [m] when the band was given as a centre line and width (used for its 1-D cross-section). */
    widthM?: number;
  }[];
}
