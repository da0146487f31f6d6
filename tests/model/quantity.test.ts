/**
 * Quantities and distributions (server/model/quantity.ts): central values, quantiles (inverse CDFs) and the
 * tree walks that resolve a scenario. Quantiles are checked against closed-form CDFs (uniform, triangular)
 * and against scipy.stats (norm, lognorm, triang, uniform) where python3 with scipy is installed; the
 * normal quantile algorithm is P. J. Acklam's rational approximation (relative error < 1.15e-9).
 */
import { describe, expect, it } from 'vitest';
import {
  centralValue,
  listUncertain,
  normalQuantile,
  quantile,
  quantitySchema,
  resolveQuantities,
  valueSchema,
  type Distribution,
} from '../../server/model/quantity.ts';
import { FIELDS } from '../../server/model/fields.ts';
import { expectAllClose } from '../helpers/close.ts';
import { hasPythonScipy, runPython } from '../helpers/python.ts';

const P = [1e-6, 0.001, 0.01, 0.02425, 0.025, 0.1, 0.3, 0.5, 0.7, 0.9, 0.975, 0.97575, 0.99, 0.999, 1 - 1e-6];
const haveScipy = hasPythonScipy();
if (!haveScipy) console.warn('SKIPPED quantile checks against scipy.stats: python3 with scipy is not available');

const triangular = (a: number, c: number, b: number): Distribution => ({ dist: 'triangular', min: a, mode: c, max: b });

describe('central values and closed-form quantiles', () => {
  it('central value: uniform midpoint, triangular mode, lognormal median, plain numbers unchanged', () => {
    expect(centralValue(3)).toBe(3);
    expect(centralValue({ dist: 'uniform', min: 0.2, max: 0.6 })).toBeCloseTo(0.4, 15);
    expect(centralValue(triangular(1, 2, 5))).toBe(2);
    expect(centralValue({ dist: 'lognormal', median: 0.7, spread: 2 })).toBe(0.7);
  });

  it('uniform and triangular quantiles invert their CDFs (closed forms)', () => {
    const u: Distribution = { dist: 'uniform', min: -1, max: 3 };
    const t = triangular(1, 2, 5);
    // Triangular CDF: (x − a)²/((b − a)(c − a)) for x ≤ c, 1 − (b − x)²/((b − a)(b − c)) above.
    const triCdf = (x: number) => (x <= 2 ? (x - 1) ** 2 / (4 * 1) : 1 - (5 - x) ** 2 / (4 * 3));
    for (const p of P) {
      expectAllClose((quantile(u, p) + 1) / 4, p, { rtol: 1e-13, atol: 1e-15 });
      expectAllClose(triCdf(quantile(t, p)), p, { rtol: 1e-12, atol: 1e-15 });
    }
    // Mode at an end (right-triangular) is allowed.
    expectAllClose(quantile(triangular(0, 0, 1), 0.75), 1 - Math.sqrt(0.25), { rtol: 1e-15 });
  });

  it('normal quantile: symmetric, matches table values (z = 1.959964 at 0.975, 2.326348 at 0.99, 3.090232 at 0.999; standard tables, from memory) and rejects p outside (0, 1)', () => {
    expect(normalQuantile(0.5)).toBeCloseTo(0, 15);
    expectAllClose([normalQuantile(0.975), normalQuantile(0.99), normalQuantile(0.999)], [1.959964, 2.326348, 3.090232], { rtol: 5e-7 });
    for (const p of P) expectAllClose(normalQuantile(1 - p), -normalQuantile(p), { rtol: 1e-8, atol: 1e-12 });
    expect(() => normalQuantile(0)).toThrow(RangeError);
    expect(() => normalQuantile(1)).toThrow(RangeError);
  });

  it('lognormal: median × spread^z, so ~68 % of draws lie within [median/spread, median × spread]', () => {
    const d: Distribution = { dist: 'lognormal', median: 0.7, spread: 2 };
    const lo = quantile(d, 0.158655254); // Φ(−1)
    const hi = quantile(d, 0.841344746); // Φ(1)
    expectAllClose([lo, hi], [0.35, 1.4], { rtol: 1e-8 });
  });
});

describe.skipIf(!haveScipy)('quantiles against scipy.stats (independent implementation; skipped without python3/scipy)', () => {
  it('norm.ppf, lognorm.ppf(s = ln spread, scale = median), triang.ppf, uniform.ppf', () => {
    const ref = runPython<{ norm: number[]; lognorm: number[]; triang: number[]; uniform: number[] }>(
      `
import json, sys, math
from scipy import stats
p = json.load(sys.stdin)
print(json.dumps({
  "norm": [float(stats.norm.ppf(x)) for x in p],
  "lognorm": [float(stats.lognorm.ppf(x, s=math.log(2.5), scale=0.3)) for x in p],
  "triang": [float(stats.triang.ppf(x, c=(2 - 1) / (5 - 1), loc=1, scale=4)) for x in p],
  "uniform": [float(stats.uniform.ppf(x, loc=-1, scale=4)) for x in p],
}))
`,
      P,
    );
    // Acklam's approximation: relative error below 1.15e-9 (absolute near p = 0.5 where z ≈ 0).
    expectAllClose(P.map((p) => normalQuantile(p)), ref.norm, { rtol: 2e-9, atol: 1e-12 });
    // Lognormal = median·spread^z: a relative error ε in z becomes |z|·ln(spread)·ε ≈ 4.75 × 0.92 × 1.15e-9 ≈ 5e-9 at p = 1e-6.
    expectAllClose(P.map((p) => quantile({ dist: 'lognormal', median: 0.3, spread: 2.5 }, p)), ref.lognorm, { rtol: 1e-8 });
    expectAllClose(P.map((p) => quantile(triangular(1, 2, 5), p)), ref.triang, { rtol: 1e-12 });
    expectAllClose(P.map((p) => quantile({ dist: 'uniform', min: -1, max: 3 }, p)), ref.uniform, { rtol: 1e-13, atol: 1e-15 });
  });
});

describe('quantity schemas and tree walks', () => {
  it('values outside the field range are refused with the range in the message', () => {
    const s = valueSchema(FIELDS.edgePreferenceOpen);
    expect(s.safeParse(0.5).success).toBe(true);
    const r = s.safeParse(1);
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].message).toBe('must be ≥ 0.000001 and ≤ 0.999999');
    const q = quantitySchema(FIELDS.diffusionHost);
    expect(q.safeParse({ dist: 'triangular', min: 1, mode: 3, max: 2 }).success).toBe(false);
    expect(q.safeParse({ dist: 'lognormal', median: 1, spread: 0.5 }).success).toBe(false);
    expect(q.safeParse({ dist: 'lognormal', median: 1, spread: 1.5 }).success).toBe(true);
  });

  it('listUncertain finds every distribution with its path; resolveQuantities replaces them (central values by default)', () => {
    const tree = {
      pest: { diffusionHost: { dist: 'uniform', min: 0.2, max: 0.6 }, growth: { form: 'logistic', rate: { dist: 'triangular', min: 0.5, mode: 1, max: 2 } } },
      segments: [{ stocking: 1 }, { stocking: { dist: 'lognormal', median: 0.5, spread: 1.2 } }],
      title: 'x',
    };
    expect(listUncertain(tree).map((e) => e.path)).toEqual([['pest', 'diffusionHost'], ['pest', 'growth', 'rate'], ['segments', 1, 'stocking']]);
    const r = resolveQuantities(tree);
    expect(r.pest.diffusionHost).toBeCloseTo(0.4, 15);
    expect(r.pest.growth.rate).toBe(1);
    expect(r.segments[1].stocking).toBe(0.5);
    expect(r.title).toBe('x');
    const lows = resolveQuantities(tree, (d) => quantile(d, 0.001));
    expect(lows.pest.diffusionHost).toBeCloseTo(0.2004, 12);
  });
});
