/**
 * The detection model and the record likelihood on hand-made density series (no engine run): the detection
 * probability ε + (1 − ε)(1 − (1 − q(1 − e^{−u/L}))^effort), interpolation in time, the binomial log-likelihood.
 */
import { describe, expect, it } from 'vitest';
import { densitiesAtStart, detectionProbability, logLikelihood, recordArrays, STRAY_DETECTION_RATE, type PositionSeries } from '../../../server/analysis/calibration/likelihood.ts';
import { expectAllClose } from '../../helpers/close.ts';

describe('detectionProbability', () => {
  it('the formula written out, including effort and the stray rate', () => {
    const eps = STRAY_DETECTION_RATE;
    const single = 0.7 * (1 - Math.exp(-0.02 / 0.01));
    expectAllClose(detectionProbability(0.02, 1, 0.7, 0.01), eps + (1 - eps) * single, { rtol: 1e-14 });
    expectAllClose(detectionProbability(0.02, 3, 0.7, 0.01), eps + (1 - eps) * (1 - (1 - single) ** 3), { rtol: 1e-13 });
    expect(detectionProbability(0, 1, 0.9, 0.01)).toBe(eps); // nothing there: only strays
    expect(detectionProbability(-1, 1, 0.9, 0.01)).toBe(eps); // negative round-off counts as nothing
    expectAllClose(detectionProbability(1e6, 1, 1, 0.01, 0), 1, { rtol: 1e-15 });
  });
});

describe('recordArrays and densitiesAtStart', () => {
  const records = [
    { year: 2003, atKm: 5, detected: true },
    { year: 2005.5, atKm: 8, detected: false, effort: 2 },
    { year: 2001, atKm: 5, detected: false },
    { year: 2000, atKm: 8, detected: true },
  ];
  const rec = recordArrays(records);
  it('distinct positions indexed once; effort defaults to 1', () => {
    expect(rec.positionsKm).toEqual([5, 8]);
    expect(Array.from(rec.position)).toEqual([0, 1, 0, 1]);
    expect(Array.from(rec.detected)).toEqual([1, 0, 0, 1]);
    expect(Array.from(rec.effort)).toEqual([1, 2, 1, 1]);
  });
  it('linear in time between steps, 0 before the start, the last value past the end', () => {
    // Steps of 1 yr, the last one short (the run ends at 4.5): u(5 km) = 0, 0.1, 0.3, 0.6, 1.0, 1.2; u(8 km) = 10·that.
    const times = [0, 1, 2, 3, 4, 4.5];
    const u5 = Float64Array.from([0, 0.1, 0.3, 0.6, 1.0, 1.2]);
    const series: PositionSeries = { times, densityAt: [u5, u5.map((x) => 10 * x)], status: 'done' };
    const out = densitiesAtStart(series, rec, 2000.5, new Float64Array(4));
    // 2003 − 2000.5 = 2.5 → 0.3 + 0.5·0.3 = 0.45; 2005.5 → τ = 5 ≥ 4.5 → 12; 2001 → τ = 0.5 → 0.05; 2000 → before the start: 0.
    expectAllClose(out, [0.45, 12, 0.05, 0], { rtol: 1e-14, atol: 1e-15 });
    expectAllClose(densitiesAtStart(series, rec, 2000, new Float64Array(4))[3], 0, { atol: 0 }); // τ = 0: the start value
    expectAllClose(densitiesAtStart(series, rec, 2004.25, new Float64Array(4))[1], 1 + 0.25 * (3 - 1), { rtol: 1e-14 }); // τ = 1.25 at 8 km: between 1 and 3
  });
  it('binomial log-likelihood: Σ log p over detections + Σ log(1 − p) over the rest', () => {
    const u = Float64Array.from([0.45, 12, 0.05, 0]);
    const p = Array.from(u, (x, i) => detectionProbability(x, rec.effort[i], 0.6, 0.01));
    const expected = Math.log(p[0]) + Math.log(1 - p[1]) + Math.log(1 - p[2]) + Math.log(p[3]);
    expectAllClose(logLikelihood(u, rec, 0.6, 0.01), expected, { rtol: 1e-13 });
  });
});
