import { z } from 'zod';
import { FIELDS, describeRange, type FieldSpec } from './fields.ts';
import { PestSchema, NON_HOST_PEST_FIELDS } from './pest.ts';
import { valueSchema, resolveQuantities, type Resolved } from './quantity.ts';
import { CalibrationNoteSchema, HostForestSegmentSchema, TransportSchema, UncertaintySchema, SCENARIO_VERSION } from './scenario.ts';
import { ScenarioError, pathFromDotted, problemsFromZod, type Problem } from './errors.ts';

/**
 * The landscape scenario: the team's own map (a GeoTIFF of host per cell, or a GeoJSON of stand polygons),
 * barrier bands drawn on it, the current infestation, protected sites, horizon and detection level. The pest
 * profile — with its per-habitat movement, edge preference and mortality in the open and in non-host
 * forest — is the transect's `PestSchema`, reused; a stand's stocking and stems are the transect's
 * host-forest segment fields, reused.
 *
 * Coordinates: `coordinates: "map"` (default for a GeoTIFF map) gives every point in the map's own projected
 * CRS in metres, [x (easting), y (northing)]; `"lonlat"` gives WGS84 [longitude, latitude] in degrees as in
 * GeoJSON (RFC 7946) — required for a GeoJSON map, whose metric CRS the tool chooses.
 */

/** Field specs of the landscape (units, ranges, help) — the same shape as server/model/fields.ts. */
export const LANDSCAPE_FIELDS = {
  modelCellM: {
    label: 'Model cell size',
    unit: 'm',
    min: 5,
    max: 5000,
    typical: '50–200',
    help: 'Side of the square cells the model computes on. The map is resampled to it by area averaging.',
    source: 'Default: the GeoTIFF cell size, or 100 m for a GeoJSON map',
  },
  bandWidthM: {
    label: 'Band width',
    unit: 'm',
    min: 1,
    max: 20000,
    typical: '100–2000',
    help: 'Width of the band across its centre line (the band is centre line ± half the width, flat ends).',
    source: 'Option under study',
  },
  radiusM: {
    label: 'Radius',
    unit: 'm',
    min: 1,
    max: 100000,
    typical: '100–5000',
    help: 'Radius of a circular infested area or protected site around a point.',
    source: 'Survey',
  },
  coordinate: {
    label: 'Coordinate',
    unit: 'm or °',
    min: -1e8,
    max: 1e8,
    typical: 'within the map',
    help: 'Easting/northing in the map CRS [m], or longitude/latitude [°] with coordinates "lonlat".',
    source: 'Map of the area',
  },
  basalAreaFull: {
    label: 'Basal area of a fully stocked host stand',
    unit: 'm²/ha',
    min: 0,
    minExclusive: true,
    max: 200,
    typical: '15–50',
    help: 'Host basal area that counts as full cover (share 1) when the map gives basal area.',
    source: 'Forest inventory',
  },
  stemsFull: {
    label: 'Host stems at full cover',
    unit: 'trees/ha',
    min: 0,
    minExclusive: true,
    max: 20000,
    typical: '100–1500',
    help: 'Host stems per ha in a fully stocked cell: converts a share to stems (and stems to a share).',
    source: 'Forest inventory',
  },
  costPerHa: {
    label: 'Cost per hectare of band',
    unit: 'per ha',
    min: 0,
    max: 1e9,
    typical: 'programme costs',
    help: 'Cost of preparing one hectare of the band (on top of the cost per stem removed).',
    source: 'Programme costs',
  },
} satisfies Record<string, FieldSpec>;

const LF = LANDSCAPE_FIELDS;

/** Largest map file accepted [bytes] (upload, CLI and API alike). */
export const MAX_MAP_FILE_BYTES = 32 * 1024 * 1024;
/** Largest number of model cells (nx·ny) a landscape may have. */
export const MAX_MODEL_CELLS = 2_000_000;

const coordinate = valueSchema(LF.coordinate);
/** A point [x, y]: easting/northing [m] in the map CRS, or [longitude, latitude] with coordinates "lonlat". */
export const PointSchema = z.tuple([coordinate, coordinate], { error: 'must be a point [x, y] (two numbers)' });
/** A closed ring: at least 3 distinct points; the first point may be repeated at the end. */
export const RingSchema = z.array(PointSchema).min(3, { error: 'a ring needs at least 3 points' }).max(20000, { error: 'a ring may have at most 20000 points' });
/** A polygon: outer ring first, then holes (orientation free; the tool orients them). */
export const PolygonSchema = z.array(RingSchema).min(1, { error: 'needs an outer ring' }).max(1000, { error: 'at most 1000 rings' });

/** Units a host raster may declare. */
export const HOST_UNITS = ['share', 'stems-per-ha', 'basal-area-m2-per-ha'] as const;
export type HostUnit = (typeof HOST_UNITS)[number];
/** What a cell outside the habitat (nodata, water, built-up) does to insects. */
export const OUTSIDE_RULES = ['impassable', 'lethal'] as const;
/** Habitat classes a class raster code or a stand polygon may have (the transect's habitats plus "outside"). */
export const MAP_HABITATS = ['host-forest', 'non-host-forest', 'clearing', 'outside'] as const;
export type MapHabitat = (typeof MAP_HABITATS)[number];

const fileName = z
  .string()
  .min(1, { error: 'must not be empty' })
  .max(200, { error: 'must be at most 200 characters' })
  .regex(/^[A-Za-z0-9._-]+(\/[A-Za-z0-9._-]+)*$/, { error: 'must be a plain relative file name (letters, digits, . _ - and /)' })
  .refine((s) => !s.split('/').includes('..'), { error: 'must not climb out of the scenario folder (..)' });

const codeList = z.array(z.number().int({ error: 'must be a whole number' })).max(256);

/** Host per cell from a single-band GeoTIFF (and optionally a class raster on the same grid). */
export const GeoTiffMapSchema = z.strictObject({
  format: z.literal('geotiff'),
  /** The host raster, relative to the scenario file (or the upload's name). */
  file: fileName,
  /** What the cell values mean. */
  unit: z.enum(HOST_UNITS, { error: `must be one of ${HOST_UNITS.join(', ')}` }),
  /** Host stems per ha in a fully stocked cell (turns a share or basal area into stems, stems into a share). */
  stemsPerHaAtFullCover: valueSchema(LF.stemsFull),
  /** Basal area of full cover [m²/ha]; required when unit is basal-area-m2-per-ha. */
  basalAreaAtFullCover: valueSchema(LF.basalAreaFull).optional(),
  /** Optional class raster (same grid): integer codes per habitat class. */
  classes: z
    .strictObject({
      file: fileName,
      codes: z.strictObject({
        'host-forest': codeList.default([]),
        'non-host-forest': codeList.default([]),
        clearing: codeList.default([]),
        outside: codeList.default([]),
      }),
    })
    .optional(),
  /** A proj4 definition to use when the file's CRS is not one the tool knows (e.g. "+proj=utm +zone=33 +datum=WGS84"). */
  crs: z.string().max(500).optional(),
  /** Model cell size [m]; the raster's cell size when absent. */
  cellM: valueSchema(LF.modelCellM).optional(),
});

/** A stand (polygon feature) of a GeoJSON map: its habitat, and for host forest the transect's stocking and stems. */
export const StandPropertiesSchema = z.strictObject({
  habitat: z.enum(MAP_HABITATS, { error: `must be one of ${MAP_HABITATS.join(', ')}` }),
  name: z.string().max(80).optional(),
  stocking: HostForestSegmentSchema.shape.stocking.optional(),
  stemsPerHa: HostForestSegmentSchema.shape.stemsPerHa.optional(),
});

/** Stands from a GeoJSON FeatureCollection of polygons (RFC 7946 longitude/latitude). */
export const GeoJsonMapSchema = z.strictObject({
  format: z.literal('geojson'),
  file: fileName,
  /** Habitat of ground no polygon covers. */
  uncovered: z.enum(MAP_HABITATS, { error: `must be one of ${MAP_HABITATS.join(', ')}` }).default('clearing'),
  /** Model cell size [m]; 100 m when absent. */
  cellM: valueSchema(LF.modelCellM).optional(),
});

export const MapSchema = z.discriminatedUnion('format', [GeoTiffMapSchema, GeoJsonMapSchema], {
  error: 'format must be one of geotiff, geojson',
});

/** A place: a point with a radius, a bare point (one cell), or a polygon. */
export const PlaceSchema = z.union(
  [
    z.strictObject({ point: PointSchema, radiusM: valueSchema(LF.radiusM).optional() }),
    z.strictObject({ polygon: PolygonSchema }),
  ],
  { error: 'must be {"point": [x, y], "radiusM": r} or {"polygon": [[[x, y], ...]]}' },
);

export const BAND_COVERS = ['clearing', 'non-host-forest'] as const;

/** A barrier band: a centre line with a width (flat ends, mitred bends), or a polygon. */
export const BandOptionSchema = z
  .strictObject({
    name: z.string().min(1, { error: 'must not be empty' }).max(80),
    line: z.array(PointSchema).min(2, { error: 'a centre line needs at least 2 points' }).max(500).optional(),
    widthM: valueSchema(LF.bandWidthM).optional(),
    polygon: PolygonSchema.optional(),
    /** What the ground becomes: an open clearing, or a planting of non-host trees. */
    cover: z.enum(BAND_COVERS, { error: `must be one of ${BAND_COVERS.join(', ')}` }).default('clearing'),
  })
  .superRefine((o, ctx) => {
    const hasLine = o.line !== undefined;
    const hasPoly = o.polygon !== undefined;
    if (hasLine === hasPoly) {
      ctx.addIssue({ code: 'custom', path: [], input: o, message: 'give either "line" (with "widthM") or "polygon", not both or neither' });
    } else if (hasLine && o.widthM === undefined) {
      ctx.addIssue({ code: 'custom', path: ['widthM'], input: undefined, message: `is required with a centre line (${describeRange(LF.bandWidthM)})` });
    } else if (hasPoly && o.widthM !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['widthM'], input: o.widthM, message: 'is only used with a centre line; a polygon band has its own shape' });
    }
  });

const ObjectSchema = z.strictObject({
  version: z.literal(SCENARIO_VERSION, { error: `must be ${SCENARIO_VERSION}` }).default(SCENARIO_VERSION),
  /** Marks a landscape scenario (a transect scenario has a `transect` instead). */
  kind: z.literal('landscape', { error: 'must be "landscape"' }),
  title: z.string().min(1, { error: 'must not be empty' }).max(300, { error: 'must be at most 300 characters' }),
  description: z.string().max(4000).default(''),
  region: z.string().max(200).optional(),
  pest: PestSchema,
  map: MapSchema,
  /** Cells outside the habitat (nodata, water, built-up): impassable (reflecting) or lethal. */
  outside: z.enum(OUTSIDE_RULES, { error: `must be one of ${OUTSIDE_RULES.join(', ')}` }).default('impassable'),
  /** How points are given: the map's projected CRS [m] or WGS84 longitude/latitude [°]. */
  coordinates: z.enum(['map', 'lonlat'], { error: 'must be one of map, lonlat' }).optional(),
  infestation: z.strictObject({
    places: z.array(PlaceSchema).min(1, { error: 'needs at least one infested place' }).max(100, { error: 'at most 100 infested places' }),
    density: valueSchema(FIELDS.infestedDensity).default(1),
  }),
  sites: z
    .array(z.strictObject({ name: z.string().min(1, { error: 'must not be empty' }).max(80), place: PlaceSchema }))
    .max(50, { error: 'at most 50 protected sites' })
    .default([]),
  bands: z
    .strictObject({
      costPerStem: valueSchema(FIELDS.costPerStem).optional(),
      costPerHa: valueSchema(LF.costPerHa).optional(),
      costUnit: z.string().max(12).optional(),
      options: z.array(BandOptionSchema).max(8, { error: 'at most 8 band options per scenario' }).default([]),
    })
    .default({ options: [] }),
  horizonYears: valueSchema(FIELDS.horizonYears),
  detectionLevel: valueSchema(FIELDS.detectionLevel).default(0.01),
  /** Time step [yr]; automatic when absent (the cell size is map.cellM). */
  numerics: z.strictObject({ stepYears: valueSchema(FIELDS.stepYears).optional() }).default({}),
  uncertainty: UncertaintySchema.optional(),
  /**
   * People carrying the pest (the transect's transport concept): on a map each trip heads in a random direction
   * and the map decides where it lands, so the transect's forward share and band width do not apply.
   */
  transport: TransportSchema.omit({ forwardShare: true, bandWidthKm: true }).optional(),
  /** Where fitted ranges came from (the map survey fit, server/analysis/calibration/map-fit.ts); the briefing shows it. */
  calibration: CalibrationNoteSchema.optional(),
});

function crossChecks(s: z.infer<typeof ObjectSchema>): Problem[] {
  const problems: Problem[] = [];
  if (s.map.format === 'geojson' && s.coordinates === 'map') {
    problems.push({ path: 'coordinates', value: 'map', message: 'a GeoJSON map has no projected CRS of its own (the tool chooses one): give points as "lonlat"' });
  }
  if (s.map.format === 'geotiff' && s.map.unit === 'basal-area-m2-per-ha' && s.map.basalAreaAtFullCover === undefined) {
    problems.push({ path: 'map.basalAreaAtFullCover', value: undefined, message: `is required when the unit is basal-area-m2-per-ha (${describeRange(LF.basalAreaFull)})` });
  }
  if (s.map.format === 'geotiff' && s.map.classes) {
    const seen = new Map<number, string>();
    for (const [cls, codes] of Object.entries(s.map.classes.codes)) {
      for (const c of codes) {
        if (seen.has(c)) problems.push({ path: `map.classes.codes.${cls}`, value: c, message: `code ${c} is already used for ${seen.get(c)}; each code names one class` });
        seen.set(c, cls);
      }
    }
  }
  const names = new Set<string>();
  s.sites.forEach((site, i) => {
    if (names.has(site.name)) problems.push({ path: `sites[${i}].name`, value: site.name, message: 'is used by another site; names must be unique' });
    names.add(site.name);
  });
  const optionNames = new Set<string>();
  s.bands.options.forEach((o, i) => {
    if (optionNames.has(o.name)) problems.push({ path: `bands.options[${i}].name`, value: o.name, message: 'is used by another option; names must be unique' });
    optionNames.add(o.name);
  });
  const usesNonHost =
    s.bands.options.some((o) => o.cover === 'non-host-forest') ||
    (s.map.format === 'geotiff' && (s.map.classes?.codes['non-host-forest'].length ?? 0) > 0);
  if (usesNonHost) problems.push(...nonHostPestProblems(s.pest, 'the map or an option has non-host forest'));
  return problems;
}

/** Problems for pest fields needed once non-host forest appears (the transect's rule; the loader applies it to GeoJSON stands). */
export function nonHostPestProblems(pest: Partial<Record<(typeof NON_HOST_PEST_FIELDS)[number], unknown>>, why: string): Problem[] {
  return NON_HOST_PEST_FIELDS.filter((f) => pest[f] === undefined).map((f) => ({
    path: `pest.${f}`,
    value: undefined,
    message: `is required because ${why} (${describeRange(FIELDS[f])})`,
  }));
}

/** The landscape scenario schema: one concept, shared by the form, the API, the CLI and scenario files. */
export const LandscapeScenarioSchema = ObjectSchema.superRefine((s, ctx) => {
  for (const p of crossChecks(s)) {
    ctx.addIssue({ code: 'custom', path: pathFromDotted(p.path), input: p.value, message: p.message });
  }
});

export type LandscapeScenario = z.infer<typeof LandscapeScenarioSchema>;
export type LandscapeScenarioInput = z.input<typeof LandscapeScenarioSchema>;
export type PointLandscapeScenario = Resolved<LandscapeScenario>;
export type Place = z.infer<typeof PlaceSchema>;
export type BandOption = z.infer<typeof BandOptionSchema>;
export type LandscapeMap = z.infer<typeof MapSchema>;

/** The coordinates rule in force: "map" for a GeoTIFF map unless set, always "lonlat" for a GeoJSON map. */
export function coordinatesOf(s: Pick<LandscapeScenario, 'coordinates' | 'map'>): 'map' | 'lonlat' {
  return s.coordinates ?? (s.map.format === 'geojson' ? 'lonlat' : 'map');
}

/** True when parsed JSON looks like a landscape scenario (so the CLI and the web pick this schema). */
export function isLandscapeInput(input: unknown): boolean {
  return typeof input === 'object' && input !== null && (input as { kind?: unknown }).kind === 'landscape';
}

/**
 * Validates untrusted input (parsed JSON, form data, API body).
 * @throws ScenarioError listing every problem with its field path, value and allowed range
 */
export function parseLandscapeScenario(input: unknown): LandscapeScenario {
  const r = LandscapeScenarioSchema.safeParse(input);
  if (!r.success) throw new ScenarioError(problemsFromZod(r.error.issues, input));
  return r.data;
}

/** The single-run scenario: each distribution replaced by its central value. */
export function pointLandscapeScenario(s: LandscapeScenario): PointLandscapeScenario {
  return resolveQuantities(s);
}
