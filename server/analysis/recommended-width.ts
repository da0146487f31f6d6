/**
 * One recommended minimum clearing width per scenario: the answer to "how wide must we cut?".
 *
 * Numbers only (no wording): the report layer (server/report/decision.ts) turns this into sentences for
 * the web pages, the CLI summary and the briefing cover, so all three say the same thing.
 *
 * Rule (common practice of adding a safety margin to a model threshold, no source; the 20 % and the 50 m
 * rounding are this tool's choice and are stated with every recommendation):
 * - the model threshold is the upper end of the critical-width bracket (the narrowest width verified to pin
 *   the front in the full runs), taken over all options (each option's place can differ);
 * - when an ensemble computed the per-draw critical width, the width that holds in 95 % of draws is a
 *   second threshold (parameter uncertainty); the larger of the two counts;
 * - the recommendation is that threshold plus `MARGIN_SHARE`, rounded up to the next `ROUND_TO_M`.
 * Without a strong Allee effect no finite clearing pins the front in this model: no width is recommended and
 * the delay bought per 100 m is carried instead.
 */
import type { CriticalWidth, OptionResult, RecommendedWidth, ResultDocument } from './result.ts';

export type { RecommendationBasis, RecommendedWidth } from './result.ts';

/** Safety margin added to the model threshold (share of it). Common practice, no source: this tool's choice. */
export const MARGIN_SHARE = 0.2;
/** Recommended widths are rounded up to this step [m] (a width a crew can mark out). */
export const ROUND_TO_M = 50;

const finite = (x: unknown): x is number => typeof x === 'number' && Number.isFinite(x);

/** Rounds up to the next multiple of `step` (a tolerance of a millionth of a step keeps round-off such as 1 000.0000001 at 1 000). */
export function roundUpTo(x: number, step: number): number {
  return Math.ceil(x / step - 1e-6) * step;
}

/**
 * The recommendation for a result document (reads only fields of the document, so it works on stored
 * documents too).
 */
export function recommendWidth(doc: Pick<ResultDocument, 'options' | 'uncertainty' | 'bypass'>): RecommendedWidth {
  const options = (doc.options ?? []) as Partial<OptionResult>[];
  const base: RecommendedWidth = {
    basis: 'not-computed',
    widthM: null,
    thresholdM: null,
    bracketM: null,
    fromOption: null,
    holds90M: null,
    holds95M: null,
    ensembleDraws: 0,
    marginShare: MARGIN_SHARE,
    roundToM: ROUND_TO_M,
    phasePlaneM: null,
    phasePlaneAssumesIntactHosts: false,
    optionsMeeting: [],
    delayPer100mYears: null,
    transportDecides: Boolean(doc.bypass?.options?.some((o) => o.transportDecides)),
  };
  const cws = options.map((o) => o.criticalWidth as CriticalWidth | undefined);
  if (!cws.some((c) => c)) return base;
  if (cws.every((c) => !c || !c.applicable)) {
    const delays = cws.map((c) => c?.delayPer100mYears).filter(finite);
    return { ...base, basis: 'no-width-stops', delayPer100mYears: delays.length ? Math.max(...delays) : null };
  }
  // The option with the widest verified-pinning width sets the model threshold.
  let k = -1;
  cws.forEach((c, i) => {
    if (c?.applicable && c.bracketM && finite(c.bracketM[1]) && (k < 0 || c.bracketM[1] > cws[k]!.bracketM![1])) k = i;
  });
  if (k < 0) return { ...base, basis: 'not-found' };
  const c = cws[k]!;
  const bracket: [number, number] = [c.bracketM![0], c.bracketM![1]];
  let holds90: number | null = null;
  let holds95: number | null = null;
  let draws = 0;
  for (const u of doc.uncertainty?.options ?? []) {
    if (!u.criticalWidth?.computed) continue;
    draws = Math.max(draws, (u.criticalWidth.widthM?.n ?? 0) + (u.criticalWidth.widthM?.beyondHorizon ?? 0));
    if (finite(u.criticalWidth.holds90M)) holds90 = Math.max(holds90 ?? 0, u.criticalWidth.holds90M);
    if (finite(u.criticalWidth.holds95M)) holds95 = Math.max(holds95 ?? 0, u.criticalWidth.holds95M);
  }
  const useEnsemble = holds95 !== null && holds95 > bracket[1];
  const threshold = useEnsemble ? holds95! : bracket[1];
  const widthM = roundUpTo(threshold * (1 + MARGIN_SHARE), ROUND_TO_M);
  return {
    ...base,
    basis: useEnsemble ? 'ensemble-95' : 'bracket',
    widthM,
    thresholdM: threshold,
    bracketM: bracket,
    fromOption: k,
    holds90M: holds90,
    holds95M: holds95,
    ensembleDraws: draws,
    phasePlaneM: finite(c.phasePlaneM) ? c.phasePlaneM : null,
    phasePlaneAssumesIntactHosts: Boolean(c.phasePlaneAssumesIntactHosts),
    optionsMeeting: options.map((o, i) => (finite(o.widthM) && o.widthM >= widthM ? i : -1)).filter((i) => i >= 0),
  };
}

/** The document's recommendation, or one computed from it for documents stored before it existed. */
export function recommendedWidthOf(doc: Pick<ResultDocument, 'options' | 'uncertainty' | 'bypass'> & { recommendedWidth?: RecommendedWidth }): RecommendedWidth {
  return doc.recommendedWidth ?? recommendWidth(doc);
}
