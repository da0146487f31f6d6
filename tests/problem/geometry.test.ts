/** The one barrier geometry: direction, protected side, near/far edges and "beyond", worked out by hand. */
import { describe, expect, it } from 'vitest';
import { barrierGeometry, geometryBetween, isBeyond, SAME_KM, withFarEdge } from '../../server/problem/geometry.ts';

describe('barrierGeometry', () => {
  it('a clearing to the right of the infestation: the front travels right, near edge first', () => {
    // Infestation ends at km 3; a 300 m cut from km 8 spans [8, 8.3]: near 8, far 8.3, protected side right.
    const g = barrierGeometry({ infestation: { toKm: 3 } }, { fromKm: 8, widthM: 300 });
    expect(g).toEqual({ direction: 1, side: 'right', nearKm: 8, farKm: 8.3, region: { kind: 'interval', fromKm: 8, toKm: 8.3 } });
  });

  it('a clearing to the left of the infestation: edges swap, the region stays ordered', () => {
    // Infestation ends at km 10; a 500 m cut from km 2 spans [2, 2.5]: the front comes from the right,
    // meets km 2.5 first and crosses at km 2.
    const g = barrierGeometry({ infestation: { toKm: 10 } }, { fromKm: 2, widthM: 500 });
    expect(g.direction).toBe(-1);
    expect(g.side).toBe('left');
    expect(g.nearKm).toBeCloseTo(2.5, 15);
    expect(g.farKm).toBe(2);
    expect(g.region).toEqual({ kind: 'interval', fromKm: 2, toKm: 2.5 });
  });

  it('a clearing starting at the infestation edge, within the 1 mm slack, counts as to the right', () => {
    expect(barrierGeometry({ infestation: { toKm: 3 } }, { fromKm: 3 - 0.5 * SAME_KM, widthM: 100 }).direction).toBe(1);
    expect(barrierGeometry({ infestation: { toKm: 3 } }, { fromKm: 3 - 2 * SAME_KM, widthM: 100 }).direction).toBe(-1);
  });
});

describe('geometryBetween and withFarEdge', () => {
  it('direction follows the order of the edges unless given', () => {
    expect(geometryBetween(1, 2).direction).toBe(1);
    expect(geometryBetween(2, 1).direction).toBe(-1);
    expect(geometryBetween(2, 2).direction).toBe(1); // width 0: watches the near edge, rightwards by default
    expect(geometryBetween(2, 2, -1).side).toBe('left');
  });

  it('moving the far edge keeps the near edge and the direction (a wider cut, or width 0)', () => {
    const g = geometryBetween(5, 4.7); // leftward, 300 m
    const wider = withFarEdge(g, 4.2);
    expect(wider).toMatchObject({ direction: -1, nearKm: 5, farKm: 4.2, region: { fromKm: 4.2, toKm: 5 } });
    const zero = withFarEdge(g, 5);
    expect(zero).toMatchObject({ direction: -1, nearKm: 5, farKm: 5 }); // not flipped to +1 by the equal edges
  });
});

describe('isBeyond', () => {
  it('rightward: only points past the far edge by more than 1 mm', () => {
    const g = geometryBetween(8, 8.3);
    expect(isBeyond(g, 8.31)).toBe(true);
    expect(isBeyond(g, 8.3)).toBe(false);
    expect(isBeyond(g, 8.3 + 0.5 * SAME_KM)).toBe(false);
    expect(isBeyond(g, 8.3 + 2 * SAME_KM)).toBe(true);
    expect(isBeyond(g, 8.1)).toBe(false); // inside the clearing
    expect(isBeyond(g, 0)).toBe(false); // on the infestation's side
  });
  it('leftward: points to the left of the far edge', () => {
    const g = geometryBetween(2.5, 2);
    expect(isBeyond(g, 1.9)).toBe(true);
    expect(isBeyond(g, 2.1)).toBe(false);
    expect(isBeyond(g, 30)).toBe(false);
  });
});
