/**
 * The survey front: spread side, farthest detection per year, the far-ahead screen and the least-squares rate
 * with its Student-t 90 % interval — on records written out here, with the expected figures by hand.
 */
import { describe, expect, it } from 'vitest';
import { fitFront, spreadDirection } from '../../../server/analysis/calibration/front.ts';
import type { SurveyRecord } from '../../../server/model/survey.ts';
import { expectAllClose } from '../../helpers/close.ts';

const rec = (year: number, atKm: number, detected = true): SurveyRecord => ({ year, atKm, detected }) as SurveyRecord;
const start = { fromKm: 0, toKm: 2 };

describe('spreadDirection', () => {
  it('the side with more detections outside the starting stretch; right on a tie', () => {
    expect(spreadDirection([rec(1, 5), rec(2, 7), rec(2, -3)], start)).toBe(1);
    expect(spreadDirection([rec(1, -5), rec(2, -7), rec(2, 3)], start)).toBe(-1);
    expect(spreadDirection([rec(1, -5), rec(2, 7), rec(2, 9, false)], start)).toBe(1); // non-detections do not count
  });
});

describe('fitFront', () => {
  // Front distances from the edge (km 2) in years 2001–2005: 1, 3, 2, 5, 4 → the least-squares line of
  // y = 1, 3, 2, 5, 4 on t = 0…4: slope 0.8, intercept 1.4, slope SE √(0.12) with 3 degrees of freedom.
  const records = [
    rec(2001, 3), rec(2001, 2.5), rec(2001, 8, false),
    rec(2002, 5), rec(2002, 4),
    rec(2003, 4), rec(2003, 9, false),
    rec(2004, 7),
    rec(2005, 6), rec(2005, 1),
  ];
  const labels = records.map((_, i) => `row ${i + 2}`);
  it('farthest detection per year and the least-squares rate with t(0.95, 3) = 2.353363 (Student t table)', () => {
    const f = fitFront(records, labels, start);
    expect(f.direction).toBe(1);
    expect(f.edgeKm).toBe(2);
    expect(f.years.map((y) => [y.year, y.frontKm, y.records, y.detections])).toEqual([[2001, 3, 3, 2], [2002, 5, 2, 2], [2003, 4, 2, 1], [2004, 7, 1, 1], [2005, 6, 2, 2]]);
    expect(f.flagged).toEqual([]);
    expectAllClose([f.kmPerYear!, f.interceptKm!, f.standardError!], [0.8, 1.4, Math.sqrt(0.12)], { rtol: 1e-12 });
    expect(f.degreesOfFreedom).toBe(3);
    // t quantile 2.353363 (Abramowitz & Stegun Table 26.10, ν = 3, one-sided 0.05).
    expectAllClose(f.interval90!, [0.8 - 2.353363 * Math.sqrt(0.12), 0.8 + 2.353363 * Math.sqrt(0.12)], { atol: 1e-6 }); // table to 6 decimals
    expectAllClose(f.residuals.map((r) => r.fittedKm), [3.4, 4.2, 5, 5.8, 6.6], { rtol: 1e-12 }); // 2 + 1.4 + 0.8 t
    expect(f.message).toMatch(/^front advances 0\.80 km\/yr/);
  });
  it('a detection far ahead of the front line is set aside with its row, and the rate refitted without it', () => {
    // A steady 1 km/yr front (distances 1…6) and one detection 20 km ahead in year 4.
    const rs = [rec(1, 3), rec(2, 4), rec(3, 5), rec(4, 6), rec(4, 26), rec(5, 7), rec(6, 8)];
    const f = fitFront(rs, rs.map((_, i) => `row ${i + 2}`), start);
    expect(f.flagged.map((x) => [x.row, x.year, x.atKm])).toEqual([['row 6', 4, 26]]);
    expectAllClose(f.flagged[0].aheadKm, 20, { rtol: 1e-12 });
    expect(f.flagged[0].sentence).toMatch(/report it to the regulator/);
    expectAllClose(f.kmPerYear!, 1, { rtol: 1e-12 });
    expectAllClose(f.standardError!, 0, { atol: 1e-12 });
  });
  it('fewer than three years with a detection: no rate, and says why', () => {
    const f = fitFront([rec(1, 3), rec(2, 4), rec(3, 9, false)], ['a', 'b', 'c'], start);
    expect(f.kmPerYear).toBeNull();
    expect(f.message).toMatch(/only 2 survey year/);
  });
  it('leftward spread measures distances from the left edge', () => {
    const rs = [rec(1, -1), rec(2, -2.5), rec(3, -4)];
    const f = fitFront(rs, ['a', 'b', 'c'], start);
    expect([f.direction, f.edgeKm]).toEqual([-1, 0]);
    expectAllClose(f.kmPerYear!, 1.5, { rtol: 1e-12 });
  });
});
