/** Observers scheduled by time: Schedule due times and LevelCrossings dated by linear dense output (hand values). */
import { describe, expect, it } from 'vitest';
import { firstPassage, interpolateCrossing, LevelCrossings, Schedule } from '../../server/numerics/observers.ts';
import { expectAllClose } from '../helpers/close.ts';

describe('Schedule.periodic', () => {
  it('fires at the first step ending at or after each due time', () => {
    const s = Schedule.periodic(0.5);
    // Steps of 0.2: ends 0.2, 0.4, 0.6, 0.8, 1.0 → due 0.5 reached at 0.6, due 1.0 reached at 1.0.
    expect([0.2, 0.4, 0.6, 0.8, 1.0].map((t) => s.due(t))).toEqual([false, false, true, false, true]);
    expect(s.next()).toBe(1.5);
  });
  it('a long step consumes every due time it passes, and take() counts them', () => {
    const s = Schedule.periodic(0.5, 1); // due 1.5, 2, 2.5, …
    expect(s.next()).toBe(1.5);
    expect(s.take(1.4)).toBe(0);
    expect(s.take(2.6)).toBe(3); // 1.5, 2, 2.5
    expect(s.next()).toBe(3);
  });
  it('round-off between a step end and a due time does not delay the firing by a step', () => {
    // Due time 3 × 0.1 = 0.30000000000000004; a step ending at 0.3 (one ulp earlier) must fire it.
    const s = Schedule.periodic(0.1);
    s.take(0.2);
    expect(0.3 < 3 * 0.1).toBe(true);
    expect(s.due(0.3)).toBe(true);
  });
  it('refuses a period that is not positive', () => {
    expect(() => Schedule.periodic(0)).toThrow(RangeError);
    expect(() => Schedule.periodic(Number.NaN)).toThrow(RangeError);
  });
});

describe('Schedule.at', () => {
  it('fires at listed target times within the tolerance, then never', () => {
    const s = Schedule.at([1, 2.5], 1e-6);
    expect(s.due(0.9999)).toBe(false);
    expect(s.due(1 - 5e-7)).toBe(true); // within 1e-6 of the target
    expect(s.next()).toBe(2.5);
    expect(s.due(10)).toBe(true);
    expect(s.next()).toBe(Infinity);
    expect(s.due(20)).toBe(false);
  });
});

describe('interpolateCrossing', () => {
  it('the linear interpolant between two step ends', () => {
    expect(interpolateCrossing(0, 0, 1, 2, 0.5)).toBe(0.25); // 0 → 2 over [0, 1]: level 0.5 at t = 0.25
    expect(interpolateCrossing(2, 1, 4, 3, 2.5)).toBe(3.5);
    expect(interpolateCrossing(0, 1, 1, 1, 1)).toBe(1); // not rising: dated at the step end
    expect(interpolateCrossing(0, 0.5, 1, 2, 0.1)).toBe(0); // already above at the start: clamped to t0
  });
});

describe('LevelCrossings', () => {
  it('dates crossings of linear signals exactly, and of t² by the chord (hand value)', () => {
    // Watched values: v0 = 2t, v1 = t/3, v2 = t², level 1 → exact crossings 0.5, 3, 1.
    const values = (t: number) => (k: number) => (k === 0 ? 2 * t : k === 1 ? t / 3 : t * t);
    const lc = new LevelCrossings(3, 1);
    lc.start(0, values(0));
    for (let t = 0.3; t < 3.7; t += 0.3) lc.update(t, values(t));
    expectAllClose(lc.times[0]!, 0.5, { rtol: 1e-12 });
    expectAllClose(lc.times[1]!, 3, { rtol: 1e-12 });
    // t² between 0.9 (0.81) and 1.2 (1.44): 0.9 + 0.3 × 0.19 / 0.63 = 0.990476… (the chord, not the curve).
    expectAllClose(lc.times[2]!, 0.9 + (0.3 * 0.19) / 0.63, { rtol: 1e-12 });
    expect(lc.allPassed()).toBe(true);
  });
  it('a value at the level at the start is dated at the start unless told otherwise', () => {
    const a = new LevelCrossings(2, 1);
    a.start(5, (k) => (k === 0 ? 1 : 0));
    expect(a.times).toEqual([5, null]);
    expect(a.allPassed()).toBe(false);
    const b = new LevelCrossings(1, 1);
    b.start(5, () => 1, false);
    expect(b.times).toEqual([null]);
    b.update(6, () => 2);
    expect(b.times).toEqual([5]); // at the level when the step began: the chord reaches it at the step's start
  });
  it('only the first upward passage counts', () => {
    const lc = new LevelCrossings(1, 1);
    lc.start(0, () => 0);
    lc.update(1, () => 2); // crosses at 0.5
    lc.update(2, () => 0);
    lc.update(3, () => 4);
    expect(lc.times[0]).toBe(0.5);
  });
});

describe('firstPassage (Illinois regula falsi on a dense-output interpolant)', () => {
  it('finds the passage of closed forms to round-off: e^t through 2, and a cubic through 0.3', () => {
    expect(firstPassage(Math.exp, 0, 1, 1, Math.E, 2)).toBeCloseTo(Math.LN2, 12);
    // (t − 0.2)³ + 0.3 passes 0.3 at t = 0.2 (a flat passage: regula falsi without the Illinois halving stalls).
    const f = (t: number) => (t - 0.2) ** 3 + 0.3;
    expect(Math.abs(firstPassage(f, 0, f(0), 1, f(1), 0.3) - 0.2)).toBeLessThan(1e-3);
  });
  it('falls back to the chord when the start is not below the level, and LevelCrossings uses it when given valueAt', () => {
    expect(firstPassage(Math.exp, 0, 2, 1, Math.E, 2)).toBe(interpolateCrossing(0, 2, 1, Math.E, 2));
    const c = new LevelCrossings(1, 2);
    c.start(0, () => 1);
    c.update(1, () => Math.E, (_k, t) => Math.exp(t));
    expect(c.times[0]).toBeCloseTo(Math.LN2, 12);
    const linear = new LevelCrossings(1, 2);
    linear.start(0, () => 1);
    linear.update(1, () => Math.E);
    expect(linear.times[0]).toBeCloseTo(1 / (Math.E - 1), 12); // the chord's date, 0.58 instead of 0.69
  });
});
