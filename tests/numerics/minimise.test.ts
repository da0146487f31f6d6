import { describe, it } from 'vitest';
import { goldenSectionMin } from '../../server/numerics/minimise.ts';
import { expectAllClose } from '../helpers/close.ts';

describe('goldenSectionMin', () => {
  it('finds the minimum of a unimodal function to the bracket tolerance', () => {
    // Closed form: (x − 2)² + 1 has its minimum 1 at x = 2; cosh(x − 0.3) has 1 at 0.3.
    const a = goldenSectionMin((x) => (x - 2) ** 2 + 1, 0, 5, 1e-10);
    expectAllClose([a.x, a.value], [2, 1], { atol: 1e-9 });
    const b = goldenSectionMin((x) => Math.cosh(x - 0.3), -4, 1, 1e-10);
    expectAllClose([b.x, b.value], [0.3, 1], { atol: 1e-9 });
  });
});
