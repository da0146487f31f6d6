import { describe, expect, it } from 'vitest';
import { frontCannotAdvance } from '../../server/analysis/run/barrier-growth.ts';
import type { PointGrowth } from '../../server/model/growth.ts';

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
