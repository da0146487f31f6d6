/**
 * Growth forms (server/model/growth.ts). Sources beside each check:
 * - logistic r u (h − u): Verhulst's logistic, with h = 1 the Fisher–KPP reaction (Fisher 1937; KPP 1937);
 * - cubic r u (h − u)(u − a h): with h = 1 the Nagumo form used for Allee effects (Lewis & Kareiva 1993);
 *   maximum per-capita rate r(1 − a)²/4 at u = (1 + a)/2 (methods note (server/numerics/README.md) §5.1, own algebra);
 * - mate finding u (b h P(u) − m − γ u), P = u/(θ + u) or 1 − e^{−u/θ} (Dennis 1989; McCarthy 1997 [MEM]):
 *   thresholds θ m/(b − m) and −θ ln(1 − m/b), check values 1 and ln 2 for b = 2, m = 1, θ = 1; with crowding a
 *   positive equilibrium exists iff b > (√m + √(γθ))² (methods note §5.2, own algebra, re-derived in the tests).
 */
import { describe, expect, it } from 'vitest';
import {
  alleeThreshold,
  equilibria,
  hasStrongAllee,
  lowDensityRate,
  matingProbability,
  perCapitaRate,
  reactionStiffness,
  type PointGrowth,
} from '../../server/model/growth.ts';
import { expectAllClose } from '../helpers/close.ts';

const logistic: PointGrowth = { form: 'logistic', rate: 1.3 };
const cubic: PointGrowth = { form: 'allee-cubic', rate: 2, alleeThreshold: 0.2 };
const mate = (mating: 'none' | 'saturating' | 'exponential', over: Partial<{ birthRate: number; deathRate: number; crowding: number; mateScale: number }> = {}): PointGrowth => ({
  form: 'mate-finding',
  birthRate: 2,
  deathRate: 1,
  crowding: 0,
  mating,
  mateScale: 1,
  ...over,
});

describe('per-capita rates follow the published forms, with the host fraction h in every per-capita term', () => {
  it('logistic, cubic and the three mating functions', () => {
    for (const [u, h] of [
      [0.1, 1],
      [0.4, 0.6],
      [1.2, 0.3],
    ]) {
      expectAllClose(perCapitaRate(logistic)(u, h), 1.3 * (h - u), { rtol: 1e-15 });
      expectAllClose(perCapitaRate(cubic)(u, h), 2 * (h - u) * (u - 0.2 * h), { rtol: 1e-14 });
      expectAllClose(perCapitaRate(mate('none'))(u, h), 2 * h - 1, { rtol: 1e-15, atol: 1e-15 });
      expectAllClose(perCapitaRate(mate('saturating'))(u, h), (2 * h * u) / (1 + u) - 1, { rtol: 1e-14 });
      expectAllClose(perCapitaRate(mate('exponential'))(u, h), 2 * h * (1 - Math.exp(-u)) - 1, { rtol: 1e-14 });
      expectAllClose(perCapitaRate(mate('none', { crowding: 0.5 }))(u, h), 2 * h - 1 - 0.5 * u, { rtol: 1e-14, atol: 1e-15 });
    }
  });

  it('the exponential mating probability keeps full precision at tiny densities (1 − e^{−x} ≈ x)', () => {
    expectAllClose(matingProbability(mate('exponential', { mateScale: 0.1 }), 1e-12), 1e-11, { rtol: 1e-9 });
    expectAllClose(matingProbability(mate('saturating', { mateScale: 0.1 }), 0.1), 0.5, { rtol: 1e-15 });
    expect(matingProbability(logistic, 0.3)).toBe(1);
  });

  it('cubic: largest per-capita rate r(1 − a)²/4 at u = (1 + a)/2 (methods note §5.1)', () => {
    const g = perCapitaRate(cubic);
    let best = -Infinity;
    let at = 0;
    for (let k = 0; k <= 100000; k++) {
      const u = k / 100000;
      if (g(u, 1) > best) [best, at] = [g(u, 1), u];
    }
    expectAllClose(best, (2 * 0.8 * 0.8) / 4, { rtol: 1e-9 });
    expectAllClose(at, 0.6, { atol: 1e-5 });
  });
});

describe('low-density rates and Allee thresholds', () => {
  it('low-density rates: r h, −r a h², b h − m, and −m when mating is limited (P(0) = 0)', () => {
    expect(lowDensityRate(logistic, 0.5)).toBeCloseTo(0.65, 15);
    expect(lowDensityRate(cubic, 0.5)).toBeCloseTo(-2 * 0.2 * 0.25, 15);
    expect(lowDensityRate(mate('none'), 0.8)).toBeCloseTo(0.6, 15);
    expect(lowDensityRate(mate('saturating'))).toBe(-1);
    expect(lowDensityRate(mate('exponential'))).toBe(-1);
  });

  it('check values b = 2, m = 1, θ = 1: threshold 1 for u/(θ + u) and ln 2 for 1 − e^{−u/θ} (methods note §5.2)', () => {
    expectAllClose(alleeThreshold(mate('saturating'))!, 1, { rtol: 1e-12 });
    expectAllClose(alleeThreshold(mate('exponential'))!, Math.LN2, { rtol: 1e-9 });
    expectAllClose(0.693147, Math.LN2, { rtol: 1e-6 });
  });

  it('general thresholds: θ m/(b − m) and −θ ln(1 − m/b), and g vanishes there', () => {
    for (const [b, m, theta] of [
      [3, 1, 0.2],
      [5, 0.5, 0.05],
      [1.5, 1.2, 2],
    ]) {
      const sat = mate('saturating', { birthRate: b, deathRate: m, mateScale: theta });
      const exp = mate('exponential', { birthRate: b, deathRate: m, mateScale: theta });
      expectAllClose(alleeThreshold(sat)!, (theta * m) / (b - m), { rtol: 1e-12 });
      expectAllClose(alleeThreshold(exp)!, -theta * Math.log(1 - m / b), { rtol: 1e-9 });
      expect(Math.abs(perCapitaRate(exp)(alleeThreshold(exp)!, 1))).toBeLessThan(1e-9);
      expect(hasStrongAllee(sat)).toBe(true);
    }
  });

  it('with crowding (saturating): equilibria are the roots of γu² + (m + γθ − b)u + mθ = 0, and exist iff b > (√m + √(γθ))²', () => {
    const m = 1;
    const gam = 0.5;
    const theta = 0.3;
    const bCrit = (Math.sqrt(m) + Math.sqrt(gam * theta)) ** 2;
    const above = mate('saturating', { birthRate: bCrit * 1.01, deathRate: m, crowding: gam, mateScale: theta });
    const below = mate('saturating', { birthRate: bCrit * 0.99, deathRate: m, crowding: gam, mateScale: theta });
    const eq = equilibria(above);
    const B = m + gam * theta - bCrit * 1.01;
    const disc = Math.sqrt(B * B - 4 * gam * m * theta);
    expectAllClose([eq.threshold!, eq.capacity!], [(-B - disc) / (2 * gam), (-B + disc) / (2 * gam)], { rtol: 1e-10 });
    for (const u of [eq.threshold!, eq.capacity!]) expect(Math.abs(perCapitaRate(above)(u, 1))).toBeLessThan(1e-12);
    expect(equilibria(below)).toEqual({ threshold: null, capacity: null });
    expect(hasStrongAllee(below)).toBe(false);
  });

  it('with crowding (exponential): the scanned roots are zeros of g with the right sign changes', () => {
    const g = mate('exponential', { birthRate: 3, deathRate: 1, crowding: 0.8, mateScale: 0.2 });
    const { threshold, capacity } = equilibria(g);
    const f = perCapitaRate(g);
    expect(threshold).not.toBeNull();
    expect(capacity).not.toBeNull();
    expect(Math.abs(f(threshold!, 1))).toBeLessThan(1e-10);
    expect(Math.abs(f(capacity!, 1))).toBeLessThan(1e-10);
    expect(f(0.5 * threshold!, 1)).toBeLessThan(0);
    expect(f(0.5 * (threshold! + capacity!), 1)).toBeGreaterThan(0);
    expect(f(2 * capacity!, 1)).toBeLessThan(0);
  });

  it('cubic: threshold a h and capacity h; logistic: capacity h, no threshold', () => {
    expect(equilibria(cubic, 0.5)).toEqual({ threshold: 0.1, capacity: 0.5 });
    expect(equilibria(logistic, 0.7)).toEqual({ threshold: null, capacity: 0.7 });
    expect(hasStrongAllee(cubic)).toBe(true);
    expect(hasStrongAllee(logistic)).toBe(false);
    expect(hasStrongAllee(mate('none'))).toBe(false);
  });
});

describe('stiffness bound used to size growth substeps', () => {
  it('bounds |∂g/∂ln u| and the positive rates for u ≤ uMax, h ∈ [0, 1] (checked by finite differences)', () => {
    const forms: PointGrowth[] = [logistic, cubic, mate('none', { crowding: 0.4 }), mate('saturating', { crowding: 0.4, mateScale: 0.1 }), mate('exponential', { crowding: 0.4, mateScale: 0.1 })];
    const uMax = 1.1;
    for (const g of forms) {
      const f = perCapitaRate(g);
      const bound = reactionStiffness(g, 0, uMax);
      let worst = 0;
      for (let i = 1; i <= 400; i++) {
        const u = (uMax * i) / 400;
        for (const h of [0, 0.25, 0.5, 1]) {
          const d = 1e-6 * u;
          worst = Math.max(worst, Math.abs((u * (f(u + d, h) - f(u - d, h))) / (2 * d)), f(u, h));
        }
      }
      expect(worst, g.form).toBeLessThanOrEqual(bound);
    }
    // Host loss adds c·uMax.
    expectAllClose(reactionStiffness(logistic, 2, uMax) - reactionStiffness(logistic, 0, uMax), 2 * uMax, { rtol: 1e-15 });
  });
});
