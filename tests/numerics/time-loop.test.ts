/**
 * The time loop and its three parts: fixed step controller (step count, the last step landing on tEnd),
 * a rejecting controller (state restored, rejections counted), time-scheduled observers (Schedule) and the
 * dense-output event dating (LevelCrossings). The stepper here is the exact solution of u' = λu, so every
 * expected value is a closed form.
 */
import { describe, expect, it } from 'vitest';
import {
  LevelCrossings,
  Schedule,
  fixedStepController,
  interpolateCrossing,
  runTimeLoop,
  type FieldStepper,
  type StepController,
} from '../../server/numerics/time-loop.ts';

/** Exact growth u(t + dt) = u e^(λ dt) in every cell; reports dt as its "error estimate". */
function exactGrowth(lambda: number): FieldStepper & { sizes: number[] } {
  const sizes: number[] = [];
  return {
    sizes,
    step(u, _h, dt) {
      sizes.push(dt);
      for (let i = 0; i < u.length; i++) u[i] *= Math.exp(lambda * dt);
      return { errorEstimate: dt };
    },
    counters: () => ({ diffusion: { trbdf2Steps: sizes.length, fallbackSteps: 0, factorisations: 0 }, reaction: { substeps: 0 } }),
  };
}

describe('fixed step controller', () => {
  it('counts steps, ends exactly on tEnd with a shortened last step, and rejects nothing', () => {
    const s = exactGrowth(1);
    const u = new Float64Array([1]);
    const res = runTimeLoop(s, u, new Float64Array(1), { tEnd: 1.05, dt: 0.1 });
    expect(res.info.steps).toBe(11);
    expect(res.info.rejectedSteps).toBe(0);
    expect(res.t).toBe(1.05);
    expect(s.sizes[10]).toBeCloseTo(0.05, 12);
    expect(u[0]).toBeCloseTo(Math.exp(1.05), 12);
  });
  it('does not step a remainder below 1e-9 dt (steps are counted, not accumulated)', () => {
    const c = fixedStepController(1, 0.1);
    let t = 0;
    let n = 0;
    while (t < 1) {
      const a = c.propose(t);
      c.judge(a);
      t = a.tNext;
      n++;
    }
    expect(n).toBe(10);
    expect(t).toBe(1);
    expect(c.counts()).toEqual({ accepted: 10, rejected: 0 });
  });
});

describe('a controller that rejects', () => {
  it('restores the state, counts the rejection and reaches the same end state', () => {
    // Rejects every first attempt of a step of 0.2 and then accepts half of it.
    let size = 0.2;
    let accepted = 0;
    let rejected = 0;
    const controller: StepController = {
      mayReject: true,
      propose: (t) => (t + size > 1 - 1e-12 ? { dt: 1 - t, tNext: 1 } : { dt: size, tNext: t + size }),
      judge: (a, report) => {
        if ((report?.errorEstimate ?? 0) > 0.15) {
          rejected++;
          size = a.dt / 2;
          return false;
        }
        accepted++;
        return true;
      },
      counts: () => ({ accepted, rejected }),
    };
    const u = new Float64Array([2]);
    const res = runTimeLoop(exactGrowth(0.5), u, new Float64Array(1), { tEnd: 1, dt: 0.2, controller });
    expect(res.info.rejectedSteps).toBe(1);
    expect(res.info.steps).toBe(10);
    expect(u[0]).toBeCloseTo(2 * Math.exp(0.5), 12);
  });
});

describe('observers scheduled by time', () => {
  it('a periodic schedule fires at the first step ending at or after each multiple of the period', () => {
    const every = Schedule.periodic(0.3);
    const fired: number[] = [];
    runTimeLoop(exactGrowth(0), new Float64Array(1), new Float64Array(1), {
      tEnd: 1,
      dt: 0.1,
      observers: [{ handle: (st) => void (every.due(st.t) && fired.push(Number(st.t.toFixed(10)))) }],
    });
    // With dt = 0.1 and period 0.3 (three steps) the checks come at steps 3, 6, 9: as a step count would.
    expect(fired).toEqual([0.3, 0.6, 0.9]);
  });
  it('target times fire once each, several at one step when the step passes several', () => {
    const at = Schedule.at([0, 0.05, 0.07, 0.5]);
    expect(at.take(0)).toBe(1);
    expect(at.take(0.1)).toBe(2);
    expect(at.next()).toBe(0.5);
    expect(at.take(0.5 - 1e-10)).toBe(1); // within the 1e-9 yr round-off allowance
    expect(at.next()).toBe(Infinity);
  });
  it('the state carries the start and end time of each step', () => {
    const spans: [number, number][] = [];
    runTimeLoop(exactGrowth(0), new Float64Array(1), new Float64Array(1), {
      tEnd: 0.25,
      dt: 0.1,
      observers: [{ handle: (st) => void spans.push([st.tPrevious, st.t]) }],
    });
    expect(spans.map(([a, b]) => [Number(a.toFixed(12)), Number(b.toFixed(12))])).toEqual([[0, 0.1], [0.1, 0.2], [0.2, 0.25]]);
  });
});

describe('dense output for event times', () => {
  it('dates a level crossing by linear interpolation between step ends', () => {
    expect(interpolateCrossing(1, 0.1, 2, 0.5, 0.2)).toBeCloseTo(1.25, 14);
    expect(interpolateCrossing(1, 0.6, 2, 0.5, 0.2)).toBe(2); // not rising: dated at the step end
  });
  it('u = e^t crosses 2 at ln 2: the linear interpolant errs by O(dt²)', () => {
    for (const dt of [0.1, 0.05]) {
      const c = new LevelCrossings(1, 2);
      const u = new Float64Array([1]);
      runTimeLoop(exactGrowth(1), u, new Float64Array(1), {
        tEnd: 1,
        dt,
        observers: [{ initialize: (st) => c.start(st.t, () => st.u[0]), handle: (st) => c.update(st.t, () => st.u[0]) }],
      });
      // Chord of e^t over a step of dt: error ≤ dt²/8 · max|u''|/u' ≈ dt²/8 (here 1.2e-3 and 3e-4).
      expect(Math.abs(c.times[0]! - Math.LN2)).toBeLessThan((dt * dt) / 8);
      expect(Math.abs(c.times[0]! - Math.LN2)).toBeGreaterThan(0);
    }
  });
  it('a value at the level at the start is dated at the start only when asked', () => {
    const a = new LevelCrossings(1, 1);
    a.start(3, () => 1);
    expect(a.times[0]).toBe(3);
    const b = new LevelCrossings(1, 1);
    b.start(3, () => 1, false);
    expect(b.times[0]).toBeNull();
    b.update(4, () => 1);
    expect(b.times[0]).toBe(4);
  });
});
