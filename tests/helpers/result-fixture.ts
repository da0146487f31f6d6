/**
 * A synthetic but complete result document for tests of the presentation layer (charts, briefing, web
 * pages): every field of OptionResult filled (verdicts, site verdicts, critical width, width–delay rows,
 * trees), mosaics and, on request, an uncertainty section. The runs are not simulations: fronts move at a
 * constant speed and stop, wait or jump at each clearing according to the option's verdict kind, so tests
 * know exactly what the charts and tables must show. The scenario behind it is real (validated), so the
 * fingerprint, layout, trees removed and parameters table are consistent with it.
 */
import { parseScenario, pointScenario, type Scenario, type ScenarioInput } from '../../server/model/scenario.ts';
import { buildLayout, stemsRemoved } from '../../server/analysis/layout.ts';
import { allCautions } from '../../server/analysis/cautions.ts';
import { documentHeader } from '../../server/analysis/evaluate.ts';
import { type UncertaintyResult, type MosaicResult, type OptionResult, type ResultDocument, type RunResult, type SiteVerdict, type VerdictKind } from '../../server/analysis/result.ts';

export interface FixtureSpec {
  title?: string;
  /** Barrier options, 0–8 (default 3). */
  nOptions?: number;
  /** Protected sites, 0–12 (default 2). */
  nSites?: number;
  /** Names: option k, site i (defaults are invented Ossenvale names). */
  optionName?: (k: number) => string;
  siteName?: (i: number) => string;
  /** Fill the barrier-analysis fields (verdicts, sites, critical width, …). false = only `run`, as before issue 3. Default true. */
  analysis?: boolean;
  mosaics?: boolean;
  uncertainty?: boolean;
  /** Pest profile marked illustrative (default true). */
  illustrative?: boolean;
  runAt?: string;
}

/** Front speed of the synthetic runs [km/yr]. */
export const FIXTURE_SPEED = 1.2;
export const FIXTURE_HORIZON = 40;
/** Verdict kinds given to options 0, 1, 2, … in turn. */
export const FIXTURE_KINDS: VerdictKind[] = ['holds', 'delays', 'speeds-up', 'not-crossed', 'marginal', 'delays', 'no-change', 'holds'];
const WIDTHS = [800, 200, 400, 1200, 600, 300, 1500, 1000];
const SITE_NAMES = ['Brackfen Mill village', 'Saltrin Hollow seed orchard', 'Quellan campground', 'Upper Moravin nursery', 'Tarrow bridge', 'Elsby school woods', 'Greyholm arboretum', 'Heddle spring', 'Corran farm', 'Wistmere chapel', 'Dunlow ford', 'Ossen lookout'];
const OPTION_NAMES = ['Wide cut at km 6', 'Narrow cut at km 8', 'Ridge cut at km 10', 'Broad belt at km 12', 'Valley cut at km 14', 'Stream cut at km 16', 'Estate belt at km 18', 'Far cut at km 20'];
const TRANSECT_KM = 60;
const INFESTED_TO_KM = 3;

/** The scenario input behind the fixture (plain JSON, as a user would write it). */
export function fixtureScenarioInput(spec: FixtureSpec = {}): ScenarioInput {
  const nOptions = spec.nOptions ?? 3;
  const nSites = spec.nSites ?? 2;
  return {
    version: 1,
    title: spec.title ?? 'Ossenvale east flank: clearing options against an illustrative borer',
    description: 'Purpose: synthetic fixture for presentation tests. Invented place and pest.',
    region: 'Ossenvale Forest District (invented)',
    pest: {
      name: 'Ossenvale bark-borer (illustrative profile)',
      illustrative: spec.illustrative ?? true,
      diffusionHost: 1,
      diffusionOpen: { dist: 'uniform', min: 0.5, max: 1.5 },
      diffusionNonHost: 0.8,
      edgePreferenceOpen: 0.8,
      edgePreferenceNonHost: 0.7,
      growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.2 },
      hostKillRate: 0.05,
      mortalityOpen: 5,
      mortalityNonHost: 1,
    },
    transect: {
      segments: [
        { habitat: 'host-forest', name: 'Greyholm stand', lengthKm: 22, stocking: 0.9, stemsPerHa: 420 },
        { habitat: 'non-host-forest', name: 'Brackfen birches', lengthKm: 2 },
        { habitat: 'host-forest', name: 'Saltrin slopes', lengthKm: 36, stocking: 0.7, stemsPerHa: 380 },
      ],
    },
    infestation: { fromKm: 0, toKm: INFESTED_TO_KM },
    sites: Array.from({ length: nSites }, (_, i) => ({
      name: (spec.siteName ?? ((j: number) => SITE_NAMES[j % SITE_NAMES.length] + (j >= SITE_NAMES.length ? ` ${j}` : '')))(i),
      atKm: 25 + (33 * (i + 0.5)) / Math.max(1, nSites),
    })),
    barrier: {
      lengthKm: 6,
      costPerStem: 35,
      costUnit: 'credits',
      options: Array.from({ length: nOptions }, (_, k) => ({
        name: (spec.optionName ?? ((j: number) => OPTION_NAMES[j % OPTION_NAMES.length]))(k),
        fromKm: 6 + 2 * k,
        widthM: WIDTHS[k % WIDTHS.length],
        cover: k === 3 ? ('non-host-forest' as const) : ('clearing' as const),
      })),
    },
    horizonYears: FIXTURE_HORIZON,
  };
}

/** Delay bought by option k when its kind delays [yr]. */
export function fixtureDelayYears(k: number): number {
  return FIXTURE_KINDS[k % FIXTURE_KINDS.length] === 'marginal' ? 15 : 4 + k;
}

/** Front position [km] of a synthetic run at time t. */
function frontAt(t: number, clearing: { fromKm: number; toKm: number } | null, kind: VerdictKind | null, delay: number): number {
  const free = (t0: number, x0: number, c = FIXTURE_SPEED) => x0 + c * Math.max(0, t - t0);
  const base = Math.min(TRANSECT_KM, free(0, INFESTED_TO_KM));
  if (!clearing || !kind || kind === 'no-change') return base;
  const tHit = (clearing.fromKm - INFESTED_TO_KM) / FIXTURE_SPEED;
  if (t <= tHit) return base;
  switch (kind) {
    case 'holds':
    case 'not-crossed':
      return clearing.fromKm;
    case 'speeds-up':
      return Math.min(TRANSECT_KM, free(tHit, clearing.toKm, 1.5 * FIXTURE_SPEED));
    default:
      return t <= tHit + delay ? clearing.fromKm : Math.min(TRANSECT_KM, free(tHit + delay, clearing.toKm));
  }
}

const linspace = (a: number, b: number, n: number) => Array.from({ length: n }, (_, k) => a + ((b - a) * k) / (n - 1));

function syntheticRun(scenario: Scenario, clearing: { fromKm: number; toKm: number } | null, kind: VerdictKind | null, delay: number, option?: { fromKm: number; widthM: number; cover: 'clearing' | 'non-host-forest' }): RunResult {
  const s = pointScenario(scenario);
  const pieces = buildLayout(s, option);
  const front = (t: number) => frontAt(t, clearing, kind, delay);
  const times = linspace(0, FIXTURE_HORIZON, 401);
  const stockingAt = (x: number) => pieces.find((p) => x >= p.fromKm && x <= p.toKm)?.stocking ?? 0;
  const density = (x: number, t: number) => (stockingAt(x) > 0 || x <= front(t) ? 1 / (1 + Math.exp((x - front(t)) / 0.8)) : 0);
  const host = (x: number, t: number) => stockingAt(x) * (1 - 0.7 * (1 - Math.exp(-Math.max(0, front(t) - x) / 5)));
  const px = linspace(0.05, TRANSECT_KM - 0.05, 200);
  const mx = linspace(0.1, TRANSECT_KM - 0.1, 300);
  const arrival = (atKm: number): number | null => {
    const i = times.findIndex((t) => front(t) >= atKm);
    return i < 0 ? null : times[i];
  };
  return {
    layout: pieces.map((p) => ({ fromKm: p.fromKm, toKm: p.toKm, habitat: p.habitat, stocking: p.stocking, stemsPerHa: p.stemsPerHa, barrier: p.barrier })),
    series: { timesYears: times, rightFrontKm: times.map(front), leftFrontKm: times.map(() => 0), totalInsects: times.map((t) => front(t)) },
    profiles: { xKm: px, snapshots: linspace(0, FIXTURE_HORIZON, 7).map((t) => ({ timeYears: t, density: px.map((x) => density(x, t)), host: px.map((x) => host(x, t)) })) },
    spaceTime: { xKm: mx, timesYears: linspace(0, FIXTURE_HORIZON, 61), density: linspace(0, FIXTURE_HORIZON, 61).map((t) => mx.map((x) => density(x, t))) },
    arrivals: s.sites.map((site) => ({ name: site.name, atKm: site.atKm, arrivalYears: arrival(site.atKm) })),
    spreadRates: [
      { direction: 'right', kmPerYear: FIXTURE_SPEED, fromYears: 10, toYears: 30, rSquared: 1 },
      { direction: 'left', kmPerYear: null, fromYears: null, toYears: null, rSquared: null },
    ],
    host: { remainingFraction: 0.8, stemsKilledPerKm: 12000 },
    endYears: FIXTURE_HORIZON,
    numerics: { status: 'completed', message: 'reached the horizon', nCells: 1200, cellKmMin: 0.01, cellKmMax: 0.05, stepYears: 0.01, autoCell: true, autoStep: true, steps: 4000, rejectedSteps: 0, stepControl: 'fixed', fallbackSteps: 0, reactionSubsteps: 0, wallMs: 100 },
  };
}

function siteSentence(kind: VerdictKind, base: number | null, opt: number | null, horizon: number): string {
  const y = (x: number) => x.toFixed(1);
  if (opt === null && base === null) return `Not reached within ${horizon} years, with or without the clearing.`;
  if (opt === null) return `Not reached within ${horizon} years (year ${y(base as number)} without the clearing).`;
  if (base === null) return `Reached in year ${y(opt)}; not reached within ${horizon} years without the clearing.`;
  const d = opt - base;
  if (Math.abs(d) < 0.05) return `No change: reached in year ${y(opt)} either way.`;
  return d > 0 ? `Arrives ${y(d)} years later than without the clearing (year ${y(opt)} instead of ${y(base)}).` : `Arrives ${y(-d)} years EARLIER than without the clearing (year ${y(opt)} instead of ${y(base)}).`;
}

function fixtureMosaics(): MosaicResult[] {
  // λ(s) = a s² + b has c* = min λ/s = 2√(ab) at s = √(b/a).
  const curve = (a: number, b: number) => {
    const s = linspace(0.05, 3, 60);
    return { s, lambda: s.map((x) => a * x * x + b) };
  };
  return [
    { name: 'Strips 300/100', forestM: 300, gapM: 100, cover: 'clearing', lambda0: 0.4, persists: true, exactKmPerYear: 2 * Math.sqrt(0.5 * 0.4), homogenisedKmPerYear: 0.85, intactKmPerYear: 1.2, measuredKmPerYear: 0.9, kind: 'slows', sentence: 'Strips of 300 m forest and 100 m gap slow the pest to 0.89 km/yr (1.20 km/yr in intact forest).', curve: curve(0.5, 0.4) },
    { name: 'Strips 100/300', forestM: 100, gapM: 300, cover: 'clearing', lambda0: -0.2, persists: false, exactKmPerYear: null, homogenisedKmPerYear: null, intactKmPerYear: 1.2, measuredKmPerYear: null, kind: 'stops', sentence: 'Strips of 100 m forest and 300 m gap stop the pest: it cannot persist in this pattern.', curve: curve(0.5, -0.2) },
  ];
}

/** An uncertainty section of the ensemble analysis's type (issue 6); typed, so a layout change shows up here. */
function fixtureUncertainty(doc: ResultDocument): UncertaintyResult {
  const q = (median: number | null) => ({ p05: median === null ? null : median * 0.8, median, p95: median === null ? null : median * 1.25, mean: median, n: 200, beyondHorizon: 0, medianStandardError: 0.3 });
  return {
    method: 'latin-hypercube' as const,
    draws: 200,
    completed: 200,
    status: 'completed' as const,
    seed: 7,
    parameters: [{ path: 'pest.diffusionOpen', label: 'Movement in the open (clearing)', unit: 'km²/yr', distribution: { dist: 'uniform', min: 0.5, max: 1.5 }, centralValue: 1, clippedDraws: 0 }],
    baseline: { sites: [] },
    options: doc.options.map((o, k) => ({
      name: o.name,
      widthM: o.widthM,
      holdsWithinHorizon: { p: [0.93, 0.41, 0.05][k % 3], standardError: 0.018, n: 200 },
      pinned: null,
      crossingYears: q(o.crossingYears?.option ?? null),
      holdsIncludingTransport: null,
      sites: [],
      criticalWidth: { computed: true, note: 'Per-draw critical width by bisection.', widthM: q(410), holds90M: 520 + 10 * k, holds95M: 580 + 10 * k },
      sensitivity: null,
      sentences: [`Option ${o.name} holds in ${[93, 41, 5][k % 3]} % of draws (± 2 %).`],
    })),
    convergence: { targetStandardError: 0.02, largestStandardError: 0.018, adequate: true, drawsSuggested: 200, message: 'Enough draws: largest standard error 0.018 ≤ target 0.02.' },
    threads: 2,
    wallMs: 1234,
  };
}

/** Builds the scenario (validated) and a synthetic result document consistent with it. */
export function makeResultFixture(spec: FixtureSpec = {}): { input: ScenarioInput; scenario: Scenario; doc: ResultDocument } {
  const input = fixtureScenarioInput(spec);
  const scenario = parseScenario(input);
  const s = pointScenario(scenario);
  const baseline = syntheticRun(scenario, null, null, 0);
  const analysis = spec.analysis ?? true;
  const options: OptionResult[] = (s.barrier?.options ?? []).map((o, k) => {
    const kind = FIXTURE_KINDS[k % FIXTURE_KINDS.length];
    const delay = fixtureDelayYears(k);
    const clearing = { fromKm: o.fromKm, toKm: o.fromKm + o.widthM / 1000 };
    const run = syntheticRun(scenario, clearing, kind, delay, o);
    if (!analysis) return { name: o.name, fromKm: o.fromKm, widthM: o.widthM, cover: o.cover, run } as unknown as OptionResult;
    const sites: SiteVerdict[] = s.sites.map((site, i) => {
      const b = baseline.arrivals[i].arrivalYears;
      const a = run.arrivals[i].arrivalYears;
      const delayYears = a !== null && b !== null ? a - b : null;
      const siteKind: VerdictKind = a === null && b === null ? 'not-reached' : a === null ? kind : delayYears !== null && Math.abs(delayYears) < 0.05 ? 'no-change' : delayYears !== null && delayYears < 0 ? 'speeds-up' : 'delays';
      const stems = stemsRemoved(s, o, s.barrier?.lengthKm ?? 1);
      return {
        name: site.name,
        atKm: site.atKm,
        beyondBarrier: site.atKm > clearing.toKm,
        baselineArrivalYears: b,
        optionArrivalYears: a,
        delayYears,
        kind: siteKind,
        sentence: siteSentence(siteKind, b, a, FIXTURE_HORIZON),
        costPerYearOfDelay: delayYears !== null && delayYears > 0 ? (stems * 35) / delayYears : null,
      };
    });
    const stems = stemsRemoved(s, o, s.barrier?.lengthKm ?? 1);
    const tHit = (o.fromKm - INFESTED_TO_KM) / FIXTURE_SPEED;
    const crossing = kind === 'holds' || kind === 'not-crossed' ? null : kind === 'speeds-up' || kind === 'no-change' ? tHit : tHit + delay;
    const sentences: Record<VerdictKind, string> = {
      holds: `Holds: the front stops at the clearing (verified steady state); no site beyond it is reached within ${FIXTURE_HORIZON} years.`,
      marginal: `Marginal: ${o.widthM} m lies inside the critical-width bracket, so the model cannot say whether it holds.`,
      'not-crossed': `Not crossed within ${FIXTURE_HORIZON} years, but not shown to hold for good.`,
      delays: `Delays the pest by ${delay.toFixed(1)} years at ${s.sites[0]?.name ?? 'the sites'}.`,
      'speeds-up': 'Speeds the pest up: it moves faster across the open ground than through the forest.',
      'no-change': 'No change: the clearing makes no difference to arrival times.',
      'not-reached': `Neither baseline nor option reaches the sites within ${FIXTURE_HORIZON} years.`,
    };
    const lo = 380;
    const hi = 420;
    return {
      name: o.name,
      fromKm: o.fromKm,
      widthM: o.widthM,
      cover: o.cover,
      run,
      verdict: { kind, sentence: sentences[kind], why: `Synthetic verdict of kind ${kind}.` },
      pinned: kind === 'holds',
      pinning: { verified: kind === 'holds', method: 'steady state', detail: kind === 'holds' ? 'Residual below tolerance.' : 'Front crossed.' },
      crossingYears: { baseline: tHit, option: crossing, projected: null },
      sites,
      criticalWidth: { applicable: true, note: 'Bisection on full-model runs, checked with the phase-plane criterion.', bracketM: [lo, hi], toleranceM: hi - lo, runs: 7, phasePlaneM: 401.3, marginal: o.widthM >= lo && o.widthM <= hi, delayPer100mYears: null },
      widthDelay: [100, 200, 300, 400, 500, 700, 1000].map((w) => ({
        widthM: w,
        pinned: w >= hi,
        crossingYears: w >= hi ? null : tHit + w / 50,
        delayYearsBySite: s.sites.map((site) => (w >= hi || site.atKm <= clearing.toKm ? null : w / 50)),
      })),
      speeds: { baselineKmPerYear: FIXTURE_SPEED, optionKmPerYear: kind === 'speeds-up' ? 1.5 * FIXTURE_SPEED : kind === 'holds' ? null : FIXTURE_SPEED },
      trees: { stemsRemoved: stems, cost: stems * 35, costUnit: 'credits' },
    };
  });
  const doc: ResultDocument = {
    ...documentHeader(scenario, spec.runAt ?? '2031-05-04T09:30:00.000Z'),
    model: { growthForm: 'allee-cubic', lowDensityRate: -0.2, alleeThreshold: 0.2, linearSpeedKmPerYear: 0, hostDepletion: true },
    baseline,
    options,
    cautions: allCautions(),
  };
  if (spec.mosaics ?? analysis) doc.mosaics = fixtureMosaics();
  if (spec.uncertainty) doc.uncertainty = fixtureUncertainty(doc);
  return { input, scenario, doc };
}
