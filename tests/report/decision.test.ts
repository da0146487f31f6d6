/**
 * The decision words' logic (which case applies), on small hand-made documents; the wording itself is
 * matched loosely so that the report text can be edited without touching this test.
 */
import { describe, expect, it } from 'vitest';
import { alleeThresholdText, bypassOf, spreadBeyondText, transportProbability, widthCrossingCell, widthDelayCell } from '../../server/report/decision.ts';
import type { OptionBypass, WidthDelayRow } from '../../server/analysis/result.ts';

const row = (over: Partial<WidthDelayRow>): WidthDelayRow => ({ widthM: 300, pinned: false, crossingYears: 10, delayYearsBySite: [2], ...over });
// One option with one site beyond the clearing; the baseline reaches the site in year 12.
const doc = {
  horizonYears: 40,
  options: [{ name: 'Cut', widthM: 300, sites: [{ beyondBarrier: true }] }],
  baseline: { arrivals: [{ name: 's', atKm: 20, arrivalYears: 12 }], spreadRates: [] },
} as never;

describe('width–delay cells', () => {
  it('held, not beyond, not reached, a breeding arrival and a fringe-only arrival', () => {
    expect(widthDelayCell(doc, 0, row({ pinned: true }), 0)).toMatch(/^held/);
    const notBeyond = { ...(doc as object), options: [{ name: 'Cut', widthM: 300, sites: [{ beyondBarrier: false }] }] } as never;
    expect(widthDelayCell(notBeyond, 0, row({}), 0)).toMatch(/not beyond/);
    expect(widthDelayCell(doc, 0, row({ delayYearsBySite: [null], crossingYears: null }), 0)).toMatch(/not past the clearing within 40 yr/);
    expect(widthDelayCell(doc, 0, row({ delayYearsBySite: [null] }), 0)).toMatch(/^crossed; site not reached within 40 yr/);
    // Arrival 12 + 2 = 14 after the crossing in year 10: a breeding arrival.
    expect(widthDelayCell(doc, 0, row({ crossingYears: 10 }), 0)).toMatch(/^\+2\.0 yr$/);
    // Arrival 14 before the crossing in year 15: only the thin fringe arrived.
    expect(widthDelayCell(doc, 0, row({ crossingYears: 15 }), 0)).toMatch(/^\+2\.0 yr \(thin fringe/);
  });
  it('crossing cells', () => {
    expect(widthCrossingCell(doc, row({ pinned: true }))).toMatch(/never/);
    expect(widthCrossingCell(doc, row({ crossingYears: null }))).toBe('not within 40 yr');
    expect(widthCrossingCell(doc, row({ crossingYears: 7.14 }))).toBe('year 7.1');
  });
});

describe('transport risk and other words', () => {
  const b = (over: Partial<OptionBypass>) => ({ name: 'Cut', probability: 0.3, ...over }) as OptionBypass;
  it('the ensemble mean when an ensemble ran, else the central run', () => {
    expect(transportProbability(b({}))).toEqual({ p: 0.3, over: 'central' });
    expect(transportProbability(b({ ensemble: { p: 0.45 } as never }))).toEqual({ p: 0.45, over: 'ensemble' });
    expect(transportProbability(b({ ensemble: { p: NaN } as never }))).toEqual({ p: 0.3, over: 'central' });
  });
  it('bypass entries are matched by position, then by name', () => {
    const d = { bypass: { options: [b({ name: 'A' }), b({ name: 'B', probability: 0.9 })] } } as never;
    expect(bypassOf(d, 0, 'A')!.name).toBe('A');
    expect(bypassOf(d, 0, 'B')!.probability).toBe(0.9);
    expect(bypassOf(d, 5)).toBeNull();
  });
  it('spread beyond a clearing: none for a held front, not measured without a speed, the speed otherwise', () => {
    const base = { name: 'Cut', widthM: 300, run: {} as never };
    expect(spreadBeyondText({ ...base, pinned: true })).toMatch(/^none/);
    expect(spreadBeyondText({ ...base, speeds: { baselineKmPerYear: 1, optionKmPerYear: null } })).toBe('not measured');
    expect(spreadBeyondText({ ...base, speeds: { baselineKmPerYear: 1, optionKmPerYear: -0.2 } })).toMatch(/^none/);
    expect(spreadBeyondText({ ...base, speeds: { baselineKmPerYear: 1, optionKmPerYear: 1.234 } })).toBe('1.23 km/yr');
  });
  it('Allee threshold as a share of capacity', () => {
    expect(alleeThresholdText(0.046)).toBe('4.6 % of capacity');
    expect(alleeThresholdText(null)).toMatch(/none/);
  });
});
