/**
 * View-models of the results and compare pages: the result document's numbers as text, in tables.
 * Formatting only — every number shown was computed by the analysis (server/analysis/evaluate/evaluate.ts); the
 * decision words (headline, verdict with transport risk, recommended width, site events, width–delay cells,
 * spread rates) come from server/report/decision.ts, which the CLI and the briefing use too.
 * Option fields filled by the barrier analysis (verdict, sites, trees, critical width, width–delay) are
 * read defensively: a document without them shows "not computed" instead of failing.
 */
import type { OptionResult, ResultDocument, RunResult } from '../../analysis/result.ts';
import { integer, km, num, percent, years } from '../../report/format.ts';
import {
  alleeThresholdText,
  baselineSpreadText,
  headline,
  recommendationWords,
  siteEvent,
  spreadBeyondText,
  transportNote,
  verdictWords,
  widthCrossingCell,
  widthDelayCell,
} from '../../report/decision.ts';
import { parameterRows } from '../../report/briefing-text.ts';
import type { StoredResult } from '../store.ts';
import { resultCharts } from './charts.ts';
import { optionKey } from '../../report/charts/index.ts';
import { bypassView, uncertaintyView } from './uncertainty-view.ts';
import type { TableView } from './table.ts';

export type { TableView } from './table.ts';

const GROWTH_WORDS: Record<string, string> = {
  logistic: 'grows even from a few insects (logistic growth, no Allee effect)',
  'allee-cubic': 'small groups die out (strong Allee effect, cubic form)',
  'mate-finding': 'breeds on hosts and needs mates (consumer–resource growth with mate finding)',
};

const COVER_WORDS: Record<string, string> = { clearing: 'open clearing', 'non-host-forest': 'replanted with non-host trees' };

export const NOT_COMPUTED = 'not computed by this version';

/** An option's name with its letter key (A, B, …), the same letters the charts and the briefing use. */
export const keyed = (doc: ResultDocument, k: number) => `${optionKey(k)}: ${doc.options[k].name}`;

export interface VerdictView {
  name: string;
  what: string;
  available: boolean;
  label: string;
  tone: string;
  sentence: string;
  why: string;
  runNote: string;
  /** The transport risk that goes with the verdict (empty without a transport block). */
  transport: string;
  transportDecides: boolean;
}

/** An option as found in a stored document: the run is always there; the analysis fields may not be. */
export type LooseOption = Pick<OptionResult, 'name' | 'fromKm' | 'widthM' | 'cover' | 'run'> & Partial<Omit<OptionResult, 'name' | 'fromKm' | 'widthM' | 'cover' | 'run'>>;

export const loose = (o: OptionResult) => o as LooseOption;

export function optionWhat(o: LooseOption): string {
  return `${COVER_WORDS[o.cover] ?? o.cover}, ${integer(o.widthM)} m wide, from km ${km(o.fromKm)}`;
}

function runNote(run: RunResult): string {
  return run.numerics.status === 'completed' ? '' : `This run did not complete (${run.numerics.status}: ${run.numerics.message}).`;
}

export function verdictView(doc: ResultDocument, k = 0): VerdictView {
  const x = loose(doc.options[k]);
  const v = x.verdict;
  const words = verdictWords(doc, k);
  return {
    name: `${optionKey(k)}: ${x.name}`,
    what: optionWhat(x),
    available: Boolean(v),
    label: words.label,
    tone: words.tone,
    sentence: v?.sentence ?? 'This version of the analysis reports the simulated run only; compare the arrival years below.',
    why: v?.why ?? '',
    runNote: runNote(x.run),
    transport: words.transport?.sentence ?? '',
    transportDecides: Boolean(words.transport?.decides),
  };
}

export const yearOrNot = (y: number | null | undefined, horizon: number) =>
  y === null || y === undefined ? `not within ${years(horizon)} yr` : `year ${years(y)}`;

function arrivalTable(doc: ResultDocument): TableView {
  const head = ['Protected site', 'No clearing', ...doc.options.map((_, k) => keyed(doc, k))];
  const rows = doc.baseline.arrivals.map((a, i) => ({
    label: `${a.name} (km ${km(a.atKm)})`,
    cells: [
      a.arrivalYears === null ? `not reached within ${years(doc.horizonYears)} yr` : `pest arrives year ${years(a.arrivalYears)}`,
      ...doc.options.map((_, k) => siteEvent(doc, k, i).text),
    ],
  }));
  return { name: 'arrivals', caption: 'When the pest reaches each protected site', head, rows };
}

function treesTable(doc: ResultDocument): TableView {
  return {
    name: 'trees',
    caption: 'Trees removed and cost',
    head: ['Option', 'Host trees removed', 'Cost', 'Cost per year of delay'],
    rows: doc.options.map((o, k) => {
      const x = loose(o);
      const t = x.trees;
      const unit = t?.costUnit ? ` ${t.costUnit}` : '';
      const perYear = (x.sites ?? [])
        .filter((s) => s.costPerYearOfDelay !== null)
        .map((s) => `${s.name}: ${integer(s.costPerYearOfDelay!)}${unit}/yr`)
        .join('; ');
      const noDelay = t?.cost === null ? 'no cost given' : x.verdict?.kind === 'holds' ? 'does not apply: the front is held' : 'no delay bought at any site';
      return {
        label: keyed(doc, k),
        cells: [t ? integer(t.stemsRemoved) : NOT_COMPUTED, t ? (t.cost === null ? 'no cost given' : `${integer(t.cost)}${unit}`) : NOT_COMPUTED, t ? perYear || noDelay : NOT_COMPUTED],
      };
    }),
  };
}

/** The stopping width per option (inside "how this was computed"). */
function criticalWidthTable(doc: ResultDocument): TableView {
  return {
    name: 'stopping-width',
    caption: 'Width at which the front stops, option by option',
    head: ['Option', 'Front stops from (model runs)', 'Quick estimate (phase-plane)', 'Checks'],
    rows: doc.options.map((o, k) => {
      const c = loose(o).criticalWidth;
      if (!c) return { label: keyed(doc, k), cells: [NOT_COMPUTED, NOT_COMPUTED, NOT_COMPUTED] };
      const bracket = !c.applicable
        ? `no width stops it (no Allee effect)${c.delayPer100mYears !== null ? `; about ${years(c.delayPer100mYears)} yr of delay per extra 100 m` : ''}`
        : c.bracketM
          ? `${integer(c.bracketM[1])} m (gets through at ${integer(c.bracketM[0])} m)${c.marginal ? '; this option lies in between: too close to call' : ''}`
          : 'not found within the widths tried';
      const pp = c.phasePlaneM === null ? (c.applicable ? 'not available' : 'does not apply') : `${integer(c.phasePlaneM)} m${c.phasePlaneAssumesIntactHosts ? ' (hosts held at present stocking)' : ''}`;
      const checks = !c.applicable
        ? 'none needed'
        : [
            `${c.runs} full runs, tolerance ${num(c.toleranceM)} m`,
            c.halfStepCheck ? `half time step: ${c.halfStepCheck.outcome}` : null,
            c.windowCheck ? `larger window: ${c.windowCheck.agreed ? 'same outcome' : 'DIFFERENT outcome'}` : null,
          ]
            .filter(Boolean)
            .join('; ');
      return { label: keyed(doc, k), cells: [bracket, pp, checks] };
    }),
  };
}

function runsTable(doc: ResultDocument): TableView {
  const lastFront = (run: RunResult) => {
    const last = run.series.rightFrontKm.length - 1;
    return last >= 0 ? km(run.series.rightFrontKm[last], 'no density above the detection level') : 'no series';
  };
  return {
    name: 'runs',
    caption: 'Spread and host trees, layout by layout',
    head: ['Layout', 'Front at the end (km)', 'Spread rate beyond the clearing', 'Host stems left', 'Stems killed per km of front'],
    rows: [
      { label: 'No clearing', cells: [lastFront(doc.baseline), `${baselineSpreadText(doc)} (no clearing)`, percent(doc.baseline.host.remainingFraction), integer(doc.baseline.host.stemsKilledPerKm)] },
      ...doc.options.map((o, k) => ({
        label: keyed(doc, k),
        cells: [lastFront(o.run), spreadBeyondText(loose(o)), percent(o.run.host.remainingFraction), integer(o.run.host.stemsKilledPerKm)],
      })),
    ],
  };
}

function widthDelayTables(doc: ResultDocument): { name: string; table: TableView }[] {
  return doc.options
    .map((o, k) => ({ o, k }))
    .filter(({ o }) => (loose(o).widthDelay ?? []).length > 0)
    .map(({ o, k }) => ({
      name: keyed(doc, k),
      table: {
        name: `width-delay-${optionKey(k)}`,
        caption: `Delay against clearing width, option ${keyed(doc, k)}`,
        head: ['Width', 'Front stopped?', 'Front passes the clearing', ...doc.baseline.arrivals.map((a) => `Years gained at ${a.name}`)],
        rows: (loose(o).widthDelay ?? []).map((r) => ({
          label: `${integer(r.widthM)} m`,
          cells: [r.pinned ? 'yes (checked)' : 'no', widthCrossingCell(doc, r), ...doc.baseline.arrivals.map((_, i) => widthDelayCell(doc, k, r, i))],
        })),
      },
    }));
}

function mosaicTable(doc: ResultDocument): TableView | null {
  if (!doc.mosaics?.length) return null;
  const sp = (x: number | null) => (x === null ? 'does not apply' : `${num(x, 3)} km/yr`);
  return {
    name: 'mosaics',
    caption: 'Strip patterns (thinning mosaics)',
    head: ['Pattern', 'Pest persists in it', 'Spread rate (exact)', 'Spread rate (averaged estimate)', 'Intact forest', 'Measured in a simulation', 'Reading'],
    rows: doc.mosaics.map((m) => ({
      label: `${m.name}: ${integer(m.forestM)} m forest / ${integer(m.gapM)} m ${COVER_WORDS[m.cover] ?? m.cover}`,
      cells: [m.persists ? 'yes' : 'no', sp(m.exactKmPerYear), sp(m.homogenisedKmPerYear), sp(m.intactKmPerYear), m.measuredKmPerYear === null ? 'not measured' : sp(m.measuredKmPerYear), m.sentence],
    })),
  };
}

function numericsTable(doc: ResultDocument): TableView {
  const runs: { label: string; run: RunResult }[] = [{ label: 'No clearing', run: doc.baseline }, ...doc.options.map((o, k) => ({ label: keyed(doc, k), run: o.run }))];
  return {
    name: 'numerics',
    caption: 'Grid and time steps',
    head: ['Layout', 'Status', 'Grid cells', 'Cell size', 'Time step', 'Steps', 'Compute time'],
    rows: runs.map(({ label, run }) => {
      const n = run.numerics;
      return {
        label,
        cells: [
          n.status,
          integer(n.nCells),
          `${num(n.cellKmMin * 1000)}–${num(n.cellKmMax * 1000)} m${n.autoCell ? ' (automatic)' : ''}`,
          `${num(n.stepYears)} yr${n.autoStep ? ' (automatic)' : ''}`,
          integer(n.steps),
          `${integer(n.wallMs)} ms`,
        ],
      };
    }),
  };
}

/** The parameters that produced the result (from the exact stored scenario, not the possibly edited one). */
function parametersTable(stored: StoredResult): TableView {
  const rows = parameterRows(stored.scenario, undefined, stored.document.baseline.numerics);
  return {
    name: 'parameters',
    caption: 'Parameters used for this result',
    head: ['Parameter', 'Group', 'Value', 'Unit', 'Where the value comes from'],
    rows: rows.map((r) => ({ label: r.label, cells: [r.group, r.value, r.unit, r.source] })),
  };
}

export function resultLinks(id: string) {
  const base = `/results/${encodeURIComponent(id)}`;
  return {
    page: base,
    compare: `${base}/compare`,
    json: `${base}/result.json`,
    csv: `${base}/series.csv`,
    scenario: `${base}/scenario.json`,
    remove: `${base}/delete`,
    tables: `${base}/tables`,
  };
}

/** Facts shown at the top of both result pages. */
export function header(stored: StoredResult) {
  const doc = stored.document;
  const m = doc.model;
  return {
    id: stored.id,
    title: doc.title,
    description: doc.description,
    region: doc.region ?? '',
    pestName: doc.pest.name,
    illustrative: doc.pest.illustrative,
    runAt: doc.runAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC'),
    tool: `${stored.toolName} ${stored.toolVersion}`,
    fingerprint: doc.scenarioFingerprint.slice(0, 12),
    horizon: `${years(doc.horizonYears)} yr`,
    detection: `${percent(doc.detectionLevel, doc.detectionLevel < 0.01 ? 1 : 0)} of capacity (the density of fully stocked host forest)`,
    model: [
      { label: 'How the pest grows', value: GROWTH_WORDS[m.growthForm] ?? m.growthForm },
      {
        label: 'Growth of a small group (per-capita rate at low density)',
        value: `${num(m.lowDensityRate)} per year${m.lowDensityRate < 0 ? ' (negative: small groups decline)' : ''}`,
      },
      { label: 'Density below which a group declines (Allee threshold)', value: alleeThresholdText(m.alleeThreshold) },
      { label: 'Spread speed in intact forest (theory, 2√(D r₀))', value: m.linearSpeedKmPerYear > 0 ? `${num(m.linearSpeedKmPerYear, 3)} km/yr` : 'does not apply (small groups do not grow)' },
      { label: 'Host trees', value: m.hostDepletion ? 'killed by the pest' : 'not depleted' },
    ],
    scenarioLink: stored.scenarioRef ? `/scenarios/${encodeURIComponent(stored.scenarioRef)}` : '',
    links: resultLinks(stored.id),
    cautions: doc.cautions,
  };
}

/** Every table of the results page by name (the CSV exports use this list). */
export function resultTables(stored: StoredResult): Map<string, TableView> {
  const doc = stored.document;
  const list: (TableView | null)[] = [
    doc.baseline.arrivals.length ? arrivalTable(doc) : null,
    doc.options.length ? treesTable(doc) : null,
    doc.options.length ? criticalWidthTable(doc) : null,
    ...widthDelayTables(doc).map((t) => t.table),
    runsTable(doc),
    mosaicTable(doc),
    numericsTable(doc),
    parametersTable(stored),
    ...(uncertaintyTables(doc) ?? []),
    bypassView(doc)?.table ?? null,
  ];
  const out = new Map<string, TableView>();
  for (const t of list) if (t?.name) out.set(t.name, t);
  return out;
}

function uncertaintyTables(doc: ResultDocument): TableView[] | null {
  const u = uncertaintyView(doc);
  if (!u) return null;
  return [u.parameters, u.options, ...(u.sites ? [u.sites] : []), ...u.sensitivity.map((s) => s.table)];
}

/** Adds the CSV link of each named table. */
export function withCsv<T extends TableView | null>(t: T, base: string): T & { csv?: string } {
  if (!t) return t as T & { csv?: string };
  return { ...t, csv: t.name ? `${base}/${t.name}.csv` : undefined } as T & { csv?: string };
}

/** The results page. */
export function resultPageView(stored: StoredResult, extras: { briefingUrl?: string } = {}) {
  const doc = stored.document;
  const runs = [{ label: 'No clearing', run: doc.baseline }, ...doc.options.map((o, k) => ({ label: keyed(doc, k), run: o.run }))];
  const notes = runs.map(({ label, run }) => (run.numerics.status === 'completed' ? '' : `${label}: ${runNote(run)}`)).filter(Boolean);
  const base = resultLinks(stored.id).tables;
  const rec = recommendationWords(doc);
  const unc = uncertaintyView(doc);
  const byp = bypassView(doc);
  const transportDecides = doc.options.some((_, k) => transportNote(doc, k)?.decides);
  const cwNotes = [...new Set(doc.options.map((o) => loose(o).criticalWidth?.note).filter((x): x is string => Boolean(x)))];
  return {
    ...header(stored),
    briefingUrl: extras.briefingUrl ?? '',
    headline: headline(doc),
    headlineTone: transportDecides ? 'partial' : 'plain',
    recommendation: { ...rec, notes: cwNotes },
    hasOptions: doc.options.length > 0,
    verdicts: doc.options.map((_, k) => verdictView(doc, k)),
    statusNotes: notes,
    hasSites: doc.baseline.arrivals.length > 0,
    arrivals: withCsv(arrivalTable(doc), base),
    trees: withCsv(treesTable(doc), base),
    criticalWidth: withCsv(criticalWidthTable(doc), base),
    runs: withCsv(runsTable(doc), base),
    widthDelay: widthDelayTables(doc).map((t) => ({ ...t, table: withCsv(t.table, base) })),
    mosaics: withCsv(mosaicTable(doc), base),
    numerics: withCsv(numericsTable(doc), base),
    parameters: withCsv(parametersTable(stored), base),
    charts: resultCharts(doc),
    uncertainty: unc
      ? {
          ...unc,
          parameters: withCsv(unc.parameters, base),
          options: withCsv(unc.options, base),
          sites: withCsv(unc.sites, base),
          sensitivity: unc.sensitivity.map((s) => ({ ...s, table: withCsv(s.table, base) })),
        }
      : null,
    bypass: byp ? { ...byp, table: withCsv(byp.table, base) } : null,
  };
}

export interface ResultListEntry {
  id: string;
  title: string;
  createdAt: string;
  toolVersion: string;
  scenarioRef: string | null;
  /** Short verdicts per option, e.g. "A 1 200 m: holds; transport decides". */
  verdicts?: string[];
  fingerprint?: string;
}

/** Compact facts for lists of past results. */
export function resultListItem(r: ResultListEntry) {
  return {
    id: r.id,
    title: r.title,
    when: r.createdAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC'),
    version: r.toolVersion,
    link: resultLinks(r.id).page,
    scenarioLink: r.scenarioRef ? `/scenarios/${encodeURIComponent(r.scenarioRef)}` : '',
    source: r.scenarioRef ? (r.scenarioRef.startsWith('demo-') ? `demo “${r.scenarioRef.slice(5)}”` : `saved scenario #${r.scenarioRef}`) : 'posted through the API',
    verdicts: r.verdicts ?? [],
    fingerprint: r.fingerprint ? r.fingerprint.slice(0, 8) : '',
  };
}
