/** Conservative remapping of source rasters onto the model grid: overlap weights by hand, Σ value × area kept. */
import { describe, expect, it } from 'vitest';
import { areaAverage, axisOverlap } from '../../../server/domain/gis/resample.ts';
import { expectAllClose } from '../../helpers/close.ts';

describe('axisOverlap', () => {
  it('model cells of 25 m from 10 m over source cells of 10 m from 0 m (hand weights)', () => {
    // Cell 0 = [10, 35]: source 1 [10, 20] 10/25, source 2 [20, 30] 10/25, source 3 [30, 35] 5/25.
    // Cell 1 = [35, 60]: source 3 5/25, 4 10/25 — source 5 would be [50, 60], beyond the 5 source cells.
    const o = axisOverlap(2, 25, 10, 5, 10, 0);
    expect(Array.from(o.start)).toEqual([0, 3, 5]);
    expect(Array.from(o.index)).toEqual([1, 2, 3, 3, 4]);
    expectAllClose(o.weight, [0.4, 0.4, 0.2, 0.2, 0.4], { rtol: 1e-15 });
  });
});

describe('areaAverage', () => {
  it('averages by overlap area, and keeps Σ value × area when the model grid covers the source', () => {
    // Source: 3 × 2 cells of 20 m (60 × 40 m); model: the same cells shifted 10 m east, then two 40 m cells covering it all.
    const src = { width: 3, height: 2, resXM: 20, resYM: 20, originXM: 0, originYM: 40 };
    const model = { nx: 3, ny: 2, cellM: 20, originXM: 10, originYM: 40 }; // shifted half a cell east
    const values = Float64Array.from([1, 2, 3, 4, 5, 6]); // rows north to south
    const [out] = areaAverage(src, model, [values]);
    // Row 0: [10, 30] → (1 + 2)/2, [30, 50] → (2 + 3)/2, [50, 70] → half on source 3, half outside: 3/2.
    expectAllClose(out, [1.5, 2.5, 1.5, 4.5, 5.5, 3], { rtol: 1e-14 });
    const covered = { nx: 2, ny: 1, cellM: 40, originXM: -10, originYM: 40 }; // 80 × 40 m covering the source
    const [c] = areaAverage(src, covered, [values]);
    expectAllClose((c[0] + c[1]) * 1600, values.reduce((a, b) => a + b, 0) * 400, { rtol: 1e-14 });
  });
});
