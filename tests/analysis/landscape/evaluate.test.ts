/**
 * evaluateLandscape on small invented maps: the way past (around the ends of a short band, through a band
 * spanning the map), trees removed against area × density, cost, settings errors.
 */
import { describe, expect, it } from 'vitest';
import { LOGISTIC_TEST_PEST, makeLandscape } from '../../helpers/landscape.ts';
import { evaluateLandscape } from '../../../server/analysis/landscape/evaluate.ts';
import { fieldToJson } from '../../../server/analysis/landscape/result.ts';
import { InputError } from '../../../server/model/errors.ts';
import type { PointPest } from '../../../server/analysis/landscape/problem.ts';

const pest = LOGISTIC_TEST_PEST as unknown as PointPest;

// 12 × 8 km at 100 m; infested west strip; a site in the east; a short band (4 km of 8) and one across the map.
const L = makeLandscape({
  nx: 120,
  ny: 80,
  cellM: 100,
  stemsPerHa: 500,
  infestedAt: (x) => (x < 1500 ? 1 : 0),
  sites: [{ name: 'east stand', at: (x, y) => Math.abs(x - 10050) < 60 && Math.abs(y - 4050) < 60 }],
  bands: [
    { id: 'short', inside: (x, y) => x > 5000 && x < 5400 && y > 2000 && y < 6000, widthM: 400 },
    { id: 'across', inside: (x) => x > 5000 && x < 5400, widthM: 400 },
  ],
});

describe('evaluateLandscape', () => {
  const r = evaluateLandscape(L, pest, { horizonYears: 12, crossSection: false, costPerStem: 2, costUnit: 'EUR' });

  it('tells around the ends of a short band from through a band across the map', () => {
    const [short, across] = r.options;
    console.log(short.wayPastSentence, '|', across.wayPastSentence);
    expect(r.baseline.sites[0].detectedYears).not.toBeNull();
    expect(short.sites[0].behindBand).toBe(true);
    expect(short.wayPast).toBe('around');
    expect(across.wayPast).toBe('through');
    expect(across.bandCells.coreReached).toBeGreaterThan(0);
    // Through a band is slower than around a short one; both later than no band at all.
    expect(across.sites[0].optionArrivalYears!).toBeGreaterThan(short.sites[0].optionArrivalYears!);
    expect(short.sites[0].delayYears!).toBeGreaterThan(0);
    expect(across.verdict.kind).toBe('delays');
    // Logistic growth: no band pins a front, so "holds" is never claimed.
    expect(across.pinning.verified).toBe(false);
  });

  it('stops runs early only once the outcomes an ensemble draw keeps are decided (reached sites, way past)', () => {
    const early = evaluateLandscape(L, pest, { horizonYears: 12, crossSection: false, stopWhenSitesReached: true });
    const step = r.baseline.numerics.stepYears;
    const runs = [[r.baseline, early.baseline], ...r.options.map((o, j) => [o.run, early.options[j].run])];
    for (const [full, cut] of runs) {
      expect(cut.sites).toEqual(full.sites);
      const last = Math.max(...full.sites.map((s) => s.detectedYears!));
      // It stops after the last arrival plus the way-past tolerance (two steps or 2 %), before the horizon.
      expect(cut.endYears).toBeGreaterThanOrEqual(last + Math.max(2 * step, 0.02 * last) - 1e-9);
      expect(cut.endYears).toBeLessThan(Math.min(12, last + Math.max(2 * step, 0.02 * last) + step + 1e-9));
    }
    r.options.forEach((o, j) => {
      expect(early.options[j].wayPast).toBe(o.wayPast);
      expect(early.options[j].sites.map((s) => [s.behindBand, s.wayPast, s.kind])).toEqual(o.sites.map((s) => [s.behindBand, s.wayPast, s.kind]));
      expect(early.options[j].pinning.verified).toBe(o.pinning.verified);
    });
    // A site not reached within the horizon keeps every run going to the horizon.
    const short = evaluateLandscape(L, pest, { horizonYears: 3, crossSection: false, stopWhenSitesReached: true });
    expect(short.baseline.sites[0].detectedYears).toBeNull();
    expect(short.baseline.endYears).toBe(3);
  });

  it('counts trees removed as band area × host stems per ha exactly, and the cost', () => {
    // 40 × 40 cells of 1 ha at 500 stems/ha; across: 4 × 80 cells.
    expect(r.options[0].trees.stemsRemoved).toBeCloseTo(40 * 4 * 500 * 1, 6);
    expect(r.options[1].trees.stemsRemoved).toBeCloseTo(80 * 4 * 500 * 1, 6);
    expect(r.options[1].trees.cost).toBeCloseTo(2 * 80 * 4 * 500, 6);
    expect(r.options[1].trees.costUnit).toBe('EUR');
    expect(r.options[1].modelAreaM2).toBe(80 * 4 * 100 * 100);
  });

  it('gives an arrival-time field: 0 in the infestation, rising eastwards, NaN where never reached', () => {
    const f = r.baseline.arrival.years;
    expect(f.length).toBe(120 * 80);
    expect(f[40 * 120 + 5]).toBe(0);
    expect(f[40 * 120 + 60]).toBeGreaterThan(f[40 * 120 + 30]);
    // Within 3 years the east is not reached: those cells carry NaN (null in JSON).
    const early = evaluateLandscape(L, pest, { horizonYears: 3, crossSection: false });
    expect(Number.isNaN(early.baseline.arrival.years[40 * 120 + 110])).toBe(true);
    const json = fieldToJson(early.options[1].run.arrival);
    expect(json.length).toBe(f.length);
    expect(json.some((v) => v === null)).toBe(true);
    expect(json.every((v) => v === null || Number.isFinite(v))).toBe(true);
  });

  it('names the field, value and range of bad settings', () => {
    expect(() => evaluateLandscape(L, pest, { horizonYears: -1 })).toThrow(InputError);
    try {
      evaluateLandscape(L, pest, { horizonYears: 10, detectionLevel: 2 });
    } catch (e) {
      expect((e as InputError).problems[0]).toMatchObject({ path: 'detectionLevel', value: 2 });
    }
    const empty = makeLandscape({ nx: 10, ny: 10, cellM: 100, infestedAt: () => 0 });
    expect(() => evaluateLandscape(empty, pest, { horizonYears: 5 })).toThrow(/infestation/);
  });
});
