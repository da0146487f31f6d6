/**
 * Adds the uncertainty (ensemble) and human-carried bypass sections to a result document. Called by
 * evaluateScenario (ensemble in this thread) and evaluateScenarioParallel (jobs/parallel.ts: ensemble on a worker pool).
 */
import type { PointScenario, Scenario } from '../../model/scenario.ts';
import { asProblem, layoutOf, type Problem } from '../../problem/problem.ts';
import { discretise } from '../../problem/discretise.ts';
import { runLayout } from '../run/simulate.ts';
import {
  BypassTracker,
  REGULATOR_NOTE,
  atLeastOne,
  bandWidth,
  barrierGeometry,
  effectiveRate,
  makeSurvivalKernel,
  sourceWeights,
} from './bypass.ts';
import { withFarEdge } from '../../problem/geometry.ts';
import type { BypassResult, OptionBypass, OptionResult, UncertaintyResult } from '../result.ts';
import { percent } from '../words.ts';

/** Extra clearing width used to show how little width helps against transport [km]. */
const EXTRA_WIDTH_KM = 0.1;
/** Bypass probability from which transport counts as deciding (when it also exceeds the natural failure risk). */
const TRANSPORT_MATTERS = 0.05;

const pct = percent;

/** The option's sentence: whether human transport or the width decides, with the chances behind it. */
function bypassSentence(
  name: string,
  horizonYears: number,
  c: { pBypass: number; overDraws: boolean; probability: number; wider100: number; holdsNatural: number; transportDecides: boolean },
): string {
  const chance =
    `${pct(c.pBypass)}${c.overDraws ? ' over the draws where the front holds' : ''} ` +
    `(at the central values ${pct(c.probability)}; ${pct(c.wider100)} with a clearing 100 m wider)`;
  return c.transportDecides
    ? `Option "${name}": human transport, not the width, decides. An established introduction beyond the clearing within ${horizonYears} years has probability ${chance}, ` +
        `more than the risk that the front itself gets through (${pct(1 - c.holdsNatural)}). ${REGULATOR_NOTE}`
    : `Option "${name}": the chance of an established human-carried introduction beyond the clearing within ${horizonYears} years is ${chance}; ` +
        `natural spread is the larger risk here (front gets through: ${pct(1 - c.holdsNatural)}).`;
}

/**
 * Bypass risk per option from a run at the central values (curve by year, and with the clearing 100 m
 * wider), combined with the ensemble when there is one.
 */
export function analyseBypass(
  sp: PointScenario | Problem,
  optionResults: readonly Pick<OptionResult, 'crossingYears'>[],
  uncertainty: UncertaintyResult | undefined,
  shouldCancel?: () => boolean,
): BypassResult | undefined {
  const p = asProblem(sp);
  const s = p.scenario;
  const t = s.transport;
  if (!t) return undefined;
  const kernel = makeSurvivalKernel(t.kernel);
  const band = bandWidth(s);
  const rate = effectiveRate(t);
  const years = Array.from({ length: Math.floor(s.horizonYears) + 1 }, (_, k) => k);
  if (years[years.length - 1] < s.horizonYears) years.push(s.horizonYears);
  const options: OptionBypass[] = (s.barrier?.options ?? []).map((o, m) => {
    const g = barrierGeometry(s, o);
    const wider = withFarEdge(g, g.side === 'right' ? g.farKm + EXTRA_WIDTH_KM : g.farKm - EXTRA_WIDTH_KM);
    const pieces = layoutOf(p, o);
    const problem = discretise(p, pieces);
    const { grid, hostAtCells } = problem;
    const tracker = new BypassTracker(
      [sourceWeights(grid, hostAtCells, g, kernel, band), sourceWeights(grid, hostAtCells, wider, kernel, band)],
      rate,
      s.detectionLevel,
      years,
    );
    runLayout({ scenario: p, pieces, problem, record: false, observers: [tracker], shouldCancel });
    const probability = atLeastOne(tracker.total(0));
    const ens = uncertainty?.options[m];
    // Natural spread: the barrier analysis's crossing within the horizon (central values), or the ensemble.
    const holdsNatural = ens ? ens.holdsWithinHorizon.p : optionResults[m]?.crossingYears.option === null ? 1 : 0;
    let ensemble = null;
    let holdsOverall = holdsNatural * (1 - probability);
    if (ens?.holdsIncludingTransport && ens.holdsWithinHorizon.p > 0) {
      // E[e^(−Λ) | holds] = P(holds and no bypass) / P(holds).
      const p = 1 - ens.holdsIncludingTransport.p / ens.holdsWithinHorizon.p;
      ensemble = { p, standardError: ens.holdsIncludingTransport.standardError / ens.holdsWithinHorizon.p, n: ens.holdsWithinHorizon.n };
      holdsOverall = ens.holdsIncludingTransport.p;
    }
    const pBypass = ensemble ? ensemble.p : probability;
    const transportDecides = pBypass >= TRANSPORT_MATTERS && pBypass > 1 - holdsNatural;
    const wider100 = atLeastOne(tracker.total(1));
    const sentence = bypassSentence(o.name, s.horizonYears, { pBypass, overDraws: ensemble !== null, probability, wider100, holdsNatural, transportDecides });
    return {
      name: o.name,
      widthM: o.widthM,
      protectsSide: g.side,
      expectedEstablished: tracker.total(0),
      probability,
      curve: { timesYears: tracker.timesYears, probability: tracker.lambdaAtTimes[0].map(atLeastOne) },
      probabilityIf100mWider: wider100,
      ensemble,
      holdsNatural,
      holdsOverall,
      transportDecides,
      sentence,
    };
  });
  return {
    method:
      'Stratified dispersal (Shigesada, Kawasaki & Takeda 1995): introductions from the simulated infested forest as a Poisson process, ' +
      'thinned by direction, transport distance and establishment; P(at least one beyond the barrier by year T) = 1 − exp(−Λ(T)).',
    inputs: {
      ratePerKm2Year: t.ratePerKm2Year,
      kernel: t.kernel,
      establishmentProbability: t.establishmentProbability,
      forwardShare: t.forwardShare,
      bandWidthKm: band,
    },
    options,
    regulatorNote: REGULATOR_NOTE,
  };
}

/** Share of the progress bar given to the single runs when an ensemble follows (by run count). */
export function singleRunShare(scenario: Scenario): number {
  if (!scenario.uncertainty) return 1;
  return 1 / (1 + scenario.uncertainty.draws);
}
