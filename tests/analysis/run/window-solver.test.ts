/** Window pieces, overlap-weighted remapping (hand averages, conservation) and time-shifted observers. */
import { describe, expect, it } from 'vitest';
import { remap, slicePieces, withOffset } from '../../../server/analysis/run/window-solver.ts';
import type { Piece } from '../../../server/problem/layout.ts';
import type { FieldState } from '../../../server/numerics/observers.ts';
import { piecewiseGrid } from '../../helpers/solve.ts';
import { expectAllClose } from '../../helpers/close.ts';

const piece = (fromKm: number, toKm: number, segment: number): Piece => ({ fromKm, toKm, habitat: 'host-forest', stocking: 1, stemsPerHa: 400, segment, barrier: false });

describe('slicePieces', () => {
  it('clips pieces to the window and drops those outside or thinner than 1 mm', () => {
    const ps = [piece(0, 2, 0), piece(2, 5, 1), piece(5, 9, 2)];
    expect(slicePieces(ps, 1, 6).map((p) => [p.fromKm, p.toKm, p.segment])).toEqual([[1, 2, 0], [2, 5, 1], [5, 6, 2]]);
    expect(slicePieces(ps, 2 - 5e-7, 4).map((p) => p.segment)).toEqual([1]);
    expect(slicePieces(ps, 10, 12)).toEqual([]);
  });
});

describe('remap', () => {
  it('cell averages over the overlaps (hand values) and the integral is kept', () => {
    const from = piecewiseGrid([0, 1, 2, 4], [1, 1, 1]);
    const to = piecewiseGrid([0, 0.5, 1.5, 4], [1, 1, 1]);
    const out = remap(from, Float64Array.of(1, 2, 3), to);
    // [0, 0.5]: 1; [0.5, 1.5]: (0.5·1 + 0.5·2)/1 = 1.5; [1.5, 4]: (0.5·2 + 2·3)/2.5 = 2.8.
    expectAllClose(out, [1, 1.5, 2.8], { rtol: 1e-14 });
    expectAllClose(0.5 * out[0] + 1 * out[1] + 2.5 * out[2], 1 + 2 + 6, { rtol: 1e-14 });
  });
  it('onto a finer grid each sub-cell takes its parent value; outside the source the nearest end value', () => {
    const from = piecewiseGrid([1, 2, 3], [1, 1]);
    const to = piecewiseGrid([0, 1, 3, 4], [1, 4, 1]);
    expectAllClose(remap(from, Float64Array.of(5, 7), to), [5, 5, 5, 7, 7, 7], { rtol: 1e-14 });
  });
});

describe('withOffset', () => {
  it('observers see absolute time; the fields are passed through untouched', () => {
    const seen: number[][] = [];
    const u = new Float64Array(1);
    const o = withOffset({ initialize: (s) => void seen.push([s.t]), handle: (s) => (seen.push([s.tPrevious, s.t]), s.u === u), finalize: (s) => void seen.push([s.t]) }, 10);
    const st = (t: number, tp: number): FieldState => ({ t, tPrevious: tp, u, h: u });
    o.initialize!(st(0, 0));
    expect(o.handle(st(0.5, 0))).toBe(true);
    o.finalize!(st(1, 0.5));
    expect(seen).toEqual([[10], [10, 10.5], [11]]);
    expect(withOffset({ handle: () => false }, 1).initialize).toBeUndefined();
  });
});
