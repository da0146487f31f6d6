/** Window pieces and time-shifted observers (remapping is tested with the mesh: tests/domain/transect-mesh.test.ts). */
import { describe, expect, it } from 'vitest';
import { slicePieces, withOffset } from '../../../server/analysis/run/window-solver.ts';
import type { Piece } from '../../../server/problem/layout.ts';
import type { FieldState } from '../../../server/numerics/observers.ts';

const piece = (fromKm: number, toKm: number, segment: number): Piece => ({ fromKm, toKm, habitat: 'host-forest', stocking: 1, stemsPerHa: 400, segment, barrier: false });

describe('slicePieces', () => {
  it('clips pieces to the window and drops those outside or thinner than 1 mm', () => {
    const ps = [piece(0, 2, 0), piece(2, 5, 1), piece(5, 9, 2)];
    expect(slicePieces(ps, 1, 6).map((p) => [p.fromKm, p.toKm, p.segment])).toEqual([[1, 2, 0], [2, 5, 1], [5, 6, 2]]);
    expect(slicePieces(ps, 2 - 5e-7, 4).map((p) => p.segment)).toEqual([1]);
    expect(slicePieces(ps, 10, 12)).toEqual([]);
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
