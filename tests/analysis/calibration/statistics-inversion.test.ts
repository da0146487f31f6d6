import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../../helpers/close.ts';
import { normalCdf, studentTQuantile, theilSenLine, leastSquaresLine, CHI2_1_90, Z90 } from '../../../server/analysis/calibration/statistics.ts';
import { fisherMovementRate, fisherSpeed, nagumoMovementRate, nagumoSpeed, movementRateFromSpeed, unitSpeed } from '../../../server/analysis/calibration/inversion.ts';
import { measureMosaicSpeed } from '../../../server/analysis/mosaic/mosaic.ts';
import { testPest, testScenario, hostSegment } from '../../helpers/scenario.ts';
import type { ScenarioInput } from '../../../server/model/scenario.ts';

const scenarioWith = (pest: Partial<ScenarioInput['pest']> & Pick<ScenarioInput['pest'], 'growth'>) =>
  testScenario({ pest: testPest(pest), transect: { segments: [hostSegment(20)] }, infestation: { fromKm: 0, toKm: 1 }, horizonYears: 10 });

describe('statistics', () => {
  it("Student's t 95 % points match the printed table", () => {
    // Abramowitz & Stegun (1964), Table 26.10 (t at P = 0.95 one-sided): 6.314, 2.920, 2.015, 1.812, 1.697;
    // the digits below from scipy.stats.t.ppf(0.95, df), scipy 1.x on this machine.
    expectAllClose([1, 2, 5, 10, 30].map((df) => studentTQuantile(0.95, df)), [6.313751514675037, 2.9199855803537242, 2.0150483733330233, 1.8124611228116756, 1.697260886593957], { rtol: 1e-9 });
  });
  it('normal points and the χ² cut-off', () => {
    expectAllClose(normalCdf(Z90), 0.95, { rtol: 2e-7 }); // Numerical Recipes erfc: relative error < 1.2e-7
    expectAllClose(normalCdf(-1.959963984540054), 0.025, { rtol: 2e-6 });
    expectAllClose(CHI2_1_90, Z90 * Z90, { rtol: 1e-14 }); // χ²₁ quantile = squared normal quantile
  });
  it('Theil–Sen ignores one wild point; least squares gives the textbook slope error', () => {
    const x = [0, 1, 2, 3, 4, 5, 6];
    const y = x.map((v) => 2 + 1.5 * v);
    y[5] += 30;
    const ts = theilSenLine(x, y);
    expectAllClose([ts.slope, ts.intercept], [1.5, 2], { rtol: 1e-12 });
    // y = 1, 3, 2, 5, 4: slope 0.8, residuals SSE = 3.6, se = √(3.6/3 / 10) (hand computation).
    const ls = leastSquaresLine([0, 1, 2, 3, 4], [1, 3, 2, 5, 4]);
    expectAllClose([ls.slope, ls.intercept, ls.slopeStandardError], [0.8, 1.4, Math.sqrt(0.12)], { rtol: 1e-12 });
  });
});

describe('closed-form inversions', () => {
  it('Fisher–KPP: c = 2√(rD) and D = c²/(4r), exact to round-off', () => {
    // Fisher (1937); Kolmogorov, Petrovsky & Piskunov (1937): r = D = 1 gives c = 2.
    expect(fisherSpeed(1, 1)).toBe(2);
    for (const [r, d] of [[0.8, 0.3], [2.5, 0.01], [0.05, 40]]) expectAllClose(fisherMovementRate(fisherSpeed(r, d), r), d, { rtol: 4e-16 });
  });
  it('Nagumo: c = √(2rD)(½ − a) and its inverse, exact to round-off', () => {
    // McKean (1970) / Lewis & Kareiva (1993): D = r = 1, a = 0.25 gives c = 0.353553 (= √2/4).
    expectAllClose(nagumoSpeed(1, 1, 0.25), Math.SQRT2 / 4, { rtol: 1e-15 });
    for (const [r, d, a] of [[1, 1, 0.25], [0.6, 0.2, 0.1], [3, 5, 0.45]]) expectAllClose(nagumoMovementRate(nagumoSpeed(r, d, a), r, a), d, { rtol: 1e-15 });
    expect(nagumoMovementRate(1, 1, 0.6)).toBeNaN();
  });
  it('unitSpeed gives the closed forms for logistic and cubic growth', () => {
    const s = scenarioWith({ growth: { form: 'logistic', rate: 0.8 } });
    expectAllClose(movementRateFromSpeed(fisherSpeed(0.8, 0.37), unitSpeed(s).kmPerYear as number), 0.37, { rtol: 1e-15 });
    const a = scenarioWith({ growth: { form: 'allee-cubic', rate: 1.5, alleeThreshold: 0.2 } });
    expectAllClose(movementRateFromSpeed(nagumoSpeed(1.5, 0.37, 0.2), unitSpeed(a).kmPerYear as number), 0.37, { rtol: 1e-15 });
  });
  it('mate-finding growth with a strong Allee effect: the engine speed scales as √D (measured at D = 0.25)', () => {
    const s = scenarioWith({ diffusionHost: 0.25, growth: { form: 'mate-finding', birthRate: 2, deathRate: 0.5, crowding: 0.5, mating: 'saturating', mateScale: 0.1 }, hostKillRate: 0 });
    const unit = unitSpeed(s);
    expect(unit.method).toBe('engine-measured');
    const measured = measureMosaicSpeed(s, { name: 'intact', forestM: 1000, gapM: 0.001, cover: 'clearing', measure: true }, { periods: 60 }).kmPerYear as number;
    // The rescaling x' = x/√D is exact for the PDE; the two measured speeds differ by the grid's error at each D
    // (cells scale with √D, so the relative grid error is the same): measured agreement 1e-3 or better.
    const d = movementRateFromSpeed(measured, unit.kmPerYear as number);
    console.log(`mate-finding: c(0.25) = ${measured.toFixed(5)}, c(1) = ${unit.kmPerYear?.toFixed(5)}, D back = ${d.toFixed(5)}`);
    expectAllClose(d, 0.25, { rtol: 5e-3 });
  });
});
