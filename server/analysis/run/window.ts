/** Window runs: from a start state until the front crosses, pinning is verified, every site is reached, or the end. */
import { Schedule, type Observer } from '../../numerics/time-loop.ts';
import { integrate } from './simulate.ts';
import { growthRateScale } from '../../problem/discretise.ts';
import { ArrivalTracker } from './trackers.ts';

import { type BarrierGeometry } from '../../problem/geometry.ts';
import { initialFields, withOffset, type WindowSolver, type StartState } from './window-solver.ts';
import { CrossingWatch, crossingProbeKm } from './watches.ts';
import { PinningJudge, type Judgement } from './pinning.ts';

/** Result of a window run. */
export interface WindowOutcome {
  outcome: 'crossed' | 'pinned' | 'open';
  /** Year the front was established beyond the clearing, if it was. */
  crossedYears: number | null;
  judgement: Judgement | null;
  /** Year the run ended. */
  endYears: number;
  /** First year each requested position reached the detection level (null if not). */
  arrivals: (number | null)[];
  u: Float64Array;
  h: Float64Array;
  steps: number;
}

export interface WindowRunOptions {
  start: StartState;
  /** Absolute end time [yr]. */
  tEnd: number;
  geometry: BarrierGeometry;
  /** Stop as soon as the front is established beyond the clearing. */
  stopOnCross: boolean;
  /** Verify pinning every `checkYears` and stop once verified. */
  judge?: boolean;
  checkYears?: number;
  /** Positions whose arrival (detection level) to record [km]; the run continues until they are all reached when stopOnArrivals. */
  sitesKm?: number[];
  stopOnArrivals?: boolean;
  /** The pest had already reached the clearing before the start state (e.g. during the run this one extends). */
  arrivedBefore?: boolean;
  shouldCancel?: () => boolean;
}

/** Runs a window solver from a start state until crossing, verified pinning, all arrivals, or tEnd. */
export function runWindow(solver: WindowSolver, o: WindowRunOptions): WindowOutcome {
  const { grid } = solver.problem;
  const s = solver.scenario;
  const f = initialFields(solver, o.start);
  const u = f.u;
  const h = f.h;
  const watch = new CrossingWatch(grid, o.geometry, solver.establishedAtCells, o.stopOnCross, crossingProbeKm(s), s.detectionLevel);
  const judge = o.judge ? new PinningJudge(solver, o.geometry) : null;
  if (judge && o.arrivedBefore) judge.arrived = true;
  const dt = solver.problem.resolution.stepYears;
  // Pinning checks every whole number of steps nearest to checkYears, scheduled by time from the start state.
  const checkEvery = Math.max(1, Math.round((o.checkYears ?? Math.max(0.5, 2 / growthRateScale(s.pest.growth))) / dt));
  const checks = Schedule.periodic(checkEvery * dt, o.start.t);
  let judgement: Judgement | null = null;
  const sites = o.sitesKm ?? [];
  const arrivalTracker = new ArrivalTracker(grid, sites, s.detectionLevel);
  const observer: Observer = {
    initialize: (st) => {
      watch.initialize(st);
      arrivalTracker.initialize(st);
      judge?.note(st.u);
    },
    handle: (st) => {
      let stop = watch.handle(st);
      arrivalTracker.handle(st);
      judge?.note(st.u);
      // Arrivals alone do not end the run while the crossing is still to be seen (a site can see the
      // fringe at the detection level long before the front passes the clearing).
      if (o.stopOnArrivals && sites.length && arrivalTracker.allArrived() && watch.crossedYears !== null) stop = true;
      if (checks.due(st.t) && judge && watch.crossedYears === null) {
        const j = judge.check(st.t, st.u, st.h);
        if (j) {
          judgement = j;
          stop = true;
        }
      }
      return stop;
    },
  };
  const t0 = o.start.t;
  const span = o.tEnd - t0;
  let steps = 0;
  let endYears = t0;
  if (span > 1e-12) {
    const res = integrate(solver.problem, solver.op, solver.stepper, u, h, {
      tEnd: span,
      detectionLevel: s.detectionLevel,
      observers: [withOffset(observer, t0)],
      // The crossing and the arrivals are dated by the dense output; pinning checks run at step ends.
      regularOutputs: false,
      shouldCancel: o.shouldCancel,
    });
    steps = res.info.steps;
    endYears = t0 + res.t;
  }
  // A last look at the horizon: a run that ends exactly there still gets its pinning check.
  if (judge && !judgement && watch.crossedYears === null) judgement = judge.check(endYears, u, h);
  const j = judgement as Judgement | null;
  return {
    outcome: watch.crossedYears !== null ? 'crossed' : j?.verified ? 'pinned' : 'open',
    crossedYears: watch.crossedYears,
    judgement: j,
    endYears,
    // A site already at the detection level when the window run starts counts as reached at its start.
    arrivals: arrivalTracker.arrivalYears.map((a) => (a === null ? null : Math.max(a, t0))),
    u,
    h,
    steps,
  };
}
