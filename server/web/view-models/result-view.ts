/**
 * View-models of the results and compare pages: the result document's numbers as text, in tables.
 * Formatting only — every number shown was computed by the analysis (server/analysis/evaluate.ts).
 * Option fields filled by the barrier analysis (verdict, sites, trees, critical width, width–delay) are
 * read defensively: a document without them shows "not computed" instead of failing.
 */
import type { OptionResult, ResultDocument, RunResult, VerdictKind } from '../../analysis/result.ts';
import { integer, km, num, percent, speed, years } from '../../report/format.ts';
import type { StoredResult } from '../store.ts';
import { compareChart, resultCharts } from './charts.ts';
import { optionKey } from '../../report/charts/index.ts';
import { bypassView, uncertaintyView } from './uncertainty-view.ts';

export const VERDICT_WORDS: Record<VerdictKind, { label: string; tone: string }> = {
  holds: { label: 'Holds', tone: 'good' },
  marginal: { label: 'Marginal — cannot be called either way', tone: 'unsure' },
  'not-crossed': { label: 'Not crossed within the horizon', tone: 'unsure' },
  delays: { label: 'Delays the pest', tone: 'partial' },
  'speeds-up': { label: 'Speeds spread up', tone: 'bad' },
  'no-change': { label: 'No measurable change', tone: 'neutral' },
  'not-reached': { label: 'Not reached within the horizon', tone: 'neutral' },
};

const GROWTH_WORDS: Record<string, string> = {
  logistic: 'logistic (no Allee effect)',
  'allee-cubic': 'strong Allee effect (cubic)',
  'mate-finding': 'breeding on hosts with mate finding',
};

const COVER_WORDS: Record<string, string> = { clearing: 'open clearing', 'non-host-forest': 'replanted with non-host trees' };

const NOT_COMPUTED = 'not computed by this version';

/** An option's name with its letter key (A, B, …), the same letters the charts and the briefing use. */
const keyed = (doc: ResultDocument, k: number) => `${optionKey(k)}: ${doc.options[k].name}`;

export interface VerdictView {
  name: string;
  what: string;
  available: boolean;
  label: string;
  tone: string;
  sentence: string;
  why: string;
  runNote: string;
}

export interface TableView {
  head: string[];
  rows: { label: string; cells: string[] }[];
}

/** An option as found in a stored document: the run is always there; the analysis fields may not be. */
type LooseOption = Pick<OptionResult, 'name' | 'fromKm' | 'widthM' | 'cover' | 'run'> & Partial<Omit<OptionResult, 'name' | 'fromKm' | 'widthM' | 'cover' | 'run'>>;

const loose = (o: OptionResult) => o as LooseOption;

function optionWhat(o: LooseOption): string {
  return `${COVER_WORDS[o.cover] ?? o.cover}, ${integer(o.widthM)} m wide, from km ${km(o.fromKm)}`;
}

function runNote(run: RunResult): string {
  return run.numerics.status === 'completed' ? '' : `This run did not complete (${run.numerics.status}: ${run.numerics.message}).`;
}

export function verdictView(o: OptionResult, k = 0): VerdictView {
  const x = loose(o);
  const v = x.verdict;
  const words = v ? VERDICT_WORDS[v.kind] : undefined;
  return {
    name: `${optionKey(k)}: ${x.name}`,
    what: optionWhat(x),
    available: Boolean(v),
    label: words?.label ?? v?.kind ?? 'Verdict not available',
    tone: words?.tone ?? 'neutral',
    sentence: v?.sentence ?? 'This version of the analysis reports the simulated run only; compare the arrival years below.',
    why: v?.why ?? '',
    runNote: runNote(x.run),
  };
}

const yearOrNot = (y: number | null | undefined, horizon: number) =>
  y === null || y === undefined ? `not within ${years(horizon)} yr` : `year ${years(y)}`;

function arrivalTable(doc: ResultDocument): TableView {
  const head = ['Protected site', 'Baseline', ...doc.options.map((_, k) => keyed(doc, k))];
  const rows = doc.baseline.arrivals.map((a, k) => ({
    label: `${a.name} (km ${km(a.atKm)})`,
    cells: [
      yearOrNot(a.arrivalYears, doc.horizonYears),
      ...doc.options.map((o) => {
        const x = loose(o);
        const arrival = yearOrNot(x.run.arrivals[k]?.arrivalYears, doc.horizonYears);
        const site = x.sites?.[k];
        if (!site) return arrival;
        const delay = site.delayYears === null ? '' : `; ${site.delayYears >= 0 ? '+' : '−'}${years(Math.abs(site.delayYears))} yr`;
        const kind = VERDICT_WORDS[site.kind]?.label.toLowerCase() ?? site.kind;
        return `${arrival}${delay} (${kind})`;
      }),
    ],
  }));
  return { head, rows };
}

function treesTable(doc: ResultDocument): TableView {
  return {
    head: ['Option', 'Host trees removed', 'Cost', 'Cost per year of delay'],
    rows: doc.options.map((o, k) => {
      const x = loose(o);
      const t = x.trees;
      const unit = t?.costUnit ? ` ${t.costUnit}` : '';
      const perYear = (x.sites ?? [])
        .filter((s) => s.costPerYearOfDelay !== null)
        .map((s) => `${s.name}: ${integer(s.costPerYearOfDelay!)}${unit}/yr`)
        .join('; ');
      return {
        label: keyed(doc, k),
        cells: [
          t ? integer(t.stemsRemoved) : NOT_COMPUTED,
          t ? (t.cost === null ? 'no cost given' : `${integer(t.cost)}${unit}`) : NOT_COMPUTED,
          t ? perYear || '—' : NOT_COMPUTED,
        ],
      };
    }),
  };
}

function criticalWidthTable(doc: ResultDocument): TableView {
  return {
    head: ['Option', 'Critical width', 'Phase-plane estimate', 'Note'],
    rows: doc.options.map((o, k) => {
      const c = loose(o).criticalWidth;
      if (!c) return { label: keyed(doc, k), cells: [NOT_COMPUTED, '—', ''] };
      const bracket = !c.applicable
        ? 'does not apply'
        : c.bracketM
          ? `between ${integer(c.bracketM[0])} and ${integer(c.bracketM[1])} m${c.marginal ? ' (this option lies inside the bracket)' : ''}`
          : 'not found within the widths tried';
      const extra = c.delayPer100mYears !== null ? ` About ${years(c.delayPer100mYears)} yr of delay per extra 100 m.` : '';
      return {
        label: keyed(doc, k),
        cells: [
          bracket,
          `${c.phasePlaneM === null ? '—' : `${integer(c.phasePlaneM)} m`}${c.phasePlaneNote ? ` (${c.phasePlaneNote})` : ''}`,
          `${c.note}${extra}`,
        ],
      };
    }),
  };
}

function runsTable(doc: ResultDocument): TableView {
  const runs: { label: string; run: RunResult }[] = [{ label: 'Baseline', run: doc.baseline }, ...doc.options.map((o, k) => ({ label: keyed(doc, k), run: o.run }))];
  const rate = (run: RunResult, dir: 'right' | 'left') => speed(run.spreadRates.find((r) => r.direction === dir)?.kmPerYear ?? null, 'not measured');
  return {
    head: ['Layout', 'Front at the end (right)', 'Spread rate (right)', 'Spread rate (left)', 'Host stems left', 'Stems killed per km of front'],
    rows: runs.map(({ label, run }) => {
      const last = run.series.rightFrontKm.length - 1;
      return {
        label,
        cells: [
          last >= 0 ? `km ${km(run.series.rightFrontKm[last], 'none')}` : '—',
          rate(run, 'right'),
          rate(run, 'left'),
          percent(run.host.remainingFraction),
          integer(run.host.stemsKilledPerKm),
        ],
      };
    }),
  };
}

function widthDelayTables(doc: ResultDocument): { name: string; table: TableView }[] {
  return doc.options
    .map((o, k) => ({ o, k }))
    .filter(({ o }) => (loose(o).widthDelay ?? []).length > 0)
    .map(({ o, k }) => ({
      name: keyed(doc, k),
      table: {
        head: ['Width', 'Pinned', 'Crossing year', ...doc.baseline.arrivals.map((a) => `Delay at ${a.name}`)],
        rows: (loose(o).widthDelay ?? []).map((r) => ({
          label: `${integer(r.widthM)} m`,
          cells: [
            r.pinned ? 'yes' : 'no',
            r.pinned ? 'never (held)' : r.crossingYears === null ? `not within ${years(doc.horizonYears)} yr` : years(r.crossingYears),
            ...doc.baseline.arrivals.map((_, k) => {
              const d = r.delayYearsBySite[k];
              return d === null || d === undefined ? '—' : `${years(d)} yr`;
            }),
          ],
        })),
      },
    }));
}

function mosaicTable(doc: ResultDocument): TableView | null {
  if (!doc.mosaics?.length) return null;
  return {
    head: ['Pattern', 'Persists', 'Speed (dispersion relation)', 'Speed (averaged)', 'Intact forest', 'Measured', 'Reading'],
    rows: doc.mosaics.map((m) => ({
      label: `${m.name}: ${integer(m.forestM)} m forest / ${integer(m.gapM)} m ${COVER_WORDS[m.cover] ?? m.cover}`,
      cells: [
        m.persists ? 'yes' : 'no',
        speed(m.exactKmPerYear),
        speed(m.homogenisedKmPerYear),
        speed(m.intactKmPerYear),
        speed(m.measuredKmPerYear),
        m.sentence,
      ],
    })),
  };
}

function numericsTable(doc: ResultDocument): TableView {
  const runs: { label: string; run: RunResult }[] = [{ label: 'Baseline', run: doc.baseline }, ...doc.options.map((o, k) => ({ label: keyed(doc, k), run: o.run }))];
  return {
    head: ['Layout', 'Status', 'Cells', 'Cell size', 'Time step', 'Steps', 'Compute time'],
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

export function resultLinks(id: string) {
  const base = `/results/${encodeURIComponent(id)}`;
  return {
    page: base,
    compare: `${base}/compare`,
    json: `${base}/result.json`,
    csv: `${base}/series.csv`,
    scenario: `${base}/scenario.json`,
    remove: `${base}/delete`,
  };
}

/** Facts shown at the top of both result pages. */
function header(stored: StoredResult) {
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
    detection: `${num(doc.detectionLevel)} of capacity`,
    model: [
      { label: 'Growth form', value: GROWTH_WORDS[m.growthForm] ?? m.growthForm },
      { label: 'Growth at low density', value: `${num(m.lowDensityRate)} /yr${m.lowDensityRate < 0 ? ' (small groups decline: strong Allee effect)' : ''}` },
      { label: 'Allee threshold', value: m.alleeThreshold === null ? 'none' : `${num(m.alleeThreshold)} of capacity` },
      { label: 'Spread speed in intact forest (2√(D r₀))', value: m.linearSpeedKmPerYear > 0 ? speed(m.linearSpeedKmPerYear) : 'does not apply (no growth at low density)' },
      { label: 'Host trees', value: m.hostDepletion ? 'killed by the pest' : 'not depleted' },
    ],
    scenarioLink: stored.scenarioRef ? `/scenarios/${encodeURIComponent(stored.scenarioRef)}` : '',
    links: resultLinks(stored.id),
    cautions: doc.cautions,
  };
}

/** The results page. */
export function resultPageView(stored: StoredResult, extras: { briefingUrl?: string } = {}) {
  const doc = stored.document;
  const runs = [{ label: 'Baseline', run: doc.baseline }, ...doc.options.map((o, k) => ({ label: keyed(doc, k), run: o.run }))];
  const notes = runs.map(({ label, run }) => (run.numerics.status === 'completed' ? '' : `${label}: ${runNote(run)}`)).filter(Boolean);
  return {
    ...header(stored),
    briefingUrl: extras.briefingUrl ?? '',
    hasOptions: doc.options.length > 0,
    verdicts: doc.options.map((o, k) => verdictView(o, k)),
    statusNotes: notes,
    hasSites: doc.baseline.arrivals.length > 0,
    arrivals: arrivalTable(doc),
    trees: treesTable(doc),
    criticalWidth: criticalWidthTable(doc),
    runs: runsTable(doc),
    widthDelay: widthDelayTables(doc),
    mosaics: mosaicTable(doc),
    numerics: numericsTable(doc),
    charts: resultCharts(doc),
    uncertainty: uncertaintyView(doc),
    bypass: bypassView(doc),
  };
}

/** The compare page: options side by side in one table and one chart. */
export function comparePageView(stored: StoredResult) {
  const doc = stored.document;
  const opts = doc.options.map(loose);
  const row = (label: string, baseline: string, cell: (o: LooseOption) => string) => ({ label, cells: [baseline, ...opts.map(cell)] });
  const rows = [
    row('Verdict', '—', (o) => (o.verdict ? (VERDICT_WORDS[o.verdict.kind]?.label ?? o.verdict.kind) : NOT_COMPUTED)),
    row('Clearing', 'none', (o) => optionWhat(o)),
    // Each option has its own clearing, so the baseline time for that place is shown in the option's cell.
    row('Front passes the far edge of the clearing', '—', (o) =>
      o.crossingYears
        ? `${yearOrNot(o.crossingYears.option, doc.horizonYears)} (without it: ${yearOrNot(o.crossingYears.baseline, doc.horizonYears)})`
        : NOT_COMPUTED,
    ),
    ...doc.baseline.arrivals.map((a, k) =>
      row(`Arrival at ${a.name} (km ${km(a.atKm)})`, yearOrNot(a.arrivalYears, doc.horizonYears), (o) => yearOrNot(o.run.arrivals[k]?.arrivalYears, doc.horizonYears)),
    ),
    ...doc.baseline.arrivals.map((a, k) =>
      row(`Years gained at ${a.name}`, '—', (o) => {
        const s = o.sites?.[k];
        if (!s) return NOT_COMPUTED;
        return s.delayYears === null ? (VERDICT_WORDS[s.kind]?.label ?? s.kind) : `${s.delayYears >= 0 ? '+' : '−'}${years(Math.abs(s.delayYears))} yr`;
      }),
    ),
    row('Host trees removed', '0', (o) => (o.trees ? integer(o.trees.stemsRemoved) : NOT_COMPUTED)),
    row('Cost', '—', (o) => (o.trees ? (o.trees.cost === null ? 'no cost given' : `${integer(o.trees.cost)}${o.trees.costUnit ? ` ${o.trees.costUnit}` : ''}`) : NOT_COMPUTED)),
    row('Spread rate beyond the clearing', speed(doc.baseline.spreadRates.find((r) => r.direction === 'right')?.kmPerYear ?? null, 'not measured'), (o) =>
      o.speeds ? speed(o.speeds.optionKmPerYear, 'not measured') : speed(o.run.spreadRates.find((r) => r.direction === 'right')?.kmPerYear ?? null, 'not measured'),
    ),
    row('Host stems left at the end', percent(doc.baseline.host.remainingFraction), (o) => percent(o.run.host.remainingFraction)),
    row('Critical width', '—', (o) =>
      !o.criticalWidth ? NOT_COMPUTED : !o.criticalWidth.applicable ? 'does not apply' : o.criticalWidth.bracketM ? `${integer(o.criticalWidth.bracketM[0])}–${integer(o.criticalWidth.bracketM[1])} m` : 'not found',
    ),
  ];
  return {
    ...header(stored),
    hasOptions: doc.options.length > 0,
    table: { head: ['', 'Baseline', ...opts.map((_, k) => keyed(doc, k))], rows },
    chart: compareChart(doc),
  };
}


/** Compact facts for lists of past results. */
export function resultListItem(r: { id: string; title: string; createdAt: string; toolVersion: string; scenarioRef: string | null }) {
  return {
    id: r.id,
    title: r.title,
    when: r.createdAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC'),
    version: r.toolVersion,
    link: resultLinks(r.id).page,
    scenarioLink: r.scenarioRef ? `/scenarios/${encodeURIComponent(r.scenarioRef)}` : '',
  };
}
