/**
 * Strong-Allee (cubic) front speed. Published result: u_t = D u_xx + r u(1 − u)(u − a) has the travelling
 * front u = 1/(1 + exp(√(r/(2D))(x − c t))) with c = √(2rD)(½ − a) (McKean 1970, Adv. Math. 4:209–223, for
 * Nagumo's equation; used for invasions with an Allee effect by Lewis & Kareiva 1993, Theor. Popul. Biol.
 * 43:141–158). The front is pushed, so it converges exponentially fast and a raw late-time fit is unbiased.
 */
import { describe, expect, it } from 'vitest';
import { fitLine, spreadRate } from '../../server/analysis/speed.ts';
import { expectAllClose, relErr } from '../helpers/close.ts';
import { hostSegment, runScenario, testPest, testScenario } from '../helpers/scenario.ts';

/**
 * In this model the cubic is r u (h − u)(u − a h); with h = stocking s, u = s w gives
 * w_t = D w_xx + r s² w(1 − w)(w − a), so c = s √(2rD)(½ − a) (own algebra on McKean's formula).
 */
const speedOf = (D: number, r: number, a: number, s: number) => s * Math.sqrt(2 * r * D) * (0.5 - a);

describe('strong-Allee cubic front speed √(2rD)(½ − a) (McKean 1970; Lewis & Kareiva 1993)', () => {
  const cases = [
    { label: 'D = r = 1, a = 0.25 (check value 0.353553, methods note (server/numerics/README.md) §5.1)', D: 1, r: 1, a: 0.25, s: 1 },
    { label: 'D = 0.5, r = 2, a = 0.1, stocking 0.64 (per-capita terms use h)', D: 0.5, r: 2, a: 0.1, s: 0.64 },
  ];
  for (const c of cases) {
    it(`${c.label}: within 1 % (and 0.1 %) at the default resolution`, () => {
      const expected = speedOf(c.D, c.r, c.a, c.s);
      const years = 100;
      const lengthKm = expected * years + 20;
      const s = testScenario({
        pest: testPest({ diffusionHost: c.D, growth: { form: 'allee-cubic', rate: c.r, alleeThreshold: c.a } }),
        transect: { segments: [hostSegment(lengthKm, c.s)] },
        infestation: { fromKm: 0, toKm: 3 },
        horizonYears: years,
      });
      const out = runScenario(s);
      const fit = spreadRate(out.front.times, out.front.rightKm, { lowKm: 3, highKm: lengthKm - 5 }, 1)!;
      console.log(
        `Allee cubic ${c.label}: c = ${expected.toFixed(6)}, measured ${fit.kmPerYear.toFixed(6)} ` +
          `(${(100 * (fit.kmPerYear / expected - 1)).toFixed(4)} %), years ${fit.fromYears.toFixed(1)}–${fit.toYears.toFixed(1)}, ` +
          `${out.problem.grid.nCells} cells, dt ${out.problem.resolution.stepYears}`,
      );
      // Issue budget 1 %; pushed fronts have no slow transient, so what remains is discretisation error,
      // O(dx²) + O(dt²) with dx = L/10 and dt = 0.05/r: measured ≈ 0.01 %.
      expectAllClose(fit.kmPerYear, expected, { rtol: 0.01 });
      expect(relErr(fit.kmPerYear, expected)).toBeLessThan(0.001);
    });
  }

  it('a > ½: the infestation retreats at √(2rD)(a − ½) (same formula, negative speed)', () => {
    const expected = speedOf(1, 1, 0.6, 1); // −0.141421
    const s = testScenario({
      pest: testPest({ growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.6 } }),
      transect: { segments: [hostSegment(60)] },
      infestation: { fromKm: 0, toKm: 40 },
      horizonYears: 100,
    });
    const out = runScenario(s);
    const t: number[] = [];
    const x: number[] = [];
    out.front.times.forEach((ti, i) => {
      if (ti >= 20) {
        t.push(ti);
        x.push(out.front.rightKm[i]);
      }
    });
    const fit = fitLine(t, x);
    console.log(`Allee cubic a = 0.6: c = ${expected.toFixed(6)}, measured ${fit.slope.toFixed(6)} (${(100 * (fit.slope / expected - 1)).toFixed(4)} %)`);
    expect(fit.slope).toBeLessThan(0);
    expectAllClose(fit.slope, expected, { rtol: 0.01 });
  });
});
