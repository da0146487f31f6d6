import { z } from 'zod';
import { FIELDS, describeRange } from './fields.ts';
import { PestSchema, NON_HOST_PEST_FIELDS } from './pest.ts';
import { quantitySchema, valueSchema, resolveQuantities, type Resolved } from './quantity.ts';
import { ScenarioError, problemsFromZod, formatPath, pathFromDotted, type Problem } from './errors.ts';
import { JsonTextError, parseJsonText } from './json-text.ts';
import { textField } from './text.ts';

/** Habitat types a transect segment can have. */
export const HABITATS = ['host-forest', 'clearing', 'non-host-forest'] as const;
export type Habitat = (typeof HABITATS)[number];

/** What the ground of a barrier option becomes once the host trees are removed. */
export const BARRIER_COVERS = ['clearing', 'non-host-forest'] as const;

const optionalFrom = valueSchema(FIELDS.positionKm).optional();

export const HostForestSegmentSchema = z.strictObject({
  habitat: z.literal('host-forest'),
  name: textField(80).optional(),
  /** Start [km]; optional, checked against the end of the previous segment when given. */
  fromKm: optionalFrom,
  lengthKm: valueSchema(FIELDS.lengthKm),
  /** Relative host stocking, 0–1. */
  stocking: quantitySchema(FIELDS.stocking),
  /** Host stems per hectare at this stocking [trees/ha]. */
  stemsPerHa: quantitySchema(FIELDS.stemsPerHa),
});

export const OtherSegmentSchema = z.strictObject({
  habitat: z.enum(['clearing', 'non-host-forest']),
  name: textField(80).optional(),
  fromKm: optionalFrom,
  lengthKm: valueSchema(FIELDS.lengthKm),
});

export const SegmentSchema = z.discriminatedUnion('habitat', [HostForestSegmentSchema, OtherSegmentSchema], {
  error: `habitat must be one of ${HABITATS.join(', ')}`,
});

export const END_CONDITIONS = ['reflecting', 'absorbing'] as const;

export const TransectSchema = z.strictObject({
  /** Position of the first segment's start [km]. */
  originKm: valueSchema(FIELDS.positionKm).default(0),
  segments: z
    .array(SegmentSchema)
    .min(1, { error: 'needs at least one segment' })
    .max(500, { error: 'must have at most 500 segments' }),
  /** Transect ends: reflecting (no one leaves) by default; absorbing (lethal surroundings). */
  ends: z
    .strictObject({
      left: z.enum(END_CONDITIONS).default('reflecting'),
      right: z.enum(END_CONDITIONS).default('reflecting'),
    })
    .default({ left: 'reflecting', right: 'reflecting' }),
});

export const SiteSchema = z.strictObject({
  name: textField(80, { required: true }),
  atKm: valueSchema(FIELDS.positionKm),
});

export const BarrierOptionSchema = z.strictObject({
  name: textField(80, { required: true }),
  /** Start of the clearing along the transect [km]. */
  fromKm: valueSchema(FIELDS.positionKm),
  widthM: valueSchema(FIELDS.widthM),
  cover: z.enum(BARRIER_COVERS, { error: `must be one of ${BARRIER_COVERS.join(', ')}` }).default('clearing'),
});

export const BarrierSchema = z.strictObject({
  /** Length of the clearing across the direction of spread [km]. */
  lengthKm: valueSchema(FIELDS.barrierLengthKm),
  costPerStem: valueSchema(FIELDS.costPerStem).optional(),
  /** Currency or unit printed next to costs, e.g. "EUR" (free text). */
  costUnit: textField(12).optional(),
  options: z.array(BarrierOptionSchema).max(8, { error: 'at most 8 options per scenario' }).default([]),
  /** Tolerance of the critical-width bracket [m]; 10 m when absent (applied by the analysis). */
  toleranceM: valueSchema(FIELDS.widthToleranceM).optional(),
  /** Widths of the width–delay curve [m]; automatic (five widths up to twice the option's or 1.5 × the critical width) when absent. */
  curveWidthsM: z
    .array(valueSchema(FIELDS.widthM))
    .min(1, { error: 'needs at least one width' })
    .max(20, { error: 'at most 20 widths' })
    .optional(),
});

/** A periodic thinning pattern (strip thinning): host-forest strips alternating with host-free strips. */
export const MosaicSchema = z.strictObject({
  name: textField(80, { required: true }),
  /** Host-forest strip width along the direction of spread [m]. */
  forestM: valueSchema(FIELDS.widthM),
  /** Host-free strip width [m]. */
  gapM: valueSchema(FIELDS.widthM),
  cover: z.enum(BARRIER_COVERS, { error: `must be one of ${BARRIER_COVERS.join(', ')}` }).default('clearing'),
  /** Host stocking of the forest strips, 0–1 (1 when absent). */
  stocking: valueSchema(FIELDS.stocking).optional(),
  /** Also simulate a long pattern and measure the speed (default true). */
  measure: z.boolean().optional(),
});

export const NumericsSchema = z.strictObject({
  /** Largest cell [m]; automatic when absent. */
  cellM: valueSchema(FIELDS.cellM).optional(),
  /** Fixed time step [yr]; absent: error-controlled steps at `tolerance`. */
  stepYears: valueSchema(FIELDS.stepYears).optional(),
  /** Relative tolerance of the error-controlled time stepping (default in problem/resolution.ts); ignored with a fixed stepYears. */
  tolerance: valueSchema(FIELDS.tolerance).optional(),
});

/**
 * Ensemble over the uncertain parameters (issue 6). Present: every distribution in the scenario is drawn
 * by Latin hypercube sampling; absent: single runs at the central values only.
 */
export const UncertaintySchema = z.strictObject({
  draws: valueSchema(FIELDS.ensembleDraws).int({ error: 'must be a whole number' }).default(1000),
  seed: valueSchema(FIELDS.ensembleSeed).int({ error: 'must be a whole number' }).default(1),
  /** Probability standard error above which the result asks for more draws. */
  targetStandardError: valueSchema(FIELDS.targetStandardError).default(0.02),
  /** Compute each draw's critical width for every option (needs the barrier analysis; the costly part). */
  criticalWidth: z.boolean().default(true),
  /**
   * Draws use cells and steps this many times the automatic choice (numerics set in the scenario are kept).
   * Absent: 3 on a transect (TRANSECT_DRAW_FACTOR), 4 × the transect step rule on a map (DRAW_STEP_FACTOR).
   */
  resolutionFactor: valueSchema(FIELDS.ensembleResolutionFactor).optional(),
});

/** Distance kernel of human-carried introductions: exponential by mean, or a user table of distance vs share carried farther. */
export const TransportKernelSchema = z.discriminatedUnion(
  'shape',
  [
    z.strictObject({ shape: z.literal('exponential'), meanKm: quantitySchema(FIELDS.transportMeanKm) }),
    z
      .strictObject({
        shape: z.literal('table'),
        /** Rows (distance [km], share of introductions carried farther); piecewise linear in between, 0 beyond the last row. */
        points: z
          .array(z.strictObject({ distanceKm: valueSchema(FIELDS.transportDistanceKm), shareBeyond: valueSchema(FIELDS.shareBeyond) }))
          .min(2, { error: 'needs at least two rows' })
          .max(200, { error: 'must have at most 200 rows' }),
      })
      .superRefine((k, ctx) => {
        k.points.forEach((p, i) => {
          if (i === 0 && (p.distanceKm !== 0 || p.shareBeyond !== 1)) {
            ctx.addIssue({ code: 'custom', path: ['points', 0], input: p, message: 'the first row must be {"distanceKm": 0, "shareBeyond": 1}' });
          }
          if (i > 0 && !(p.distanceKm > k.points[i - 1].distanceKm)) {
            ctx.addIssue({ code: 'custom', path: ['points', i, 'distanceKm'], input: p.distanceKm, message: `must be greater than the previous row's ${k.points[i - 1].distanceKm}` });
          }
          if (i > 0 && p.shareBeyond > k.points[i - 1].shareBeyond) {
            ctx.addIssue({ code: 'custom', path: ['points', i, 'shareBeyond'], input: p.shareBeyond, message: `must not exceed the previous row's ${k.points[i - 1].shareBeyond} (a share carried farther cannot grow with distance)` });
          }
        });
      }),
  ],
  { error: 'shape must be one of exponential, table' },
);

/**
 * Human-carried long-distance introductions (stratified dispersal; Shigesada, Kawasaki & Takeda 1995).
 * Introductions start at `ratePerKm2Year` per km² of infested forest, travel a kernel distance, head towards
 * the protected side with probability `forwardShare` and found a colony with `establishmentProbability`.
 */
export const TransportSchema = z.strictObject({
  ratePerKm2Year: quantitySchema(FIELDS.transportRate),
  kernel: TransportKernelSchema,
  establishmentProbability: quantitySchema(FIELDS.establishmentProbability),
  forwardShare: valueSchema(FIELDS.forwardShare).default(0.5),
  /** Width of the band the transect stands for [km]; the barrier length across the front when absent. */
  bandWidthKm: valueSchema(FIELDS.bandWidthKm).optional(),
});

/** Provenance of parameters fitted to survey records: the sentence the briefing shows beside them. */
export const CalibrationNoteSchema = z.strictObject({
  sentence: z.string().min(1, { error: 'must not be empty' }).max(400, { error: 'must be at most 400 characters' }),
  /** Dotted paths of the fitted parameters, e.g. "pest.diffusionHost". */
  paths: z.array(z.string().max(100)).max(12, { error: 'at most 12 paths' }).default([]),
  records: z.number().int().gte(0).optional(),
  detections: z.number().int().gte(0).optional(),
  firstYear: z.number().int().optional(),
  lastYear: z.number().int().optional(),
});

/** Current version of the scenario file format. */
export const SCENARIO_VERSION = 1;

const ScenarioObjectSchema = z.strictObject({
  version: z.literal(SCENARIO_VERSION, { error: `must be ${SCENARIO_VERSION}` }).default(SCENARIO_VERSION),
  title: textField(300, { required: true }),
  description: textField(4000, { multiline: true }).default(''),
  region: textField(200).optional(),
  pest: PestSchema,
  transect: TransectSchema,
  infestation: z.strictObject({
    fromKm: valueSchema(FIELDS.positionKm),
    toKm: valueSchema(FIELDS.positionKm),
    density: valueSchema(FIELDS.infestedDensity).default(1),
  }),
  sites: z.array(SiteSchema).max(50, { error: 'at most 50 protected sites' }).default([]),
  barrier: BarrierSchema.optional(),
  horizonYears: valueSchema(FIELDS.horizonYears),
  detectionLevel: valueSchema(FIELDS.detectionLevel).default(0.01),
  numerics: NumericsSchema.default({}),
  /** Thinning patterns whose asymptotic spread rate to report. */
  mosaics: z.array(MosaicSchema).max(6, { error: 'at most 6 mosaics per scenario' }).optional(),
  uncertainty: UncertaintySchema.optional(),
  transport: TransportSchema.optional(),
  /** Where fitted ranges came from (written by the survey fit, server/analysis/calibration/fit.ts); shown in the briefing's parameter table. */
  calibration: CalibrationNoteSchema.optional(),
});

/** Segment end positions [km] (originKm, then the running sum of lengths). */
export function segmentBreaks(transect: { originKm: number; segments: { lengthKm: number }[] }): number[] {
  const breaks = [transect.originKm];
  for (const s of transect.segments) breaks.push(breaks[breaks.length - 1] + s.lengthKm);
  return breaks;
}

/** Positions are compared with this slack [km] (1 mm) so that decimal input is not rejected for round-off. */
const POSITION_SLACK_KM = 1e-6;

/** Cross-field rules that a single field cannot express. Returns problems; empty when consistent. */
function crossChecks(s: z.infer<typeof ScenarioObjectSchema>): Problem[] {
  const problems: Problem[] = [];
  const breaks = segmentBreaks(s.transect);
  const start = breaks[0];
  const end = breaks[breaks.length - 1];
  const within = `within the transect [${round(start)}, ${round(end)}] km`;
  s.transect.segments.forEach((seg, k) => {
    if (seg.fromKm !== undefined && Math.abs(seg.fromKm - breaks[k]) > POSITION_SLACK_KM) {
      const kind = seg.fromKm < breaks[k] ? 'overlaps the previous segment' : 'leaves a gap after the previous segment';
      problems.push({
        path: `transect.segments[${k}].fromKm`,
        value: seg.fromKm,
        message: `${kind}: segments are contiguous, so this one must start at ${round(breaks[k])} km`,
      });
    }
  });
  const inf = s.infestation;
  if (!(inf.toKm > inf.fromKm)) {
    problems.push({ path: 'infestation.toKm', value: inf.toKm, message: `must be greater than infestation.fromKm (${inf.fromKm})` });
  }
  for (const key of ['fromKm', 'toKm'] as const) {
    const v = inf[key];
    if (v < start - POSITION_SLACK_KM || v > end + POSITION_SLACK_KM) {
      problems.push({ path: `infestation.${key}`, value: v, message: `must be ${within}` });
    }
  }
  const hostInInfestation = s.transect.segments.some(
    (seg, k) => seg.habitat === 'host-forest' && breaks[k] < inf.toKm && breaks[k + 1] > inf.fromKm,
  );
  if (!hostInInfestation) {
    problems.push({ path: 'infestation', value: { fromKm: inf.fromKm, toKm: inf.toKm }, message: 'must overlap at least one host-forest segment' });
  }
  const names = new Set<string>();
  s.sites.forEach((site, i) => {
    if (site.atKm < start - POSITION_SLACK_KM || site.atKm > end + POSITION_SLACK_KM) {
      problems.push({ path: `sites[${i}].atKm`, value: site.atKm, message: `must be ${within}` });
    } else if (site.atKm >= inf.fromKm && site.atKm <= inf.toKm) {
      problems.push({
        path: `sites[${i}].atKm`,
        value: site.atKm,
        message: `lies inside the current infestation [${inf.fromKm}, ${inf.toKm}] km; a protected site must be outside it`,
      });
    }
    if (names.has(site.name)) problems.push({ path: `sites[${i}].name`, value: site.name, message: 'is used by another site; names must be unique' });
    names.add(site.name);
  });
  const usesNonHost =
    s.transect.segments.some((seg) => seg.habitat === 'non-host-forest') ||
    (s.barrier?.options ?? []).some((o) => o.cover === 'non-host-forest') ||
    (s.mosaics ?? []).some((m) => m.cover === 'non-host-forest');
  if (usesNonHost) {
    for (const f of NON_HOST_PEST_FIELDS) {
      if (s.pest[f] === undefined) {
        problems.push({
          path: `pest.${f}`,
          value: undefined,
          message: `is required because the layout or an option has non-host forest (${describeRange(FIELDS[f])})`,
        });
      }
    }
  }
  const optionNames = new Set<string>();
  (s.barrier?.options ?? []).forEach((o, i) => {
    problems.push(...optionPlacementProblems(o, `barrier.options[${i}]`, [start, end], inf));
    if (optionNames.has(o.name)) problems.push({ path: `barrier.options[${i}].name`, value: o.name, message: 'is used by another option; names must be unique' });
    optionNames.add(o.name);
  });
  return problems;
}

/**
 * Where a clearing may go: within the transect [start, end] km and clear of the current infestation. Shared
 * by the scenario schema and by callers that build options in code (widths are checked by the schema).
 */
export function optionPlacementProblems(
  o: { fromKm: number; widthM: number },
  path: string,
  [start, end]: readonly [number, number],
  inf: { fromKm: number; toKm: number },
): Problem[] {
  const to = o.fromKm + o.widthM / 1000;
  if (o.fromKm < start - POSITION_SLACK_KM || to > end + POSITION_SLACK_KM) {
    return [{ path: `${path}.fromKm`, value: o.fromKm, message: `the clearing [${round(o.fromKm)}, ${round(to)}] km must lie within the transect [${round(start)}, ${round(end)}] km` }];
  }
  if (o.fromKm < inf.toKm && to > inf.fromKm) {
    return [{ path: `${path}.fromKm`, value: o.fromKm, message: `the clearing [${round(o.fromKm)}, ${round(to)}] km overlaps the current infestation [${inf.fromKm}, ${inf.toKm}] km` }];
  }
  return [];
}

function round(x: number): number {
  return Math.round(x * 1e6) / 1e6;
}

/** The scenario schema: one concept, shared by the form, the API, the CLI and scenario files. */
export const ScenarioSchema = ScenarioObjectSchema.superRefine((s, ctx) => {
  for (const p of crossChecks(s)) {
    ctx.addIssue({ code: 'custom', path: pathFromDotted(p.path), input: p.value, message: p.message });
  }
});

/** A validated scenario; numeric parameters may still be distributions. */
export type Scenario = z.infer<typeof ScenarioSchema>;
/** What a scenario file may contain (before defaults are filled in). */
export type ScenarioInput = z.input<typeof ScenarioSchema>;
/** A scenario with every distribution replaced by a number, ready to simulate. */
export type PointScenario = Resolved<Scenario>;

/**
 * Validates untrusted input (parsed JSON, form data turned into an object, API body).
 * @throws ScenarioError listing every problem with its field path, value and allowed range
 */
export function parseScenario(input: unknown): Scenario {
  const r = ScenarioSchema.safeParse(input);
  if (!r.success) throw new ScenarioError(problemsFromZod(r.error.issues, input));
  return r.data;
}

/**
 * Parses scenario JSON text (model/json-text.ts: a byte-order mark is dropped; a syntax error is reported with
 * its line and column; duplicate keys, `__proto__`/`constructor`/`prototype` keys and numbers that would
 * change on reading are refused), then validates it.
 * @throws ScenarioError listing every problem
 */
export function parseScenarioText(text: string): Scenario {
  let raw: unknown;
  try {
    raw = parseJsonText(text);
  } catch (e) {
    if (!(e instanceof JsonTextError)) throw e;
    throw new ScenarioError(
      e.problems.map((p) =>
        p.path === '' && p.value === '(empty)'
          ? { ...p, value: '(empty file)', message: `${p.message}; a scenario file is one JSON object` }
          : p.path === ''
            ? { ...p, message: `${p.message}; a scenario file is one JSON object` }
            : p,
      ),
    );
  }
  return parseScenario(raw);
}

/** The single-run scenario: each distribution replaced by its central value. */
export function pointScenario(s: Scenario): PointScenario {
  return resolveQuantities(s);
}

export { formatPath };
