/**
 * Front speeds with the adaptive NDF integrator (numerics/steppers/) at its default tolerance: the published
 * speeds the fixed-step engine is checked against (fisher-kpp.test.ts, allee-cubic.test.ts) must hold with
 * large, error-controlled steps too.
 * - Fisher–KPP u_t = D u_xx + r u(1 − u): c* = 2√(rD) (Fisher 1937, Ann. Eugen. 7:355–369; Kolmogorov,
 *   Petrovsky & Piskunov 1937, Bull. Univ. Moscou); pulled, with the Bramson (1983, Mem. AMS 44(285)) log
 *   correction x(t) = c* t − (3/(2 s*)) ln t + O(1), s* = √(r/D).
 * - Nagumo / strong Allee u_t = D u_xx + r u(1 − u)(u − a): c = √(2rD)(½ − a) (McKean 1970, Adv. Math.
 *   4:209–223; Lewis & Kareiva 1993, Theor. Popul. Biol. 43:141–158).
 */
import { describe, expect, it } from 'vitest';
import { spreadRate } from '../../server/analysis/run/speed.ts';
import { expectAllClose, relErr } from '../helpers/close.ts';
import { hostSegment, testPest, testScenario } from '../helpers/scenario.ts';
import { runAdaptiveScenario } from '../helpers/adaptive.ts';

describe('adaptive integrator: Fisher–KPP speed 2√(rD) (Fisher 1937; KPP 1937)', () => {
  it('D = r = 1: within 2 % raw and 0.3 % log-corrected at the default tolerance, never negative', () => {
    const c = 2;
    const years = 200;
    const lengthKm = 1.15 * c * years + 10;
    const s = testScenario({
      pest: testPest({ growth: { form: 'logistic', rate: 1 } }),
      transect: { segments: [hostSegment(lengthKm)] },
      infestation: { fromKm: 0, toKm: 1 },
      horizonYears: years,
    });
    let minU = Infinity;
    const run = runAdaptiveScenario(s, { extraObservers: [{ handle: (st) => void (minU = Math.min(minU, ...st.u.subarray(0, 200))) }] });
    expect(run.result.status).toBe('completed');
    const window = { lowKm: 1, highKm: lengthKm - 5 };
    const raw = spreadRate(run.front.times, run.front.rightKm, window, 1)!;
    const corrected = spreadRate(run.front.times, run.front.rightKm, window, 1, 1)!;
    const k = run.result.info.adaptive;
    console.log(
      `adaptive Fisher–KPP: c* = 2; raw ${raw.kmPerYear.toFixed(6)} (${(100 * (raw.kmPerYear / c - 1)).toFixed(3)} %), ` +
        `log-corrected ${corrected.kmPerYear.toFixed(6)} (${(100 * (corrected.kmPerYear / c - 1)).toFixed(3)} %); ` +
        `${k.accepted} steps, ${k.rejected} rejected, ${k.factorisations} factorisations, window ≤ ${run.result.info.adaptive.largestWindowCells}/${run.problem.grid.nCells} cells`,
    );
    expectAllClose(raw.kmPerYear, c, { rtol: 0.02 });
    expect(raw.kmPerYear).toBeLessThan(c);
    // Fixed-step engine: 0.05 % from dx and dt each; the adaptive default adds ≲ 0.05 %.
    expect(relErr(corrected.kmPerYear, c)).toBeLessThan(0.003);
    expect(minU).toBeGreaterThanOrEqual(0);
  });
});

describe('adaptive integrator: strong-Allee speed √(2rD)(½ − a) (McKean 1970; Lewis & Kareiva 1993)', () => {
  for (const c of [
    { label: 'D = r = 1, a = 0.25', D: 1, r: 1, a: 0.25, st: 1 },
    { label: 'D = 0.5, r = 2, a = 0.1, stocking 0.64', D: 0.5, r: 2, a: 0.1, st: 0.64 },
  ]) {
    it(`${c.label}: within 1 % (and 0.1 %) at the default tolerance`, () => {
      // With h = stocking s: c = s √(2rD)(½ − a) (see allee-cubic.test.ts).
      const expected = c.st * Math.sqrt(2 * c.r * c.D) * (0.5 - c.a);
      const years = 100;
      const lengthKm = expected * years + 20;
      const s = testScenario({
        pest: testPest({ diffusionHost: c.D, growth: { form: 'allee-cubic', rate: c.r, alleeThreshold: c.a } }),
        transect: { segments: [hostSegment(lengthKm, c.st)] },
        infestation: { fromKm: 0, toKm: 3 },
        horizonYears: years,
      });
      const run = runAdaptiveScenario(s);
      const fit = spreadRate(run.front.times, run.front.rightKm, { lowKm: 3, highKm: lengthKm - 5 }, 1)!;
      const k = run.result.info.adaptive;
      console.log(
        `adaptive Allee ${c.label}: c = ${expected.toFixed(6)}, measured ${fit.kmPerYear.toFixed(6)} (${(100 * (fit.kmPerYear / expected - 1)).toFixed(4)} %); ` +
          `${k.accepted} steps, ${k.rejected} rejected, window ≤ ${run.result.info.adaptive.largestWindowCells}/${run.problem.grid.nCells} cells`,
      );
      expectAllClose(fit.kmPerYear, expected, { rtol: 0.01 });
      // Same budget as the fixed-step engine (measured ≈ 0.01 % there).
      expect(relErr(fit.kmPerYear, expected)).toBeLessThan(0.001);
    });
  }
});
