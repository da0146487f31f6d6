/** Number formats shared by CLI, web and briefing: expected strings written out by hand. */
import { describe, expect, it } from 'vitest';
import { distributionText, fixed, integer, km, num, percent, probabilityEstimate, speed, years } from '../../server/report/format.ts';

describe('format', () => {
  it('fixed: true minus sign, no "−0"', () => {
    expect(fixed(-1.25, 1)).toBe('−1.3'); // toFixed rounds half away from zero here (−1.25 is exact in binary)
    expect(fixed(-0.04, 1)).toBe('0.0');
    expect(fixed(2, 2)).toBe('2.00');
  });
  it('integer: thin-space thousands, rounding, minus sign', () => {
    expect(integer(1234567)).toBe('1\u202f234\u202f567');
    expect(integer(999.5)).toBe('1\u202f000');
    expect(integer(-12345.4)).toBe('−12\u202f345');
    expect(integer(-0.3)).toBe('0');
  });
  it('years, km and speed with their fallbacks', () => {
    expect(years(12.345)).toBe('12.3');
    expect(years(null)).toBe('—');
    expect(years(Infinity, 'beyond')).toBe('beyond');
    expect(km(8.3)).toBe('8.30'); // two decimals below 100 km (the header comment's "up to 3 decimals" is not what it does)
    expect(km(123.456)).toBe('123.5');
    expect(km(undefined)).toBe('—');
    expect(speed(1.234)).toBe('1.23 km/yr');
    expect(speed(0.0456)).toBe('0.046 km/yr'); // below 0.1 km/yr: three decimals
    expect(speed(0)).toBe('0.00 km/yr');
    expect(speed(NaN)).toBe('—');
  });
  it('percent and num', () => {
    expect(percent(0.625, 1)).toBe('62.5 %');
    expect(percent(-0.001)).toBe('0 %');
    expect(num(0.000123)).toBe('1.23e−4');
    expect(num(1234.5678)).toBe('1230');
    expect(num(-2.5)).toBe('−2.5');
    expect(num(0)).toBe('0');
    expect(num(Infinity)).toBe('—');
  });
  it('distributions in words', () => {
    expect(distributionText({ dist: 'uniform', min: 0.5, max: 1.5 }, 'km²/yr')).toBe('uniform 0.5–1.5 km²/yr');
    expect(distributionText({ dist: 'triangular', min: 0.2, mode: 0.5, max: 0.9 })).toBe('triangular 0.2–0.9, most likely 0.5');
    expect(distributionText({ dist: 'lognormal', median: 2, spread: 1.5 }, '/yr')).toBe('log-normal, median 2 /yr, spread ×1.5');
  });
  it('probabilities: ± one standard error, or the Wilson interval when every draw agreed', () => {
    expect(probabilityEstimate({ p: 0.625, standardError: 0.015 })).toBe('62.5 % ± 1.5 %');
    expect(probabilityEstimate({ p: 1, standardError: 0, interval95: [0.7575, 1] })).toBe('100.0 % (95 % interval 75.8–100.0 %)');
    expect(probabilityEstimate({ p: 0.5, standardError: NaN })).toBe('50.0 %');
    expect(probabilityEstimate(null)).toBe('—');
  });
});
