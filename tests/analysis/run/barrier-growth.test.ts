import { describe, expect, it } from 'vitest';
import { frontCannotAdvance, potentialThreshold } from '../../../server/analysis/run/barrier-growth.ts';
import type { PointGrowth } from '../../../server/model/growth.ts';

describe('frontCannotAdvance: does a front move into unbroken host forest at all?', () => {
  it('cubic: exactly when a ≥ ½, the sign of c = √(2rD)(½ − a) (McKean 1970; Lewis & Kareiva 1993)', () => {
    for (const [a, expected] of [[0.1, false], [0.45, false], [0.5, true], [0.6, true]] as const) {
      const g: PointGrowth = { form: 'allee-cubic', rate: 1, alleeThreshold: a };
      // Stocking scales the cubic as h² (u = h w), so the sign does not depend on it.
      for (const h of [1, 0.4]) expect(frontCannotAdvance(g, h), `a = ${a}, h = ${h}`).toBe(expected);
    }
  });
  it('logistic always advances (Fisher 1937); mate-finding without mates declines when b·h < m', () => {
    expect(frontCannotAdvance({ form: 'logistic', rate: 1 }, 0.3)).toBe(false);
    const none = (b: number): PointGrowth => ({ form: 'mate-finding', birthRate: b, deathRate: 1, crowding: 0.5, mating: 'none' });
    // Per-capita rate b·h − m − γu: negative at every density when b·h < m (own algebra).
    expect(frontCannotAdvance(none(0.8), 1)).toBe(true);
    expect(frontCannotAdvance(none(2), 1)).toBe(false);
    expect(frontCannotAdvance(none(2), 0.4)).toBe(true);
  });
  it('no host left means no front', () => {
    expect(frontCannotAdvance({ form: 'logistic', rate: 1 }, 0)).toBe(true);
  });
});

describe('potentialThreshold: zero of the potential above the Allee threshold', () => {
  // Cubic u g = r u (1 − u)(u − a): F(θ) = r θ² (−θ²/4 + (1 + a) θ/3 − a/2) = 0 gives
  // 3θ² − 4(1 + a)θ + 6a = 0, the smaller root lying above a for a < ½ (own algebra).
  const closedForm = (a: number) => (4 * (1 + a) - Math.sqrt(16 * (1 + a) ** 2 - 72 * a)) / 6;
  it('matches the closed form for the cubic', () => {
    for (const a of [0.1, 0.3, 0.45]) expect(potentialThreshold({ form: 'allee-cubic', rate: 1.3, alleeThreshold: a }, 1)).toBeCloseTo(closedForm(a), 12);
  });
  it('kept values follow the growth numbers, not the object: a changed object gets its own value', () => {
    const g = { form: 'allee-cubic' as const, rate: 1, alleeThreshold: 0.2 };
    const first = potentialThreshold(g, 1);
    expect(potentialThreshold({ ...g }, 1)).toBe(first);
    g.alleeThreshold = 0.35;
    expect(potentialThreshold(g, 1)).toBeCloseTo(closedForm(0.35), 12);
    expect(potentialThreshold({ form: 'logistic', rate: 1 }, 1)).toBeNull();
  });
});
