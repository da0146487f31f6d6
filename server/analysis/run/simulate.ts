import { checkFiniteCoefficients } from '../../numerics/finite.ts';
import { makeDiffusionOperator, type DiffusionOperator } from '../../numerics/diffusion.ts';
import { makeCoupledStepper } from '../../numerics/coupled.ts';
import { runTimeLoop, type FieldStepper, type Observer, type SolverResult } from '../../numerics/time-loop.ts';
import { runAdaptiveLoop, windowFloor } from '../../numerics/steppers/adaptive-loop.ts';
import type { PointScenario } from '../../model/scenario.ts';
import { asProblem, type Problem } from '../../problem/problem.ts';
import { discretise, type Resolution, type TransectProblem } from '../../problem/discretise.ts';
import { HA_PER_KM2, type Piece } from '../../problem/layout.ts';
import { ArrivalTracker, FrontTracker, SnapshotRecorder, profileCells } from './trackers.ts';
import { spreadRate } from './speed.ts';
import type { RunResult, SpreadRateSummary } from '../result.ts';

export interface RunRequest {
  /** The problem to run (a point scenario gets its own). */
  scenario: PointScenario | Problem;
  pieces: Piece[];
  /** End time [yr]; the scenario horizon by default. */
  tEnd?: number;
  /** Override of the automatic resolution. */
  resolution?: Resolution;
  /** The layout already discretised with these pieces and resolution (callers that built observers on its grid); discretised here otherwise. */
  problem?: TransectProblem;
  /** Extra observers (e.g. stop conditions of the barrier analysis). */
  observers?: Observer[];
  /** Times [yr] at which observers must see the state exactly (adaptive steps: by dense output; fixed steps: multiples of the step). */
  outputTimes?: readonly number[];
  /** false: observers see step ends only (they date events by the dense output; no series sampled in time). */
  regularOutputs?: boolean;
  /** Record profiles and the space–time map (default true; ensembles switch it off). */
  record?: boolean;
  shouldCancel?: () => boolean;
  onProgress?: (fraction: number) => void;
  /**
   * Initial density per cell in place of the infestation stretch (e.g. a smooth profile for a verification
   * run, or a state to continue from); must return nCells non-negative values.
   */
  initialDensity?: (problem: TransectProblem) => Float64Array;
}

export interface RunOutput {
  problem: TransectProblem;
  /** Final density and host fraction per cell. */
  u: Float64Array;
  h: Float64Array;
  solver: SolverResult;
  front: FrontTracker;
  arrivals: ArrivalTracker;
  profiles: SnapshotRecorder | null;
  map: SnapshotRecorder | null;
  profileCells: Int32Array;
  mapCells: Int32Array;
}

/** Snapshots kept for profile charts (evenly spaced, including start and end). */
const PROFILE_SNAPSHOTS = 7;
/** Rows and columns of the space–time map. */
const MAP_ROWS = 61;
const MAP_COLUMNS = 300;

function linspace(a: number, b: number, n: number): number[] {
  return Array.from({ length: n }, (_, k) => a + ((b - a) * k) / (n - 1));
}

/**
 * The engine's step for a discretised problem: the coupled TR-BDF2 movement + growth step (numerics/coupled.ts).
 * Every run of the model — full transect or a window around a clearing — steps through this one factory.
 */
export function makeEngineStepper(problem: TransectProblem): { op: DiffusionOperator; stepper: FieldStepper } {
  const op = makeDiffusionOperator(problem.grid, problem.diffusionAtCells, problem.residenceAtCells, problem.ends);
  const stepper = makeCoupledStepper(op, {
    hostAtCells: problem.hostAtCells,
    mortalityAtCells: problem.mortalityAtCells,
    perCapita: problem.perCapita,
    hostKillRate: problem.hostKillRate,
    stiffness: problem.stiffness,
  });
  return { op, stepper };
}

/** Absolute tolerance of the adaptive integrator as a share of its relative tolerance [relative density]. */
const ATOL_PER_RTOL = 1e-3;
/**
 * Observers see an adaptive run every OUTPUT_STEPS × stepYears (dense output), besides every accepted step,
 * unless a run asks for step ends only (`regularOutputs: false`). stepYears is 0.05/(rate scale): series
 * (front positions, totals) are sampled every 0.2/(rate scale), and pinning checks and snapshots fall on
 * whole multiples. Level passages (arrivals, crossings) do not depend on the sampling: the trackers date
 * them by a root of the step's interpolating polynomial (FieldState.densityAt).
 */
export const OUTPUT_STEPS = Number(process.env.OUTPUT_STEPS ?? 4);
/** Host fraction below which a cell behind the front counts as "hosts gone" for the active window. */
const HOSTS_GONE = 1e-6;

/** Largest per-capita rate at low density over the problem's cells and any host fraction they can reach [1/yr]. */
function lowDensityGrowth(problem: TransectProblem): number {
  let r = 0;
  for (let i = 0; i < problem.grid.nCells; i++) {
    if (!problem.hostAtCells[i]) continue;
    // Host fractions only fall: g(0, h) over [0, h0] is largest at one end for every growth form here.
    r = Math.max(r, problem.perCapita(0, problem.stockingAtCells[i]), problem.perCapita(0, 0));
  }
  return r;
}

/**
 * Integrates a discretised problem from (u, h) over tEnd years: adaptive NDF steps at the resolution's
 * tolerance (observers see the state every `stepYears` by dense output and at every accepted step; cells
 * that cannot matter are skipped, see numerics/steppers/adaptive-loop.ts), or fixed steps of `stepYears`
 * with the coupled TR-BDF2 stepper when the user set the step. Every run of the engine goes through here.
 */
export function integrate(
  problem: TransectProblem,
  op: DiffusionOperator,
  stepper: FieldStepper,
  u: Float64Array,
  h: Float64Array,
  o: {
    tEnd: number;
    detectionLevel: number;
    observers: Observer[];
    outputTimes?: readonly number[];
    /**
     * Also show observers the state every OUTPUT_STEPS × stepYears (default true: series and snapshots
     * sampled in time); false when they only date events, which the dense output does inside each step.
     */
    regularOutputs?: boolean;
    shouldCancel?: () => boolean;
    onProgress?: (fraction: number) => void;
  },
): SolverResult {
  const { stepYears, tolerance } = problem.resolution;
  if (tolerance === undefined) {
    return runTimeLoop(stepper, u, h, { tEnd: o.tEnd, dt: stepYears, observers: o.observers, shouldCancel: o.shouldCancel, onProgress: o.onProgress });
  }
  const res = runAdaptiveLoop(
    op,
    { hostAtCells: problem.hostAtCells, mortalityAtCells: problem.mortalityAtCells, perCapita: problem.perCapita, hostKillRate: problem.hostKillRate },
    u,
    h,
    {
      tEnd: o.tEnd,
      rtol: tolerance,
      atol: ATOL_PER_RTOL * tolerance,
      outputEvery: o.regularOutputs === false ? undefined : OUTPUT_STEPS * stepYears,
      outputTimes: o.outputTimes ? [...new Set(o.outputTimes.filter((t) => t > 0 && t <= o.tEnd))].sort((a, b) => a - b) : undefined,
      window: { floor: windowFloor(o.detectionLevel, lowDensityGrowth(problem), o.tEnd), hostFloor: HOSTS_GONE },
      observers: o.observers,
      shouldCancel: o.shouldCancel,
      onProgress: o.onProgress,
    },
  );
  if (res.status === 'failed') throw new RangeError(`time integration failed: ${res.message}`);
  return res as SolverResult;
}

/** Runs one layout of a scenario from the current infestation. The engine call shared by every caller. */
export function runLayout(req: RunRequest): RunOutput {
  const s = asProblem(req.scenario);
  const problem = req.problem ?? discretise(s, req.pieces, req.resolution);
  const tEnd = req.tEnd ?? s.horizonYears;
  const { grid } = problem;
  checkFiniteCoefficients(problem); // refuses coefficients that would turn the run into NaN (numerics/finite.ts)
  const { op, stepper } = makeEngineStepper(problem);
  const u = Float64Array.from(req.initialDensity ? req.initialDensity(problem) : problem.u0);
  if (u.length !== grid.nCells) throw new RangeError(`initialDensity gave ${u.length} values for ${grid.nCells} cells`);
  const h = Float64Array.from(problem.stockingAtCells);
  const front = new FrontTracker(grid, s.detectionLevel);
  const arrivals = new ArrivalTracker(grid, s.sites.map((x) => x.atKm), s.detectionLevel);
  const record = req.record ?? true;
  const pCells = profileCells(grid);
  const mCells = profileCells(grid, MAP_COLUMNS, 2);
  const profiles = record ? new SnapshotRecorder(pCells, linspace(0, tEnd, PROFILE_SNAPSHOTS)) : null;
  const map = record ? new SnapshotRecorder(mCells, linspace(0, tEnd, MAP_ROWS)) : null;
  const observers: Observer[] = [front, arrivals, ...(profiles ? [profiles] : []), ...(map ? [map] : []), ...(req.observers ?? [])];
  // Snapshots are taken at their own times: with adaptive steps the dense output supplies those states.
  const outputTimes = [...(req.outputTimes ?? []), ...(profiles ? linspace(0, tEnd, PROFILE_SNAPSHOTS) : []), ...(map ? linspace(0, tEnd, MAP_ROWS) : [])];
  const solver = integrate(problem, op, stepper, u, h, {
    tEnd,
    detectionLevel: s.detectionLevel,
    observers,
    outputTimes,
    regularOutputs: req.regularOutputs,
    shouldCancel: req.shouldCancel,
    onProgress: req.onProgress,
  });
  return { problem, u, h, solver, front, arrivals, profiles, map, profileCells: pCells, mapCells: mCells };
}

/** Keeps at most `max` evenly spread indices of a series, always including the first and the last. */
export function decimateIndices(n: number, max: number): number[] {
  if (n <= max) return Array.from({ length: n }, (_, i) => i);
  const out = new Set<number>();
  for (let k = 0; k < max; k++) out.add(Math.round((k * (n - 1)) / (max - 1)));
  return [...out];
}

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

/** Rounds to 6 significant digits to keep documents small (profiles and series only). */
const sig = (x: number): number => (x === 0 || !Number.isFinite(x) ? x : Number(x.toPrecision(6)));

/**
 * Measured spread rates of both fronts. The fit window excludes the initial stretch and the last 5 % of
 * the transect on the side the front moves towards (end effects).
 */
export function measuredSpreadRates(out: RunOutput, s: Pick<Problem, 'infestation'>): SpreadRateSummary[] {
  const f = out.problem.grid.facesKm;
  const start = f[0];
  const end = f[f.length - 1];
  const margin = 0.05 * (end - start);
  const fits = [
    { direction: 'right' as const, fit: spreadRate(out.front.times, out.front.rightKm, { lowKm: s.infestation.toKm, highKm: end - margin }, 1) },
    { direction: 'left' as const, fit: spreadRate(out.front.times, out.front.leftKm, { lowKm: start + margin, highKm: s.infestation.fromKm }, -1) },
  ];
  return fits.map(({ direction, fit }) => ({
    direction,
    kmPerYear: fit ? fit.kmPerYear : null,
    fromYears: fit ? fit.fromYears : null,
    toYears: fit ? fit.toYears : null,
    rSquared: fit ? fit.rSquared : null,
  }));
}

/** Stem-weighted host fraction left and stems killed per km of front width. */
export function hostSummary(problem: TransectProblem, h: Float64Array): RunResult['host'] {
  const { grid, stockingAtCells, stemsAtCells, hostAtCells } = problem;
  let stems0 = 0;
  let killed = 0;
  for (let i = 0; i < grid.nCells; i++) {
    if (!hostAtCells[i] || stockingAtCells[i] <= 0) continue;
    const stems = stemsAtCells[i] * grid.widthsKm[i] * HA_PER_KM2;
    stems0 += stems;
    killed += stems * (1 - h[i] / stockingAtCells[i]);
  }
  return { remainingFraction: stems0 > 0 ? 1 - killed / stems0 : 1, stemsKilledPerKm: killed };
}

/** Turns a run into the JSON summary of the result document. */
export function summariseRun(out: RunOutput, s: Pick<Problem, 'infestation' | 'sites'>): RunResult {
  const { problem, front, solver } = out;
  const { grid } = problem;
  const keep = decimateIndices(front.times.length, 400);
  const x = (cells: Int32Array) => Array.from(cells, (c) => sig(grid.centersKm[c]));
  let cellMin = Infinity;
  let cellMax = 0;
  for (let i = 0; i < grid.nCells; i++) {
    cellMin = Math.min(cellMin, grid.widthsKm[i]);
    cellMax = Math.max(cellMax, grid.widthsKm[i]);
  }
  return {
    layout: problem.pieces.map((p) => ({
      fromKm: p.fromKm,
      toKm: p.toKm,
      habitat: p.habitat,
      stocking: p.stocking,
      stemsPerHa: p.stemsPerHa,
      barrier: p.barrier,
    })),
    series: {
      timesYears: keep.map((i) => sig(front.times[i])),
      rightFrontKm: keep.map((i) => finiteOrNull(sig(front.rightKm[i]))),
      leftFrontKm: keep.map((i) => finiteOrNull(sig(front.leftKm[i]))),
      totalInsects: keep.map((i) => sig(front.total[i])),
    },
    profiles: {
      xKm: x(out.profileCells),
      snapshots: (out.profiles?.snapshots ?? []).map((sn) => ({
        timeYears: sig(sn.timeYears),
        density: sn.density.map(sig),
        host: sn.host.map(sig),
      })),
    },
    spaceTime: {
      xKm: x(out.mapCells),
      timesYears: (out.map?.snapshots ?? []).map((sn) => sig(sn.timeYears)),
      density: (out.map?.snapshots ?? []).map((sn) => sn.density.map(sig)),
    },
    arrivals: s.sites.map((site, k) => ({ name: site.name, atKm: site.atKm, arrivalYears: out.arrivals.arrivalYears[k] })),
    spreadRates: measuredSpreadRates(out, s),
    host: hostSummary(problem, out.h),
    endYears: solver.t,
    numerics: {
      status: solver.status,
      message: solver.message,
      nCells: grid.nCells,
      cellKmMin: cellMin,
      cellKmMax: cellMax,
      stepYears: problem.resolution.stepYears,
      autoCell: problem.resolution.autoCell,
      autoStep: problem.resolution.autoStep,
      steps: solver.info.steps,
      rejectedSteps: solver.info.rejectedSteps,
      stepControl: problem.resolution.tolerance === undefined ? 'fixed' : 'adaptive',
      ...(solver.info.adaptive
        ? {
            tolerance: problem.resolution.tolerance,
            jacobianEvaluations: solver.info.adaptive.jacobianEvaluations,
            factorisations: solver.info.adaptive.factorisations,
          }
        : {}),
      fallbackSteps: solver.info.diffusion.fallbackSteps,
      reactionSubsteps: solver.info.reaction.substeps,
      wallMs: Math.round(solver.info.wallMs),
    },
  };
}
