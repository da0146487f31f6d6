/**
 * The verdict rules (verdict/): from the facts of one option's runs — arrivals with and without the clearing,
 * verified pinning, the critical-width bracket, the crossing and its projection — to the verdict at each
 * protected site and overall, with their sentences. The rules and their sources: server/analysis/README.md.
 */
import type { PointScenario } from '../../model/scenario.ts';
import type { WindowOutcome } from '../run/barrier-run.ts';
import type { BarrierOptionSpec } from '../run/baseline.ts';
import type { SiteVerdict, VerdictKind } from '../result.ts';

export interface Stall {
  stalls: boolean;
  cannotAdvance: boolean;
  reason: string;
}

export interface SiteFacts {
  baseArr: (number | null)[];
  optArr: (number | null)[];
  beyondSites: boolean[];
  projected: WindowOutcome | null;
  pinned: boolean;
  marginal: boolean;
  stall: Stall;
  cost: number | null;
  /** Smallest change in arrival that counts as a change [yr]. */
  dtc: number;
  /** When the breeding front crossed the clearing in the option run (null: not within the horizon). */
  crossedYears: number | null;
}

/** The verdict at each protected site (rules: server/analysis/README.md). */
export function siteVerdicts(s: PointScenario, f: SiteFacts): SiteVerdict[] {
  const { baseArr, optArr, beyondSites, projected, pinned, marginal, cost, dtc } = f;
  const stalls = f.stall.stalls;
  const stallReason = f.stall.reason;
  return s.sites.map((site, k) => {
    const b = baseArr[k];
    let o = optArr[k];
    const beyond = beyondSites[k];
    const proj = o === null && projected ? projected.arrivals[k] : null;
    let kind: VerdictKind;
    let sentence: string;
    let delay: number | null = null;
    if (stalls && b === null && o === null) {
      kind = 'not-reached';
      sentence = `Not reached, with or without the clearing: ${stallReason}.`;
    } else if (pinned && beyond && !stalls) {
      kind = marginal ? 'marginal' : 'holds';
      const fringe = o !== null ? ` Low-density fringe beyond the clearing: the site sees density at the detection level from year ${o.toFixed(1)}, but no breeding population forms.` : '';
      sentence = marginal
        ? `Held in this run, but the width is within the critical-width uncertainty: small changes could let the pest through.${fringe}`
        : `Protected: the front is held at the clearing (holds indefinitely under this model).${fringe}`;
      o = null;
    } else if (b === null && o === null) {
      kind = 'not-reached';
      sentence = `Not reached within ${s.horizonYears} years, with or without the clearing.`;
    } else if (o === null) {
      kind = 'not-crossed';
      sentence =
        `Not reached within the ${s.horizonYears}-year horizon with the clearing (without it: year ${b!.toFixed(1)}); not shown to be held.` +
        (proj !== null && proj !== undefined ? ` Projected arrival: year ${proj.toFixed(1)}.` : ' The extended run did not reach it either.');
      if (proj !== null && proj !== undefined) delay = null;
    } else if (b === null) {
      kind = 'speeds-up';
      sentence = `Reached in year ${o.toFixed(1)} with the clearing but not within ${s.horizonYears} years without it.`;
    } else {
      delay = o - b;
      if (Math.abs(delay) < dtc) {
        kind = 'no-change';
        sentence = `No change: arrives in year ${o.toFixed(1)} either way.`;
      } else if (delay > 0) {
        kind = 'delays';
        sentence = `Arrives ${delay.toFixed(1)} years later than without the clearing (year ${o.toFixed(1)} instead of ${b.toFixed(1)}).`;
        if (beyond && (f.crossedYears === null || o < f.crossedYears)) {
          sentence += ' What arrives then is the thin fringe of insects ahead of the clearing; the breeding front had not crossed by then.';
        }
      } else {
        kind = 'speeds-up';
        sentence = `Arrives ${(-delay).toFixed(1)} years EARLIER than without the clearing (year ${o.toFixed(1)} instead of ${b.toFixed(1)}).`;
      }
    }
    return {
      name: site.name,
      atKm: site.atKm,
      beyondBarrier: beyond,
      baselineArrivalYears: b,
      optionArrivalYears: o,
      projectedArrivalYears: proj ?? null,
      delayYears: delay,
      kind,
      sentence,
      costPerYearOfDelay: cost !== null && delay !== null && delay > 0 ? cost / delay : null,
    };
  });
}

export interface OverallFacts {
  baseCross: number | null;
  optCross: number | null;
  projCross: number | null;
  stall: Stall;
  pinned: boolean;
  marginal: boolean;
  bracket: [number, number] | null;
  firstSite: SiteVerdict | null;
  dtc: number;
}

/** The option's overall verdict and its sentence (rules: server/analysis/README.md). */
export function overallVerdict(s: PointScenario, option: BarrierOptionSpec, f: OverallFacts): { kind: VerdictKind; sentence: string } {
  const { baseCross, optCross, projCross, pinned, marginal, bracket, firstSite, dtc } = f;
  const { stalls, cannotAdvance } = f.stall;
  const stallReason = f.stall.reason;
  let kind: VerdictKind;
  let sentence: string;
  if (stalls && optCross === null) {
    kind = 'not-reached';
    sentence = cannotAdvance
      ? `The pest does not reach the clearing, with or without it: ${stallReason}.`
      : `The front does not get past this point, with or without the clearing: ${stallReason}.`;
  } else if (pinned) {
    kind = marginal ? 'marginal' : 'holds';
    sentence = marginal
      ? `Marginal: the front was held in this run, but ${option.widthM} m is within the critical-width bracket's uncertainty (${bracket![0].toFixed(0)}–${bracket![1].toFixed(0)} m).`
      : 'Holds: the front stops at the clearing and stays there (checked: under this model it holds indefinitely).';
  } else if (marginal) {
    kind = 'marginal';
    sentence = `Marginal: ${option.widthM} m is within the critical-width bracket (${bracket![0].toFixed(0)}–${bracket![1].toFixed(0)} m); near this width the front lingers for a long time, and it was not shown to stay stopped.`;
  } else if (optCross === null && baseCross !== null) {
    kind = 'not-crossed';
    sentence =
      `Not crossed within the ${s.horizonYears}-year horizon (without the clearing the front passes this point in year ${baseCross.toFixed(1)}), but not shown to stay stopped.` +
      (projCross !== null ? ` Projected crossing: year ${projCross.toFixed(1)}.` : ' The extended run neither crossed nor settled.');
  } else if (optCross === null && baseCross === null) {
    kind = 'not-reached';
    sentence = `The front does not reach this point within ${s.horizonYears} years, with or without the clearing.`;
  } else if (firstSite && firstSite.delayYears !== null) {
    kind = firstSite.kind;
    sentence =
      kind === 'delays'
        ? `Delays: arrival at ${firstSite.name} ${firstSite.delayYears.toFixed(1)} years later than without the clearing.`
        : kind === 'speeds-up'
          ? `Speeds up: arrival at ${firstSite.name} ${(-firstSite.delayYears).toFixed(1)} years earlier than without the clearing.`
          : `No change at ${firstSite.name}.`;
  } else {
    const d = baseCross !== null && optCross !== null ? optCross - baseCross : null;
    if (d === null) {
      kind = 'speeds-up';
      sentence = `Speeds up: the front crosses in year ${optCross!.toFixed(1)} but does not pass this point within the horizon without the clearing.`;
    } else if (Math.abs(d) < dtc) {
      kind = 'no-change';
      sentence = 'No change in when the front passes the clearing.';
    } else if (d > 0) {
      kind = 'delays';
      sentence = `Delays: the front passes the clearing ${d.toFixed(1)} years later than it passes the same place without it.`;
    } else {
      kind = 'speeds-up';
      sentence = `Speeds up: the front passes the clearing ${(-d).toFixed(1)} years earlier than it passes the same place without it.`;
    }
  }
  return { kind, sentence };
}
