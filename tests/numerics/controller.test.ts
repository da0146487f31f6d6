/** The fixed step controller: step ends counted as k·dt, the last step shortened onto tEnd (hand-listed). */
import { describe, expect, it } from 'vitest';
import { fixedStepController } from '../../server/numerics/controller.ts';
import { expectAllClose } from '../helpers/close.ts';

/** Drives a controller as the time loop does and returns the step sizes and end times. */
function drive(tEnd: number, dt: number) {
  const c = fixedStepController(tEnd, dt);
  const dts: number[] = [];
  const ends: number[] = [];
  let t = 0;
  while (t < tEnd) {
    const a = c.propose(t);
    expect(c.judge(a)).toBe(true);
    dts.push(a.dt);
    ends.push(a.tNext);
    t = a.tNext;
  }
  return { dts, ends, counts: c.counts(), mayReject: c.mayReject };
}

describe('fixedStepController', () => {
  it('tEnd = 1, dt = 0.3: steps end at 0.3, 0.6, 0.9 and 1 (the last one 0.1 long)', () => {
    const r = drive(1, 0.3);
    expectAllClose(r.ends, [0.3, 0.6, 0.9, 1], { rtol: 1e-15 });
    expectAllClose(r.dts, [0.3, 0.3, 0.3, 0.1], { rtol: 1e-12 });
    expect(r.ends[3]).toBe(1); // lands exactly on tEnd
    expect(r.counts).toEqual({ accepted: 4, rejected: 0 });
    expect(r.mayReject).toBe(false);
  });

  it('end times are counted (k·dt), not summed: no drift after 1000 steps of 0.1', () => {
    const r = drive(100, 0.1);
    expect(r.ends.length).toBe(1000);
    // Summing 0.1 a thousand times drifts by ~1e-12; k·dt is the correctly rounded product.
    for (const k of [1, 3, 7, 10, 333, 999]) expect(r.ends[k - 1]).toBe(k * 0.1);
    expect(r.ends[999]).toBe(100);
  });

  it('a remainder below 1e-9·dt is not stepped; one just above is', () => {
    expect(drive(1 + 1e-12, 0.25).ends).toEqual([0.25, 0.5, 0.75, 1 + 1e-12]); // 4 steps, the last one stretched by 1e-12
    expect(drive(1 + 1e-6, 0.25).ends.length).toBe(5); // remainder 4e-6·dt: its own (tiny) step
  });

  it('a step longer than the run is cut to one step of tEnd', () => {
    expect(drive(0.4, 2)).toMatchObject({ dts: [0.4], ends: [0.4] });
  });

  it('refuses non-positive or non-finite times', () => {
    expect(() => fixedStepController(0, 0.1)).toThrow(RangeError);
    expect(() => fixedStepController(1, 0)).toThrow(RangeError);
    expect(() => fixedStepController(1, Number.NaN)).toThrow(RangeError);
  });
});
