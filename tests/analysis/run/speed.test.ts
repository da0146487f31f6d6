/** Least-squares lines and spread rates, against hand sums and synthetic fronts with known speed. */
import { describe, expect, it } from 'vitest';
import { centredMoments, fitLine, spreadRate } from '../../../server/analysis/run/speed.ts';
import { expectAllClose } from '../../helpers/close.ts';

describe('centredMoments and fitLine', () => {
  it('three points by hand', () => {
    // t = 1, 2, 3; x = 2, 4.1, 5.9: means 2 and 4; Stt = 2, Stx = (−1)(−2) + 0 + (1)(1.9) = 3.9,
    // Sxx = 4 + 0.01 + 3.61 = 7.62 → slope 1.95, intercept 4 − 3.9 = 0.1, R² = 3.9²/(2·7.62) = 0.998031…
    const m = centredMoments([1, 2, 3], [2, 4.1, 5.9]);
    expectAllClose([m.meanA, m.meanB, m.saa, m.sab, m.sbb], [2, 4, 2, 3.9, 7.62], { rtol: 1e-14 });
    const f = fitLine([1, 2, 3], [2, 4.1, 5.9]);
    expectAllClose([f.slope, f.intercept, f.rSquared], [1.95, 0.1, (3.9 * 3.9) / (2 * 7.62)], { rtol: 1e-13 });
  });
  it('a constant series has R² = 1; a single time has no slope', () => {
    expect(fitLine([0, 1, 2], [5, 5, 5])).toEqual({ slope: 0, intercept: 5, rSquared: 1 });
    expect(fitLine([1, 1, 1], [0, 1, 2]).slope).toBeNaN();
  });
});

describe('spreadRate', () => {
  const times = Array.from({ length: 201 }, (_, i) => i * 0.1); // 0 … 20 yr
  it('a front at 1.5 km/yr: the slope over the later half of its time inside the window', () => {
    const x = times.map((t) => 2 + 1.5 * t);
    const fit = spreadRate(times, x, { lowKm: 5, highKm: 29 }, 1)!;
    // Inside [5, 29] for t ∈ [2, 18] (t = 0 excluded); later half t ≥ 10: 81 samples 10 … 18.
    expectAllClose(fit.kmPerYear, 1.5, { rtol: 1e-12 });
    expectAllClose([fit.fromYears, fit.toYears], [10, 18], { rtol: 1e-12 });
    expect(fit.samples).toBe(81);
    expectAllClose(fit.rSquared, 1, { rtol: 1e-12 });
  });
  it('a leftward front is reported with a positive speed', () => {
    const x = times.map((t) => 40 - 0.8 * t);
    expectAllClose(spreadRate(times, x, { lowKm: 0, highKm: 50 }, -1)!.kmPerYear, 0.8, { rtol: 1e-12 });
  });
  it('the Bramson correction removes the −(3/(2s*)) ln t lag of a pulled front exactly (Bramson 1983)', () => {
    const c = 2;
    const sStar = 1;
    const x = times.map((t) => c * t - (3 / (2 * sStar)) * Math.log(Math.max(t, 1e-9)) + 1);
    const plain = spreadRate(times, x, { lowKm: 0, highKm: 100 }, 1)!;
    const corrected = spreadRate(times, x, { lowKm: 0, highKm: 100 }, 1, sStar)!;
    expectAllClose(corrected.kmPerYear, c, { rtol: 1e-12 });
    // Without it the lag slows the fit by about (3/2)/t̄ (t̄ ≈ 15 yr): ≈ 0.1 km/yr low.
    expect(c - plain.kmPerYear).toBeGreaterThan(0.05);
  });
  it('null when the front spends fewer than 20 samples in the window, or it is non-finite there', () => {
    const x = times.map((t) => 2 + 1.5 * t);
    expect(spreadRate(times, x, { lowKm: 5, highKm: 7.8 }, 1)).toBeNull(); // t ∈ [2, 3.8]: 19 samples
    expect(spreadRate(times, x, { lowKm: 5, highKm: 7.9 }, 1)).not.toBeNull(); // 20 samples
    expect(spreadRate(times, times.map(() => Number.NaN), { lowKm: 0, highKm: 99 }, 1)).toBeNull();
  });
});
