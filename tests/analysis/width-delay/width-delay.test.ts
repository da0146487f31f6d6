/** The width–delay curve: default widths and the slope through the origin by hand; a short run on a small transect. */
import { describe, expect, it } from 'vitest';
import { autoCurveWidths, delayPer100m, widthDelayCurve } from '../../../server/analysis/width-delay/width-delay.ts';
import { analyseBaseline, mergedResolution, optionKey } from '../../../server/analysis/run/baseline.ts';
import { buildProblem } from '../../../server/problem/problem.ts';
import { hostSegment, testPest, testScenario } from '../../helpers/scenario.ts';
import { expectAllClose } from '../../helpers/close.ts';
import type { WidthDelayRow } from '../../../server/analysis/result.ts';

describe('autoCurveWidths', () => {
  it('five even steps up to max(2 × option, 1.5 × upper bracket end), rounded to metres', () => {
    expect(autoCurveWidths(300, null)).toEqual([120, 240, 360, 480, 600]);
    expect(autoCurveWidths(300, [700, 710])).toEqual([213, 426, 639, 852, 1065]); // top 1065
  });
});

describe('delayPer100m', () => {
  const row = (widthM: number, d: (number | null)[]): WidthDelayRow => ({ widthM, pinned: false, crossingYears: null, delayYearsBySite: d });
  it('least squares through the origin × 100 (hand sums), skipping sites without a delay', () => {
    // Site 0: widths 100, 200, 300 with delays 1, 2.2, 2.9: Σwd = 100 + 440 + 870 = 1410, Σw² = 140 000 → 1.00714… yr/100 m.
    const rows = [row(100, [1, null]), row(200, [2.2, 3]), row(300, [2.9, null])];
    expectAllClose(delayPer100m(rows, 0)!, (100 * 1410) / 140_000, { rtol: 1e-14 });
    expect(delayPer100m(rows, 1)).toBeNull(); // one point only
  });
});

describe('widthDelayCurve', () => {
  it('a 1 m clearing buys no measurable delay; wider clearings buy more (logistic pest, 30 km transect)', () => {
    const s = testScenario({
      pest: testPest({ growth: { form: 'logistic', rate: 1 }, mortalityOpen: 2 }),
      transect: { originKm: 0, segments: [hostSegment(30)] },
      infestation: { fromKm: 0, toKm: 1, density: 1 },
      sites: [{ name: 'test site', atKm: 20 }, { name: 'behind', atKm: 4 }],
      horizonYears: 14,
    });
    const p = buildProblem(s);
    const option = { fromKm: 8, widthM: 400, cover: 'clearing' as const };
    const base = analyseBaseline(p, [option], { record: false });
    const arrivals = base.summary.arrivals.map((a) => a.arrivalYears);
    const rows = widthDelayCurve(p, option, base.crossings.get(optionKey(option))!, arrivals, [1, 200, 400], mergedResolution(p, [option]));
    const d = rows.map((r) => r.delayYearsBySite[0]!);
    console.log('width–delay (1, 200, 400 m):', d.map((x) => x.toFixed(3)).join(', '), 'yr');
    expect(Math.abs(d[0])).toBeLessThan(0.06); // about one step (0.05 yr)
    expect(d[1]).toBeGreaterThan(0.05);
    // A pulled front's leading edge loses a factor e^(−βw) across the gap (β = √(m/D)), which shifts the front by
    // βw/λ: the delay grows linearly in the width (own reasoning, no source) — measured 0.115 and 0.223 yr.
    expect(d[2] / d[1]).toBeGreaterThan(1.7);
    expect(d[2] / d[1]).toBeLessThan(2.3);
    expect(rows.every((r) => r.delayYearsBySite[1] === null)).toBe(true); // the site behind the clearing has no delay
    expect(rows.every((r) => !r.pinned)).toBe(true); // logistic fronts are never pinned
  });
});
