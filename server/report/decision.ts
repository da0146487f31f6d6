/**
 * The decision words shared by the web pages, the CLI summary, the briefing and the CSV exports: the
 * headline, each verdict with the transport risk that goes with it, the recommended minimum width, what
 * arrives at a site (a breeding population or only a thin non-breeding fringe), width–delay cells that say
 * what they mean, the spread rate beyond a clearing and the Allee threshold. One function per question, so
 * every page shows the same number in the same words.
 * Formatting only: every number comes from the result document.
 */
import type { OptionBypass, OptionResult, ResultDocument, WidthDelayRow } from '../analysis/result.ts';
import { recommendedWidthOf, type RecommendedWidth } from '../analysis/recommended-width.ts';
import { fixed, integer, percent, speed, years } from './format.ts';
import { optionKey } from './charts/styles.ts';

type Doc = Pick<ResultDocument, 'options' | 'uncertainty' | 'bypass' | 'horizonYears' | 'baseline'> & { recommendedWidth?: RecommendedWidth };
type LooseOption = Partial<OptionResult> & Pick<OptionResult, 'name' | 'widthM' | 'run'>;

/** Plain verdict labels (headings, banners, tables). */
export const VERDICT_PLAIN: Record<OptionResult['verdict']['kind'], string> = {
  holds: 'Holds',
  marginal: 'Too close to call',
  'not-crossed': 'Not crossed within the horizon',
  delays: 'Delays the pest',
  'speeds-up': 'Speeds the pest up',
  'no-change': 'No measurable change',
  'not-reached': 'Not reached within the horizon',
};

/** The Allee threshold, one way everywhere: "4.6 % of capacity". */
export function alleeThresholdText(x: number | null): string {
  return x === null ? 'none (no Allee effect)' : `${percent(x, 1)} of capacity`;
}

/** The bypass (transport) entry of option k, matched by position and name. */
export function bypassOf(doc: Pick<ResultDocument, 'bypass'>, k: number, name?: string): OptionBypass | null {
  const b = doc.bypass?.options?.[k];
  if (!b) return null;
  return name === undefined || b.name === name ? b : (doc.bypass!.options.find((x) => x.name === name) ?? null);
}

/** The probability shown for the transport risk: the ensemble mean when an ensemble ran, else the central-value run. */
export function transportProbability(b: OptionBypass): { p: number; over: 'ensemble' | 'central' } {
  return b.ensemble && Number.isFinite(b.ensemble.p) ? { p: b.ensemble.p, over: 'ensemble' } : { p: b.probability, over: 'central' };
}

export interface TransportNote {
  /** Short cell text: "40 % within 40 yr". */
  short: string;
  /** One sentence for a banner or the cover. */
  sentence: string;
  decides: boolean;
  probability: number;
}

/** The transport risk that goes with option k's verdict; null when the scenario has no transport block. */
export function transportNote(doc: Doc, k: number): TransportNote | null {
  const o = doc.options[k];
  const b = o ? bypassOf(doc, k, o.name) : null;
  if (!b) return null;
  const { p, over } = transportProbability(b);
  const T = years(doc.horizonYears).replace(/\.0$/, '');
  const short = `${percent(p, 0)} within ${T} yr`;
  const where = over === 'ensemble' ? 'over the ensemble' : 'at the central values';
  const wider = Number.isFinite(b.probabilityIf100mWider) ? ` (${percent(b.probabilityIf100mWider, 0)} with the clearing 100 m wider)` : '';
  const sentence = b.transportDecides
    ? `${percent(p, 0)} chance that infested firewood, logs or nursery stock found a colony beyond the clearing within ${T} years (${where})${wider}. Transport, not the width, decides: movement controls set by the regulator are the tool for that risk.`
    : `${percent(p, 0)} chance that infested wood carried past the clearing founds a colony beyond it within ${T} years (${where})${wider}.`;
  return { short, sentence, decides: b.transportDecides, probability: p };
}

export interface VerdictWords {
  label: string;
  /** Banner tone: good / partial / bad / unsure / neutral. A held option whose transport risk decides is not shown green. */
  tone: string;
  transport: TransportNote | null;
}

const TONES: Record<OptionResult['verdict']['kind'], string> = {
  holds: 'good',
  marginal: 'unsure',
  'not-crossed': 'unsure',
  delays: 'partial',
  'speeds-up': 'bad',
  'no-change': 'neutral',
  'not-reached': 'neutral',
};

/** An option's verdict with the transport risk beside it. */
export function verdictWords(doc: Doc, k: number): VerdictWords {
  const o = doc.options[k] as LooseOption;
  const kind = o.verdict?.kind;
  const transport = transportNote(doc, k);
  let label = kind ? VERDICT_PLAIN[kind] : 'No verdict (analysis not run)';
  let tone = kind ? TONES[kind] : 'neutral';
  if (transport?.decides) {
    label = kind === 'holds' ? 'Holds the natural front — but transport decides' : `${label} — and transport decides`;
    tone = 'partial';
  }
  return { label, tone, transport };
}

/**
 * The headline of a result: one or two sentences a meeting can act on. Says first when transport, not the
 * width, decides; otherwise which options hold and the recommended minimum width.
 */
export function headline(doc: Doc): string {
  const n = doc.options.length;
  if (!n) return 'No clearing options were given: the results show the spread as things stand.';
  const deciders = doc.options.map((_, k) => ({ k, t: transportNote(doc, k) })).filter((x) => x.t?.decides);
  if (deciders.length) {
    const worst = deciders.reduce((a, b) => (b.t!.probability > a.t!.probability ? b : a));
    const names = deciders.map((x) => optionKey(x.k)).join(', ');
    return (
      `Transport, not the width, decides. ${deciders.length === n ? (n === 1 ? 'The clearing' : 'Every clearing') : `Option ${names}`} ` +
      `stops the natural front, yet people carrying the pest give a ${percent(worst.t!.probability, 0)} chance of an established colony beyond it within ` +
      `${years(doc.horizonYears).replace(/\.0$/, '')} years. Movement controls on wood, set by the regulator, are the tool for that risk; a wider clearing is not.`
    );
  }
  const rec = recommendedWidthOf(doc);
  const held = doc.options.map((o, k) => ({ o: o as LooseOption, k })).filter(({ o }) => o.verdict?.kind === 'holds');
  const speeds = doc.options.map((o, k) => ({ o: o as LooseOption, k })).filter(({ o }) => o.verdict?.kind === 'speeds-up');
  const parts: string[] = [];
  if (held.length) {
    const narrow = rec.widthM !== null ? held.filter(({ o }) => o.widthM < rec.widthM!) : [];
    parts.push(`${held.map(({ o, k }) => `${optionKey(k)} (${integer(o.widthM)} m)`).join(' and ')} ${held.length === 1 ? 'holds' : 'hold'} the front in the model.`);
    if (narrow.length) parts.push(`${narrow.map(({ k }) => optionKey(k)).join(' and ')} ${narrow.length === 1 ? 'is' : 'are'} narrower than the recommended minimum of ${integer(rec.widthM!)} m, which adds a safety margin.`);
  }
  else if (rec.basis === 'no-width-stops') parts.push('No clearing width stops this pest in the model; clearings only delay it.');
  else parts.push('No option was shown to hold the front.');
  if (speeds.length) parts.push(`${speeds.map(({ k }) => optionKey(k)).join(', ')} would SPEED the pest up.`);
  return parts.join(' ');
}

export interface RecommendationWords {
  /** "Recommended minimum width: 1 050 m." (or why there is none). */
  short: string;
  /** Its basis in one or two plain sentences. */
  basis: string;
  /** Why the phase-plane value differs, when one is shown; null otherwise. */
  phasePlane: string | null;
  /** Method details for the collapsible "how this was computed" part. */
  method: string[];
  widthM: number | null;
}

/** The recommended minimum width of a scenario in words (same on web, CLI and the briefing cover). */
export function recommendationWords(doc: Doc): RecommendationWords {
  const r = recommendedWidthOf(doc);
  const margin = `${fixed(100 * r.marginShare, 0)} %`;
  const method: string[] = [];
  let short: string;
  let basis: string;
  switch (r.basis) {
    case 'not-computed':
      return { short: 'No recommended width: the barrier analysis did not run for this result.', basis: '', phasePlane: null, method, widthM: null };
    case 'no-width-stops':
      short = 'No recommended width: no clearing width stops this pest in the model (it has no Allee effect: even a few insects that cross start a growing population).';
      basis =
        r.delayPer100mYears !== null
          ? `Each extra 100 m of width buys about ${fixed(r.delayPer100mYears, 1)} years${r.delayPer100mYears < 0 ? ' (negative: the pest arrives sooner)' : ''} at the first protected site beyond it.`
          : '';
      return { short, basis, phasePlane: null, method, widthM: null };
    case 'not-found':
      return { short: 'No recommended width: no width tried was shown to stop the front.', basis: 'Try wider options or a longer search.', phasePlane: null, method, widthM: null };
    default:
      break;
  }
  const [lo, hi] = r.bracketM!;
  short = `Recommended minimum width: ${integer(r.widthM!)} m.`;
  basis =
    r.basis === 'ensemble-95'
      ? `It is the width that holds in 95 % of the ${r.ensembleDraws} ensemble draws (${integer(r.holds95M!)} m) plus a ${margin} safety margin, rounded up to ${r.roundToM} m. In the central-value runs the front is stopped from ${integer(hi)} m (lets it through at ${integer(lo)} m).`
      : `The front is stopped from ${integer(hi)} m in the model runs (it gets through at ${integer(lo)} m); the recommendation adds a ${margin} safety margin and rounds up to ${r.roundToM} m.` +
        (r.holds95M !== null ? ` Over the ensemble, ${integer(r.holds90M ?? r.holds95M)} m holds in 90 % of draws and ${integer(r.holds95M)} m in 95 %.` : ' No ensemble of the width was run: the recommendation does not cover uncertain parameters.');
  const phasePlane =
    r.phasePlaneM !== null
      ? r.phasePlaneAssumesIntactHosts
        ? `The quick estimate of ${integer(r.phasePlaneM)} m (phase-plane criterion) keeps the host trees at their present stocking. In the full runs the pest kills its hosts as it advances, which weakens the front, so a narrower clearing stops it. If the stand beyond could recover or be restocked before the front arrives, plan for ${integer(r.phasePlaneM)} m.`
        : `The quick estimate (phase-plane criterion) gives ${integer(r.phasePlaneM)} m, consistent with the full runs.`
      : null;
  method.push(
    `Full model runs at different widths (bisection) narrow the width at which the front stops to ${integer(lo)}–${integer(hi)} m; “stops” is checked, not assumed from a run that merely ends.`,
    `Safety margin: ${margin} on top of the model threshold, rounded up to ${r.roundToM} m (a choice of this tool, common practice, no source).`,
  );
  if (r.holds95M !== null) method.push(`Ensemble: the per-draw width that stops the front, over ${r.ensembleDraws} draws of the uncertain parameters; 90 % of draws stop at ${integer(r.holds90M ?? r.holds95M)} m or less, 95 % at ${integer(r.holds95M)} m or less.`);
  if (r.optionsMeeting.length) method.push(`Options at least this wide: ${r.optionsMeeting.map((k) => `${optionKey(k)} (${integer(doc.options[k].widthM)} m)`).join(', ')}.`);
  if (r.transportDecides) method.push('This width answers natural spread only; the transport risk is not reduced by width.');
  return { short, basis, phasePlane, method, widthM: r.widthM };
}

export type SiteEventKind = 'before-clearing' | 'breeding' | 'fringe' | 'held' | 'not-reached';

export interface SiteEvent {
  kind: SiteEventKind;
  /** Cell text: what happens at the site with this option. */
  text: string;
  /** Two short lines for narrow table cells (the briefing): "year 17.2\n+1.3 yr", "held\nfringe from yr 18.1". */
  short: string;
  /** Year a breeding population arrives [yr]; null when none within the run. */
  breedingYears: number | null;
  /** Year a thin non-breeding fringe first reaches the detection level [yr]; null when none or not distinguished. */
  fringeYears: number | null;
}

const sign = (d: number) => (Math.abs(d) < 0.05 ? '±0' : `${d > 0 ? '+' : '−'}${fixed(Math.abs(d), 1)}`);

/**
 * What arrives at site i with option k: a breeding population (with the change against no clearing) or only
 * the thin non-breeding fringe ahead of a held or not-yet-crossed front. A held option never lists a
 * breeding arrival at a site beyond it.
 */
export function siteEvent(doc: Doc, k: number, i: number): SiteEvent {
  const o = doc.options[k] as LooseOption;
  const T = years(doc.horizonYears).replace(/\.0$/, '');
  const runYear = o.run.arrivals[i]?.arrivalYears ?? null;
  const base = doc.baseline.arrivals[i]?.arrivalYears ?? null;
  const site = o.sites?.[i];
  const vs = base === null ? `; without the clearing not within ${T} yr` : '';
  if (!site) {
    return runYear === null
      ? { kind: 'not-reached', text: `not reached within ${T} yr`, short: 'not reached', breedingYears: null, fringeYears: null }
      : { kind: 'breeding', text: `year ${years(runYear)}`, short: years(runYear), breedingYears: runYear, fringeYears: null };
  }
  const crossing = o.crossingYears?.option ?? null;
  const projected = o.crossingYears?.projected ?? null;
  if (!site.beyondBarrier) {
    if (runYear === null) return { kind: 'not-reached', text: `not reached within ${T} yr`, short: 'not reached', breedingYears: null, fringeYears: null };
    const d = base !== null ? `, ${sign(runYear - base)} yr` : vs;
    const shortD = base !== null ? `\n${sign(runYear - base)} yr` : '';
    return { kind: 'before-clearing', text: `pest arrives year ${years(runYear)}${d} (site before the clearing)`, short: `${years(runYear)}${shortD}`, breedingYears: runYear, fringeYears: null };
  }
  if (site.kind === 'holds' || site.kind === 'marginal') {
    const fringe = runYear !== null ? `; a thin non-breeding fringe is detectable there from year ${years(runYear)}` : '';
    const held = site.kind === 'holds' ? 'no breeding population: the front is held at the clearing' : 'no breeding population in this run, but too close to call';
    return { kind: 'held', text: `${held}${fringe}`, short: `${site.kind === 'holds' ? 'held' : 'held, close'}${runYear !== null ? `\nfringe ${years(runYear)}` : ''}`, breedingYears: null, fringeYears: runYear };
  }
  if (runYear !== null && (crossing === null || runYear < crossing)) {
    const later = crossing !== null ? `the breeding front passes the clearing in year ${years(crossing)}` : `the breeding front has not passed the clearing within ${T} yr${projected !== null ? ` (projected year ${years(projected)})` : ''}`;
    return { kind: 'fringe', text: `only a thin non-breeding fringe, from year ${years(runYear)}; ${later}`, short: `fringe only\nfrom ${years(runYear)}`, breedingYears: null, fringeYears: runYear };
  }
  if (runYear === null) {
    const proj = site.projectedArrivalYears ?? null;
    return {
      kind: 'not-reached',
      text: `not reached within ${T} yr${proj !== null ? ` (projected year ${years(proj)})` : ''}${base !== null ? `; without the clearing year ${years(base)}` : ''}`,
      short: proj !== null ? `not reached\n(${years(proj)})` : 'not reached',
      breedingYears: null,
      fringeYears: null,
    };
  }
  const d = base !== null ? `, ${sign(runYear - base)} yr` : vs;
  return { kind: 'breeding', text: `breeding population arrives year ${years(runYear)}${d}`, short: `${years(runYear)}${base !== null ? `\n${sign(runYear - base)} yr` : ''}`, breedingYears: runYear, fringeYears: null };
}

/**
 * One width–delay cell that says what it means: "+2.7 yr", "held: no breeding arrival",
 * "site not beyond the clearing", "+2.7 yr (thin fringe only)", "not reached within 40 yr".
 */
export function widthDelayCell(doc: Doc, k: number, row: WidthDelayRow, i: number): string {
  const o = doc.options[k] as LooseOption;
  const T = years(doc.horizonYears).replace(/\.0$/, '');
  const beyond = o.sites?.[i]?.beyondBarrier ?? true;
  if (!beyond) return 'site not beyond the clearing';
  if (row.pinned) return 'held: no breeding arrival';
  const d = row.delayYearsBySite[i];
  if (d === null || d === undefined || !Number.isFinite(d)) {
    return row.crossingYears === null ? `front not past the clearing within ${T} yr` : `crossed; site not reached within ${T} yr`;
  }
  const base = doc.baseline.arrivals[i]?.arrivalYears ?? null;
  const fringe = row.crossingYears === null || (base !== null && base + d < row.crossingYears);
  return `${sign(d)} yr${fringe ? ' (thin fringe only; breeding front not yet across)' : ''}`;
}

/** The width–delay crossing cell: "year 7.1", "never: held", "not within 40 yr". */
export function widthCrossingCell(doc: Pick<ResultDocument, 'horizonYears'>, row: WidthDelayRow): string {
  if (row.pinned) return 'never: held';
  return row.crossingYears === null ? `not within ${years(doc.horizonYears).replace(/\.0$/, '')} yr` : `year ${years(row.crossingYears)}`;
}

/**
 * The spread rate beyond a clearing, one computation for every page: the barrier analysis's measured speed
 * beyond the clearing; "none" for a held or not-crossed front (a fit over a stopped front gives a
 * meaningless negative number).
 */
export function spreadBeyondText(o: LooseOption): string {
  const kind = o.verdict?.kind;
  if (o.pinned || kind === 'holds' || kind === 'marginal') return 'none: the front is held at the clearing';
  if (o.crossingYears && o.crossingYears.option === null) return 'none within the horizon: the front has not crossed';
  const v = o.speeds?.optionKmPerYear ?? null;
  if (v === null || !Number.isFinite(v)) return 'not measured';
  if (v <= 0) return 'none: the front is not advancing';
  return speed(v);
}

/** The baseline (no clearing) spread rate to the right: the baseline run's own straight-line fit. */
export function baselineSpreadText(doc: Pick<ResultDocument, 'baseline'>): string {
  const v = doc.baseline.spreadRates.find((r) => r.direction === 'right')?.kmPerYear ?? null;
  if (v === null || !Number.isFinite(v)) return 'not measured';
  return v <= 0 ? 'none: the front is not advancing' : speed(v);
}
