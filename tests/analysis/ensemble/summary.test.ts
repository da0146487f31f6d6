/**
 * Ensemble summaries against independent references: Wilson intervals from scipy
 * (scipy.stats.binomtest(k, n).proportion_ci(method='wilson'), scipy 1.17.1, values pasted below; the first
 * four cases are the worked examples of Newcombe 1998, Stat. Med. 17:857–872, Table I — the citation from memory),
 * quantiles against numpy.quantile's default
 * (type 7, numpy 2.4.6), and the remaining summaries by hand.
 */
import { describe, expect, it } from 'vitest';
import { effectiveStandardError, meanProbability, probability, sortedQuantile, summariseQuantiles, wilsonInterval } from '../../../server/analysis/ensemble/summary.ts';
import { expectAllClose } from '../../helpers/close.ts';

describe('wilsonInterval', () => {
  it('matches scipy (Newcombe 1998 Table I cases and 12 of 12)', () => {
    const cases: [number, number, number, number][] = [
      [81, 263, 0.2552885198782742, 0.36620957698280004],
      [15, 148, 0.06238639953073629, 0.16048724172330803],
      [0, 20, 0, 0.16112515805281935],
      [1, 29, 0.006113214292762667, 0.17175521879320282],
      [12, 12, 0.7575059933447592, 1],
    ];
    for (const [k, n, lo, hi] of cases) expectAllClose(wilsonInterval(k, n), [lo, hi], { rtol: 1e-12, atol: 1e-15 });
    expect(wilsonInterval(0, 0).every(Number.isNaN)).toBe(true);
  });
});

describe('probability and its standard errors', () => {
  it('p, √(p(1−p)/n) and the interval; when all agree the Wilson width stands in for the zero standard error', () => {
    const e = probability(3, 12);
    expectAllClose([e.p, e.standardError], [0.25, Math.sqrt((0.25 * 0.75) / 12)], { rtol: 1e-14 });
    const all = probability(12, 12);
    expect(all.standardError).toBe(0);
    // (1 − 0.7575…)/(2 × 1.96) = 0.06186…
    expectAllClose(effectiveStandardError(all), (1 - 0.7575059933447592) / (2 * 1.959963984540054), { rtol: 1e-12 });
    expect(effectiveStandardError(e)).toBe(e.standardError); // here the standard error is the larger
  });
  it('meanProbability: mean and s/√n (hand sums)', () => {
    // 0.2, 0.4, 0.9: mean 0.5; deviations −0.3, −0.1, 0.4 → s² = 0.26/2 = 0.13 → SE = √(0.13/3).
    const m = meanProbability([0.2, 0.4, 0.9]);
    expectAllClose([m.p, m.standardError], [0.5, Math.sqrt(0.13 / 3)], { rtol: 1e-14 });
    expect(meanProbability([0.7])).toEqual({ p: 0.7, standardError: 0, n: 1 });
    expect(meanProbability([]).n).toBe(0);
  });
});

describe('sortedQuantile and summariseQuantiles', () => {
  it('type-7 quantiles equal numpy.quantile on [3, 1, 4, 1, 5, 9, 2, 6]', () => {
    const sorted = [3, 1, 4, 1, 5, 9, 2, 6].sort((a, b) => a - b);
    const numpy: [number, number][] = [[0, 1], [0.1, 1], [0.25, 1.75], [0.5, 3.5], [0.9, 6.8999999999999995], [1, 9]];
    for (const [q, v] of numpy) expectAllClose(sortedQuantile(sorted, q), v, { rtol: 1e-14 });
  });
  it('+∞ ("beyond the horizon") propagates only where an infinite order statistic is used', () => {
    const sorted = [1, 2, 3, Infinity];
    expect(sortedQuantile(sorted, 0.5)).toBe(2.5); // between the 2nd and 3rd: both finite
    expect(sortedQuantile(sorted, 0.9)).toBe(Infinity);
    expect(sortedQuantile([1, Infinity], 0)).toBe(1);
  });
  it('summary: beyond-horizon count, finite mean, and the order-statistic standard error of the median', () => {
    // 20 values 1…19 and one beyond the horizon: n/2 ± 0.98√20 = 10 ± 4.38 → ranks 5 and 15 → values 6 and 16.
    const values = [...Array.from({ length: 19 }, (_, i) => i + 1), Infinity];
    const q = summariseQuantiles(values);
    expect(q.n).toBe(19);
    expect(q.beyondHorizon).toBe(1);
    expectAllClose(q.mean!, 10, { rtol: 1e-14 });
    expectAllClose(q.median!, 10.5, { rtol: 1e-14 }); // (10 + 11)/2
    expect(q.p95).toBeNull(); // h = 19 × 0.95 = 18.05 touches the infinite 20th value
    expectAllClose(q.medianStandardError!, (16 - 6) / (2 * 1.96), { rtol: 1e-14 });
    expect(summariseQuantiles([1, 2, 3]).medianStandardError).toBeNull(); // fewer than 10 draws
  });
});
