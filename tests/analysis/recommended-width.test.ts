/**
 * The recommended minimum width (server/analysis/recommended-width.ts): the rule is this tool's (a stated
 * margin on the model threshold, common practice, no source), so the checks are of the rule itself, by hand:
 * the bracket's upper end or the 95 % ensemble width, plus 20 %, rounded up to 50 m; none without an Allee
 * effect; the phase-plane value carried with its "hosts held at present stocking" flag.
 */
import { describe, expect, it } from 'vitest';
import { MARGIN_SHARE, ROUND_TO_M, recommendWidth, recommendedWidthOf, roundUpTo } from '../../server/analysis/recommended-width.ts';
import type { CriticalWidth, OptionResult, ResultDocument } from '../../server/analysis/result.ts';

const cw = (over: Partial<CriticalWidth>): CriticalWidth => ({
  applicable: true,
  note: '',
  bracketM: [841, 850],
  toleranceM: 10,
  runs: 12,
  phasePlaneM: 1220,
  marginal: false,
  delayPer100mYears: null,
  phasePlaneAssumesIntactHosts: true,
  ...over,
});
const option = (name: string, widthM: number, c: CriticalWidth) => ({ name, widthM, criticalWidth: c }) as unknown as OptionResult;
const doc = (options: OptionResult[], extra: Partial<ResultDocument> = {}) => ({ options, ...extra }) as Pick<ResultDocument, 'options' | 'uncertainty' | 'bypass'>;

describe('recommended minimum width', () => {
  it('rounds up to the step and keeps exact multiples', () => {
    expect(roundUpTo(1020, 50)).toBe(1050);
    expect(roundUpTo(1000, 50)).toBe(1000);
    expect(roundUpTo(1000.0000001, 50)).toBe(1000);
    expect(roundUpTo(1000.01, 50)).toBe(1050);
  });

  it('is the bracket’s upper end plus 20 %, rounded up to 50 m (by hand: 850 × 1.2 = 1020 → 1050)', () => {
    expect(MARGIN_SHARE).toBe(0.2);
    expect(ROUND_TO_M).toBe(50);
    const r = recommendWidth(doc([option('A', 1200, cw({})), option('B', 300, cw({}))]));
    expect(r.basis).toBe('bracket');
    expect(r.widthM).toBe(1050);
    expect(r.thresholdM).toBe(850);
    expect(r.bracketM).toEqual([841, 850]);
    expect(r.optionsMeeting).toEqual([0]);
    expect(r.phasePlaneM).toBe(1220);
    expect(r.phasePlaneAssumesIntactHosts).toBe(true);
  });

  it('takes the widest bracket when options lie at places with different brackets', () => {
    const r = recommendWidth(doc([option('A', 700, cw({ bracketM: [592, 602] })), option('B', 900, cw({ bracketM: [700, 710] }))]));
    expect(r.fromOption).toBe(1);
    expect(r.widthM).toBe(roundUpTo(710 * 1.2, 50)); // 852 → 900
    expect(r.widthM).toBe(900);
  });

  it('uses the width that holds in 95 % of draws when the ensemble computed it and it is wider', () => {
    const uncertainty = {
      options: [{ criticalWidth: { computed: true, note: '', widthM: { n: 1000, beyondHorizon: 0 }, holds90M: 1238, holds95M: 1388 } }],
    } as unknown as ResultDocument['uncertainty'];
    const r = recommendWidth(doc([option('A', 1200, cw({}))], { uncertainty }));
    expect(r.basis).toBe('ensemble-95');
    expect(r.thresholdM).toBe(1388);
    expect(r.widthM).toBe(1700); // 1388 × 1.2 = 1665.6 → 1700
    expect(r.holds90M).toBe(1238);
    expect(r.ensembleDraws).toBe(1000);
    expect(r.optionsMeeting).toEqual([]);
  });

  it('recommends no width without an Allee effect, carrying the delay per 100 m instead', () => {
    const r = recommendWidth(doc([option('A', 500, cw({ applicable: false, bracketM: null, phasePlaneM: null, delayPer100mYears: 0.15 })), option('B', 1500, cw({ applicable: false, bracketM: null, phasePlaneM: null, delayPer100mYears: 0.21 }))]));
    expect(r.basis).toBe('no-width-stops');
    expect(r.widthM).toBeNull();
    expect(r.delayPer100mYears).toBe(0.21);
  });

  it('says "not computed" for a document without the barrier analysis, and reads a stored recommendation first', () => {
    expect(recommendWidth(doc([{ name: 'A', widthM: 100 } as unknown as OptionResult])).basis).toBe('not-computed');
    expect(recommendWidth(doc([])).basis).toBe('not-computed');
    const stored = { ...recommendWidth(doc([option('A', 1200, cw({}))])), widthM: 1234 };
    expect(recommendedWidthOf({ ...doc([option('A', 1200, cw({}))]), recommendedWidth: stored }).widthM).toBe(1234);
  });

  it('flags transport deciding from the bypass analysis', () => {
    const bypass = { options: [{ transportDecides: true }] } as unknown as ResultDocument['bypass'];
    expect(recommendWidth(doc([option('A', 1200, cw({}))], { bypass })).transportDecides).toBe(true);
  });
});
