/**
 * The words and table rows of the briefing, as plain data (no PDF): the question, one bottom line per option,
 * verdict labels, the options and arrivals tables, the parameters table with the source of each value, and a
 * reader for the uncertainty section. Kept apart from the drawing code so the web pages can reuse them and
 * tests can check them directly.
 *
 * Just over 400 lines: every sentence and row of the briefing in one file, so a wording is found and
 * changed in one place (the web pages reuse them).
 */
import type { OptionResult, ResultDocument, RunResult, VerdictKind } from '../analysis/result.ts';
import { CAUTIONS, MODEL_LIMITS, allCautions } from '../analysis/evaluate/cautions.ts';
import { stemsRemoved } from '../problem/layout.ts';
import { valueAt } from '../model/errors.ts';
import { FIELDS, type FieldSpec } from '../model/fields.ts';
import { centralValue, isDistribution, listUncertain } from '../model/quantity.ts';
import { pointScenario, segmentBreaks, type Scenario } from '../model/scenario.ts';
import { distributionText, fixed, integer, km, num, percent, probabilityEstimate, speed, years } from './format.ts';
import { optionKey } from './charts/styles.ts';
import { alleeThresholdText, VERDICT_PLAIN } from './decision.ts';

/** Short verdict labels for tables. */
export const VERDICT_LABELS: Record<VerdictKind, string> = {
  holds: 'holds',
  marginal: 'marginal: cannot be called',
  'not-crossed': 'not crossed within the horizon',
  delays: 'delays',
  'speeds-up': 'SPEEDS UP spread',
  'no-change': 'no change',
  'not-reached': 'not reached',
};

/** True when the barrier analysis has filled the option (verdict and site verdicts present). */
export function hasVerdict(o: OptionResult): boolean {
  return typeof o.verdict?.sentence === 'string' && typeof o.verdict?.kind === 'string';
}

function list(names: string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** The question the briefing answers, in one or two sentences. */
export function questionText(doc: ResultDocument): string {
  const where = doc.region ? ` in ${doc.region}` : '';
  const from = doc.infestation ? ` from the current infestation (km ${num(doc.infestation.fromKm, 4)}–${num(doc.infestation.toKm, 4)})` : '';
  const sites = doc.baseline.arrivals.map((a) => a.name);
  const toward = sites.length ? ` towards ${sites.length > 4 ? `${sites.length} protected sites` : list(sites)}` : '';
  const n = doc.options.length;
  const opts = n === 0 ? 'No clearing options were given, so this briefing shows the spread as things stand.' : `The briefing compares ${n === 1 ? 'one clearing option' : `${n} clearing options`} with doing nothing.`;
  return (
    `Will cutting a host-free clearing across the forest${where} stop ${doc.pest.name} spreading${from}${toward}, ` +
    `how wide must it be, and what does each option buy within ${num(doc.horizonYears, 4)} years? ${opts}`
  );
}

/** Where the front gets to without any clearing, in one sentence. */
export function baselineLine(doc: ResultDocument): string {
  const b = doc.baseline;
  if (!b.arrivals.length) {
    const r = b.spreadRates.find((s) => s.kmPerYear !== null);
    return r ? `Without a clearing the front advances at about ${speed(r.kmPerYear)}.` : `Without a clearing the front does not travel far enough within ${num(doc.horizonYears, 4)} years to measure a spread rate.`;
  }
  const parts = b.arrivals.map((a) => (a.arrivalYears === null ? `${a.name} not within ${num(doc.horizonYears, 4)} years` : `${a.name} in year ${years(a.arrivalYears)}`));
  return `Without a clearing the pest reaches ${list(parts)}.`;
}

/** Trees removed by an option: from the result, or from the scenario's layout when the result lacks it. */
export function treesOf(o: OptionResult, scenario?: Scenario): { stems: number; cost: number | null; unit: string | null } | null {
  if (o.trees && Number.isFinite(o.trees.stemsRemoved)) return { stems: o.trees.stemsRemoved, cost: o.trees.cost, unit: o.trees.costUnit };
  if (!scenario) return null;
  const s = pointScenario(scenario);
  const stems = stemsRemoved(s, o, s.barrier?.lengthKm ?? 1);
  const perStem = s.barrier?.costPerStem;
  return { stems, cost: perStem === undefined ? null : stems * perStem, unit: s.barrier?.costUnit ?? null };
}

/** "20 160 host trees (705 600 credits)". */
export function treesText(t: ReturnType<typeof treesOf>): string {
  if (!t) return 'trees removed: not computed';
  return `${integer(t.stems)} host trees${t.cost !== null ? ` (cost ${integer(t.cost)}${t.unit ? ` ${t.unit}` : ''})` : ''}`;
}

/** How an option is described in headings: "A  Wide cut at km 6 — 800 m clearing from km 6". */
export function optionHeading(o: OptionResult, k: number): string {
  return `${optionKey(k)}  ${o.name} — ${metres(o.widthM)} m ${o.cover === 'non-host-forest' ? 'of non-host forest' : 'clearing'} from km ${num(o.fromKm, 4)}`;
}

/**
 * The bottom line of one option: the verdict sentence when the barrier analysis ran, otherwise the arrival
 * times with and without it (the facts available), said plainly.
 */
export function bottomLine(doc: ResultDocument, o: OptionResult): string {
  if (hasVerdict(o)) return o.verdict.sentence;
  const parts = o.run.arrivals.map((a, i) => {
    const b = doc.baseline.arrivals[i]?.arrivalYears ?? null;
    const with_ = a.arrivalYears === null ? `not within ${num(doc.horizonYears, 4)} years` : `year ${years(a.arrivalYears)}`;
    const without = b === null ? `not within ${num(doc.horizonYears, 4)} years` : `year ${years(b)}`;
    return `${a.name}: ${with_} (without the clearing: ${without})`;
  });
  return `No verdict in this result (the barrier analysis did not run). ${parts.length ? `Arrival with this option — ${parts.join('; ')}.` : ''}`.trim();
}

/** A width in metres: whole metres from 100 m up, else 3 significant digits. */
export function metres(x: number): string {
  return Math.abs(x) >= 100 ? integer(x) : num(x, 3);
}

/** Critical width as a short cell: "380–420 m (phase-plane 401 m)". */
export function criticalWidthText(o: OptionResult): string {
  const c = o.criticalWidth;
  if (!c) return 'not computed';
  if (!c.applicable) return 'no width stops it (no Allee effect)';
  const label = c.phasePlaneAssumesIntactHosts ? 'quick estimate with hosts held at present stocking' : 'quick estimate';
  const pp = c.phasePlaneM !== null && Number.isFinite(c.phasePlaneM) ? ` (${label} ${metres(c.phasePlaneM)} m)` : '';
  if (!c.bracketM) return `not found${pp}`;
  return `${metres(c.bracketM[1])} m; through at ${metres(c.bracketM[0])} m${pp}`;
}

/** One row of the options table. */
export interface OptionRow {
  key: string;
  name: string;
  width: string;
  trees: string;
  cost: string;
  verdict: string;
  critical: string;
}

export function optionRows(doc: ResultDocument, scenario?: Scenario): OptionRow[] {
  return doc.options.map((o, k) => {
    const t = treesOf(o, scenario);
    return {
      key: optionKey(k),
      name: `${o.name}${o.cover === 'non-host-forest' ? ' (non-host forest)' : ''}`,
      width: num(o.widthM, 4),
      trees: t ? integer(t.stems) : '—',
      cost: t && t.cost !== null ? `${integer(t.cost)}${t.unit ? ` ${t.unit}` : ''}` : '—',
      verdict: hasVerdict(o) ? VERDICT_PLAIN[o.verdict.kind] ?? o.verdict.kind : 'no verdict (analysis not run)',
      critical: criticalWidthText(o),
    };
  });
}

/** Arrival cell for one site and run: the year ("24.1") and, for options, the change against the baseline ("+6.2 yr", "±0 yr" for no change). */
export function arrivalCell(run: Pick<RunResult, 'arrivals'>, i: number, baseline: Pick<RunResult, 'arrivals'> | null, o?: OptionResult): string {
  const a = run.arrivals[i]?.arrivalYears ?? null;
  const main = a === null ? 'not reached' : years(a);
  if (!baseline) return main;
  const site = o?.sites?.[i];
  const delay = site ? site.delayYears : a !== null && baseline.arrivals[i]?.arrivalYears != null ? a - (baseline.arrivals[i].arrivalYears as number) : null;
  if (delay === null || !Number.isFinite(delay)) return main;
  if (Math.abs(delay) < 0.05) return `${main}\n±0 yr`;
  return `${main}\n${delay > 0 ? '+' : '−'}${fixed(Math.abs(delay), 1)} yr`;
}

// ---------------------------------------------------------------------------------------------------
// Parameters table

/** Unit cell of a number without a unit (a share, a count, a choice): words, not a dash. */
export const NO_UNIT = 'no unit';

export interface ParameterRow {
  /** Group heading the row belongs to. */
  group: string;
  label: string;
  value: string;
  unit: string;
  source: string;
}

/** A value or distribution as text: "0.8", "uniform 0.5–1.5 (midpoint 1 used)". */
export function quantityText(q: unknown): string {
  if (typeof q === 'number') return num(q, 4);
  if (isDistribution(q)) {
    const used = q.dist === 'uniform' ? `midpoint ${num(centralValue(q), 4)}` : q.dist === 'triangular' ? 'most likely value' : 'median';
    return `${distributionText(q)} (${used} used)`;
  }
  if (typeof q === 'string') return q;
  return '—';
}

/**
 * Where a value comes from: "illustrative" for the pest profile of an invented example; with the raw input,
 * "entered" when the user gave it and "default — <source>" when the schema filled it in; without the raw
 * input, values equal to the default are marked as possibly defaulted.
 */
export function sourceText(spec: FieldSpec | null, path: (string | number)[], value: unknown, ctx: { raw?: unknown; illustrativePest: boolean }): string {
  const typical = spec && spec.typical && !/^within|^programme/.test(spec.typical) ? `; typical ${spec.typical}` : '';
  if (ctx.illustrativePest && path[0] === 'pest') return 'illustrative (invented profile, not field data)';
  if (ctx.raw !== undefined) {
    if (valueAt(ctx.raw, path) !== undefined) return `entered${typical}`;
    if (spec?.defaultValue !== undefined) return `default — ${spec.source}`;
    return 'default';
  }
  if (spec?.defaultValue !== undefined && value === spec.defaultValue) return `entered, or the default — ${spec.source}`;
  return `entered${typical}`;
}

/** Rows of the parameters table for a validated scenario (raw input optional, see `sourceText`). */
export function parameterRows(scenario: Scenario, raw?: unknown, used?: RunResult['numerics']): ParameterRow[] {
  const rows: ParameterRow[] = [];
  const ctx = { raw, illustrativePest: scenario.pest.illustrative };
  const add = (group: string, path: (string | number)[], spec: FieldSpec | null, label?: string, unit?: string) => {
    const v = valueAt(scenario, path);
    if (v === undefined) return;
    // A value fitted to survey records says so ("fitted to 37 detections, 2019–2025"; analysis/calibration/fit.ts);
    // adoption always writes a distribution, so a value since replaced by a plain number is no longer the fit's.
    const fitted = scenario.calibration?.paths.includes(path.join('.')) && isDistribution(v) ? scenario.calibration.sentence : undefined;
    rows.push({ group, label: label ?? spec?.label ?? String(path[path.length - 1]), value: quantityText(v), unit: unit ?? (spec?.unit || NO_UNIT), source: fitted ?? sourceText(spec, path, v, ctx) });
  };
  const pest = 'Pest profile';
  add(pest, ['pest', 'diffusionHost'], FIELDS.diffusionHost);
  add(pest, ['pest', 'diffusionOpen'], FIELDS.diffusionOpen);
  add(pest, ['pest', 'diffusionNonHost'], FIELDS.diffusionNonHost);
  add(pest, ['pest', 'edgePreferenceOpen'], FIELDS.edgePreferenceOpen);
  add(pest, ['pest', 'edgePreferenceNonHost'], FIELDS.edgePreferenceNonHost);
  const g = scenario.pest.growth;
  rows.push({ group: pest, label: 'Growth form', value: g.form + (g.form === 'mate-finding' ? ` (mating: ${g.mating})` : ''), unit: NO_UNIT, source: sourceText(null, ['pest', 'growth', 'form'], g.form, ctx) });
  if (g.form === 'logistic' || g.form === 'allee-cubic') add(pest, ['pest', 'growth', 'rate'], FIELDS.growthRate);
  if (g.form === 'allee-cubic') add(pest, ['pest', 'growth', 'alleeThreshold'], FIELDS.alleeThreshold);
  if (g.form === 'mate-finding') {
    add(pest, ['pest', 'growth', 'birthRate'], FIELDS.birthRate);
    add(pest, ['pest', 'growth', 'deathRate'], FIELDS.deathRate);
    add(pest, ['pest', 'growth', 'crowding'], FIELDS.crowding);
    add(pest, ['pest', 'growth', 'mateScale'], FIELDS.mateScale);
  }
  add(pest, ['pest', 'hostKillRate'], FIELDS.hostKillRate);
  add(pest, ['pest', 'mortalityOpen'], FIELDS.mortalityOpen);
  add(pest, ['pest', 'mortalityNonHost'], FIELDS.mortalityNonHost);
  const now = 'Infestation and sites';
  add(now, ['infestation', 'fromKm'], FIELDS.positionKm, 'Infested stretch starts at');
  add(now, ['infestation', 'toKm'], FIELDS.positionKm, 'Infested stretch ends at');
  add(now, ['infestation', 'density'], FIELDS.infestedDensity);
  scenario.sites.forEach((s, i) => add(now, ['sites', i, 'atKm'], FIELDS.positionKm, `Site “${s.name}” at`));
  const bar = 'Barrier options';
  if (scenario.barrier) {
    add(bar, ['barrier', 'lengthKm'], FIELDS.barrierLengthKm);
    add(bar, ['barrier', 'costPerStem'], FIELDS.costPerStem, undefined, scenario.barrier.costUnit ? `${scenario.barrier.costUnit} per tree` : 'per tree');
    scenario.barrier.options.forEach((o, k) => {
      add(bar, ['barrier', 'options', k, 'fromKm'], FIELDS.positionKm, `${optionKey(k)} “${o.name}” starts at`);
      add(bar, ['barrier', 'options', k, 'widthM'], FIELDS.widthM, `${optionKey(k)} width`);
    });
  }
  if (scenario.transport) {
    const tr = 'People moving infested wood (transport)';
    const t = scenario.transport;
    add(tr, ['transport', 'ratePerKm2Year'], FIELDS.transportRate);
    if (t.kernel.shape === 'exponential') add(tr, ['transport', 'kernel', 'meanKm'], FIELDS.transportMeanKm);
    else rows.push({ group: tr, label: 'Distance table', value: `${t.kernel.points.length} rows up to ${num(t.kernel.points[t.kernel.points.length - 1].distanceKm, 4)} km`, unit: 'km', source: sourceText(null, ['transport', 'kernel'], t.kernel, ctx) });
    add(tr, ['transport', 'establishmentProbability'], FIELDS.establishmentProbability);
    add(tr, ['transport', 'forwardShare'], FIELDS.forwardShare);
    add(tr, ['transport', 'bandWidthKm'], FIELDS.bandWidthKm);
  }
  if (scenario.uncertainty) {
    const un = 'Uncertainty analysis';
    add(un, ['uncertainty', 'draws'], FIELDS.ensembleDraws);
    add(un, ['uncertainty', 'seed'], FIELDS.ensembleSeed);
    add(un, ['uncertainty', 'targetStandardError'], FIELDS.targetStandardError);
    rows.push({ group: un, label: 'Critical width per draw', value: scenario.uncertainty.criticalWidth ? 'yes' : 'no', unit: NO_UNIT, source: sourceText(null, ['uncertainty', 'criticalWidth'], scenario.uncertainty.criticalWidth, ctx) });
  }
  const run = 'Run settings';
  add(run, ['horizonYears'], FIELDS.horizonYears);
  add(run, ['detectionLevel'], FIELDS.detectionLevel);
  const numerics = scenario.numerics ?? {};
  const auto = 'chosen by the tool from the movement lengths and rates';
  const cellUsed = used ? ` (${num(used.cellKmMin * 1000)}–${num(used.cellKmMax * 1000)} used)` : '';
  if (numerics.cellM === undefined) rows.push({ group: run, label: FIELDS.cellM.label, value: `automatic${cellUsed}`, unit: FIELDS.cellM.unit, source: auto });
  else add(run, ['numerics', 'cellM'], FIELDS.cellM);
  const stepUsed = used ? ` (${num(used.stepYears)} used)` : '';
  if (numerics.stepYears === undefined) rows.push({ group: run, label: FIELDS.stepYears.label, value: `automatic${stepUsed}`, unit: FIELDS.stepYears.unit, source: auto });
  else add(run, ['numerics', 'stepYears'], FIELDS.stepYears);
  rows.push({ group: run, label: 'Transect ends', value: `left ${scenario.transect.ends.left}, right ${scenario.transect.ends.right}`, unit: NO_UNIT, source: valueAt(raw, ['transect', 'ends']) !== undefined || raw === undefined ? 'entered or default (reflecting)' : 'default (reflecting: no insect leaves)' });
  return rows;
}

/** Rows of the transect table: one per segment. */
export interface SegmentRow {
  name: string;
  habitat: string;
  span: string;
  stocking: string;
  stems: string;
}

export function segmentRows(scenario: Scenario): SegmentRow[] {
  const breaks = segmentBreaks(pointScenario(scenario).transect);
  return scenario.transect.segments.map((s, k) => ({
    name: s.name ?? `segment ${k + 1}`,
    habitat: s.habitat.replace(/-/g, ' '),
    span: `${km(breaks[k])}–${km(breaks[k + 1])}`,
    stocking: s.habitat === 'host-forest' ? quantityText(s.stocking) : '—',
    stems: s.habitat === 'host-forest' ? quantityText(s.stemsPerHa) : '—',
  }));
}

/** Paths of the parameters given as distributions (what "taken as exact" refers to). */
export function uncertainPaths(scenario: Scenario): string[] {
  return listUncertain(scenario).map((e) => e.path.reduce<string>((s, p) => (typeof p === 'number' ? `${s}[${p}]` : s ? `${s}.${p}` : p), ''));
}

// ---------------------------------------------------------------------------------------------------
// Limits and cautions

/** Splits the document's cautions into model limits and practical cautions (unknown items count as cautions). */
export function splitCautions(doc: Pick<ResultDocument, 'cautions'>): { limits: string[]; cautions: string[] } {
  const list = doc.cautions?.length ? doc.cautions : allCautions();
  const limits = list.filter((c) => MODEL_LIMITS.includes(c));
  const cautions = list.filter((c) => !MODEL_LIMITS.includes(c));
  // Every briefing carries the practical cautions, even from a document written before they were added.
  for (const c of CAUTIONS) if (!cautions.includes(c)) cautions.push(c);
  return { limits, cautions };
}

/** Plain-words model facts for the assumptions section. */
export function modelFactLines(doc: ResultDocument): string[] {
  const m = doc.model;
  const out: string[] = [];
  const growth: Record<string, string> = {
    logistic: 'Growth is logistic: even a few insects multiply, so in this model no finite clearing can stop the pest for good; clearings can only delay it.',
    'allee-cubic': 'Growth has a strong Allee effect: small groups decline because mates are hard to find, which is what allows a wide enough clearing to stop the front.',
    'mate-finding': 'Growth follows a consumer–resource model with mate-finding limitation.',
  };
  out.push(growth[m.growthForm] ?? `Growth form: ${m.growthForm}.`);
  out.push(`Per-capita growth at low density in intact forest: ${num(m.lowDensityRate)} per year${m.lowDensityRate < 0 ? ' (negative: a strong Allee effect)' : ''}.`);
  out.push(`Density below which a group of insects declines (Allee threshold): ${alleeThresholdText(m.alleeThreshold)}.`);
  if (m.linearSpeedKmPerYear > 0) out.push(`Spread speed expected in intact host forest from the linear theory (2√(D r)): ${speed(m.linearSpeedKmPerYear)}.`);
  out.push(m.hostDepletion ? 'The pest kills its host trees as it passes (host depletion is part of the model).' : 'Host trees are not depleted in this run.');
  out.push(`Front position and arrival use a detection level of ${percent(doc.detectionLevel, doc.detectionLevel < 0.01 ? 1 : 0)} of capacity; real surveys find infestations later than this.`);
  return out;
}

/** Numerical facts of the runs, and warnings for runs that did not complete. */
export function numericsLines(doc: ResultDocument): string[] {
  const b = doc.baseline.numerics;
  const out = [
    `Each run solves the model on ${integer(b.nCells)} cells (${num(b.cellKmMin * 1000)}–${num(b.cellKmMax * 1000)} m) with a time step of ${num(b.stepYears)} years${b.autoCell && b.autoStep ? ' (both chosen automatically)' : ''}.`,
  ];
  const runs: [string, RunResult][] = [['baseline', doc.baseline], ...doc.options.map((o, k): [string, RunResult] => [`option ${optionKey(k)}`, o.run])];
  for (const [name, r] of runs) {
    if (r.numerics.status !== 'completed') out.push(`WARNING: the ${name} run ${r.numerics.status} at year ${years(r.endYears)}: ${r.numerics.message}. Its results cover only that period.`);
  }
  return out;
}

// ---------------------------------------------------------------------------------------------------
// Uncertainty (filled by the ensemble analysis); read defensively so the briefing survives layout changes.

export interface UncertaintyView {
  draws: number;
  completed: number;
  status: string;
  parameters: { label: string; unit: string; distribution: string }[];
  options: { name: string; holds: string; holdsWithTransport: string | null; holds90: string; holds95: string; crossing: string; sentences: string[] }[];
  convergence: string | null;
}

const isObj = (x: unknown): x is Record<string, unknown> => typeof x === 'object' && x !== null && !Array.isArray(x);
const numOr = (x: unknown): number | null => (typeof x === 'number' && Number.isFinite(x) ? x : null);

/** Reads the uncertainty section; null when absent or in a layout this version does not know. */
export function readUncertainty(u: unknown): UncertaintyView | null {
  if (!isObj(u) || !Array.isArray(u.options)) return null;
  const prob = (p: unknown) => (isObj(p) && numOr(p.p) !== null ? probabilityEstimate(p as { p: number; standardError: number; interval95?: [number, number] }, 0) : '—');
  const widthText = (x: unknown) => (numOr(x) !== null ? `${num(x as number, 4)} m` : 'beyond the range searched');
  const quant = (q: unknown) => {
    if (!isObj(q)) return '—';
    const med = numOr(q.median);
    if (med === null) return 'beyond the horizon in most draws';
    const lo = numOr(q.p05);
    const hi = numOr(q.p95);
    return `year ${years(med)}${lo !== null || hi !== null ? ` (90 % range ${lo !== null ? years(lo) : '…'}–${hi !== null ? years(hi) : 'beyond horizon'})` : ''}`;
  };
  return {
    draws: numOr(u.draws) ?? 0,
    completed: numOr(u.completed) ?? numOr(u.draws) ?? 0,
    status: typeof u.status === 'string' ? u.status : 'completed',
    parameters: (Array.isArray(u.parameters) ? u.parameters : []).filter(isObj).map((p) => ({
      label: typeof p.label === 'string' ? p.label : String(p.path ?? ''),
      unit: typeof p.unit === 'string' && p.unit ? p.unit : NO_UNIT,
      distribution: quantityText(p.distribution),
    })),
    options: u.options.filter(isObj).map((o) => {
      const cw = isObj(o.criticalWidth) ? o.criticalWidth : {};
      const computed = cw.computed !== false;
      return {
        name: typeof o.name === 'string' ? o.name : '',
        holds: prob(o.holdsWithinHorizon),
        holdsWithTransport: isObj(o.holdsIncludingTransport) ? prob(o.holdsIncludingTransport) : null,
        holds90: computed ? widthText(cw.holds90M) : 'not computed',
        holds95: computed ? widthText(cw.holds95M) : 'not computed',
        crossing: quant(o.crossingYears),
        sentences: Array.isArray(o.sentences) ? o.sentences.filter((s): s is string => typeof s === 'string') : [],
      };
    }),
    convergence: isObj(u.convergence) && typeof u.convergence.message === 'string' ? u.convergence.message : null,
  };
}

/** Sentences of the human-carried bypass analysis, when present. */
export function readBypass(b: unknown): { sentences: string[]; note: string | null } | null {
  if (!isObj(b) || !Array.isArray(b.options)) return null;
  const sentences = b.options.filter(isObj).map((o) => o.sentence).filter((s): s is string => typeof s === 'string');
  return { sentences, note: typeof b.regulatorNote === 'string' ? b.regulatorNote : null };
}
