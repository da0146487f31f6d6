/**
 * Bench (b): the option run of bench (a) (100 km at 25 m, 30 yr, 500 m clearing) solved by our engine and
 * by scipy's solve_ivp (BDF, sparse analytic Jacobian) on the same finite-volume semi-discretisation,
 * both compared with a fine solution (our engine at 6.25 m cells and a quarter of the step, its own
 * difference to the 12.5 m solution printed as a check). Error: L1 distance of the density profile at
 * year 30, ∫|u − u_fine| dx [km], and the front-position difference [m]. Floor: ours ≥ 10× faster at equal
 * or smaller error.
 *
 * The adaptive integrator (numerics/steppers/: variable-order NDF, lockstep tridiagonal solves, active window)
 * runs at a list of tolerances; the table at three accuracy levels (L1 ≈ 1e-3, 1e-4, 3e-5 km) takes, per
 * level, our cheapest run with an error at or below the level and the cheapest scipy run with an error at or
 * below ours. Timings: ours best of several runs before and after the scipy runs (the machine is shared),
 * scipy best of its repeats, all in this one bench process and its one python child.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { parseScenario, pointScenario } from '../server/model/scenario.ts';
import { runLayout, type RunOutput } from '../server/analysis/run/simulate.ts';
import { buildLayout } from '../server/problem/layout.ts';
import { chooseResolution, discretise } from '../server/problem/discretise.ts';
import { makeDiffusionOperator } from '../server/numerics/diffusion.ts';
import { rightFrontKm } from '../server/analysis/run/trackers.ts';
import type { Grid } from '../server/numerics/grid.ts';
import { transect100km } from './problems.ts';
import { runAdaptiveLoop, windowFloor, type AdaptiveResult } from '../server/numerics/steppers/adaptive-loop.ts';
import { lowDensityRate } from '../server/model/growth.ts';

const s = pointScenario(parseScenario(transect100km()));
const pieces = buildLayout(s, s.barrier!.options[0]);
const auto = chooseResolution(s, pieces);

function ours(cellKm: number, stepYears: number): { out: RunOutput; ms: number } {
  let best = Infinity;
  let out!: RunOutput;
  for (let rep = 0; rep < 3; rep++) {
    const t0 = performance.now();
    out = runLayout({ scenario: s, pieces, record: false, resolution: { ...auto, cellKm, stepYears } });
    best = Math.min(best, performance.now() - t0);
  }
  return { out, ms: best };
}

/** Averages a fine profile onto a coarse grid whose faces are a subset of the fine faces. */
function coarsen(fine: Grid, u: Float64Array, coarse: Grid): Float64Array {
  const out = new Float64Array(coarse.nCells);
  let j = 0;
  for (let i = 0; i < coarse.nCells; i++) {
    let mass = 0;
    while (j < fine.nCells && fine.centersKm[j] < coarse.facesKm[i + 1]) {
      mass += u[j] * fine.widthsKm[j];
      j++;
    }
    out[i] = mass / coarse.widthsKm[i];
  }
  return out;
}

function l1(grid: Grid, a: ArrayLike<number>, b: ArrayLike<number>): number {
  let e = 0;
  for (let i = 0; i < grid.nCells; i++) e += Math.abs(a[i] - b[i]) * grid.widthsKm[i];
  return e;
}

const coarseKm = 0.025;
const dt = auto.stepYears;
const run25 = ours(coarseKm, dt);
// Our engine with longer steps too (a user may set numerics.stepYears): 2× and 4× the automatic step.
const longer = [2, 4].map((f) => ({ factor: f, ...ours(coarseKm, f * dt) }));
const fine = ours(coarseKm / 4, dt / 4);
const mid = ours(coarseKm / 2, dt / 2);
const g25 = run25.out.problem.grid;
const ref = coarsen(fine.out.problem.grid, fine.out.u, g25);
const level = s.detectionLevel;
const frontRef = rightFrontKm(fine.out.problem.grid, fine.out.u, level);
const errOurs = l1(g25, run25.out.u, ref);
const selfCheck = l1(g25, coarsen(mid.out.problem.grid, mid.out.u, g25), ref);
console.log(`fine reference: ${fine.out.problem.grid.nCells} cells, dt ${dt / 4} yr (${(fine.ms / 1000).toFixed(1)} s); its 12.5 m neighbour differs by L1 ${selfCheck.toExponential(2)} km`);
console.log(`ours   25 m, dt ${dt} yr (automatic): ${run25.ms.toFixed(0)} ms, L1 error ${errOurs.toExponential(2)} km, front error ${((rightFrontKm(g25, run25.out.u, level) - frontRef) * 1000).toFixed(1)} m`);
const oursRows = [{ label: `automatic step ${dt} yr`, ms: run25.ms, err: errOurs }];
for (const r of longer) {
  const err = l1(g25, r.out.u, ref);
  oursRows.push({ label: `step ${r.factor * dt} yr`, ms: r.ms, err });
  console.log(`ours   25 m, dt ${r.factor * dt} yr: ${r.ms.toFixed(0)} ms, L1 error ${err.toExponential(2)} km, front error ${((rightFrontKm(g25, r.out.u, level) - frontRef) * 1000).toFixed(1)} m`);
}

// --- The adaptive integrator at a list of tolerances (atol = 1e-3 rtol, like the scipy runs). ---
const adaptiveProblem = discretise(s, pieces, { ...auto, cellKm: coarseKm });
const adaptiveOp = makeDiffusionOperator(adaptiveProblem.grid, adaptiveProblem.diffusionAtCells, adaptiveProblem.residenceAtCells, adaptiveProblem.ends);
const adaptiveRtols = [1e-3, 3e-4, 1e-4, 3e-5, 1e-5, 3e-6, 1e-6];
interface AdaptiveRow { rtol: number; ms: number; err: number; front: number; res: AdaptiveResult }
function adaptive(rtol: number, reps: number, windowed = true): AdaptiveRow {
  let best = Infinity;
  let res!: AdaptiveResult;
  let u!: Float64Array;
  for (let rep = 0; rep < reps; rep++) {
    u = Float64Array.from(adaptiveProblem.u0);
    const h = Float64Array.from(adaptiveProblem.stockingAtCells);
    const t0 = performance.now();
    res = runAdaptiveLoop(
      adaptiveOp,
      { hostAtCells: adaptiveProblem.hostAtCells, mortalityAtCells: adaptiveProblem.mortalityAtCells, perCapita: adaptiveProblem.perCapita, hostKillRate: adaptiveProblem.hostKillRate },
      u,
      h,
      {
        tEnd: s.horizonYears,
        rtol,
        atol: rtol * 1e-3,
        window: windowed ? { floor: windowFloor(s.detectionLevel, lowDensityRate(s.pest.growth, 1), s.horizonYears), hostFloor: 1e-6 } : null,
      },
    );
    best = Math.min(best, performance.now() - t0);
  }
  return { rtol, ms: best, err: l1(g25, u, ref), front: (rightFrontKm(g25, u, level) - frontRef) * 1000, res };
}
for (let k = 0; k < 3; k++) adaptive(1e-4, 1); // warm-up (JIT)
const adaptiveRows = adaptiveRtols.map((rtol) => adaptive(rtol, 7));
const noWindow = adaptive(1e-5, 3, false);

function adaptiveTable(scipyRows: { rtol: number; seconds: number; nfev: number; err: number }[]): void {
  // Second pass after scipy: keep the better time of the two passes (drift of a shared machine).
  for (const row of adaptiveRows) row.ms = Math.min(row.ms, adaptive(row.rtol, 7).ms);
  console.log('\nadaptive NDF (ours), 25 m, atol = 1e-3 rtol:');
  for (const r of adaptiveRows) {
    const c = r.res.info.adaptive;
    console.log(
      `  rtol ${r.rtol.toExponential(0)}: ${r.ms.toFixed(1)} ms, L1 error ${r.err.toExponential(2)} km, front error ${r.front.toFixed(1)} m; ` +
        `${c.accepted} steps, ${c.rejected} rejected, ${c.rhsEvaluations} f, ${c.jacobianEvaluations} J, ${c.factorisations} LU ` +
        `(${c.lockstepFactorisations} lockstep, ${c.thomasFactorisations} Thomas), window ≤ ${r.res.info.adaptive.largestWindowCells}/${g25.nCells} cells`,
    );
  }
  console.log(`  rtol 1e-5 without the active window: ${noWindow.ms.toFixed(1)} ms, L1 error ${noWindow.err.toExponential(2)} km`);
  console.log('\n(b) adaptive: level | ours rtol, L1 error, ms, steps, rejected | scipy rtol, L1 error, ms, nfev | ratio');
  for (const level of [1e-3, 1e-4, 3e-5]) {
    const mine = adaptiveRows.filter((r) => r.err <= level).sort((a, b) => a.ms - b.ms)[0];
    if (!mine) {
      console.log(`  L1 ≤ ${level.toExponential(0)}: no tolerance of ours reached it — NOT MET`);
      continue;
    }
    let theirs = scipyRows.filter((r) => r.err <= mine.err).sort((a, b) => a.seconds - b.seconds)[0];
    let note = '';
    if (!theirs) {
      // No scipy run is as accurate as ours: compare with its most accurate run (which is cheaper than one
      // that reached our error would be, so the ratio is a lower bound).
      theirs = [...scipyRows].sort((a, b) => a.err - b.err)[0];
      note = ' (no scipy run reached our error; against its most accurate run: a lower bound)';
    }
    const ratio = (theirs.seconds * 1000) / mine.ms;
    console.log(
      `  L1 ≤ ${level.toExponential(0)} | ${mine.rtol.toExponential(0)}, ${mine.err.toExponential(2)}, ${mine.ms.toFixed(1)} ms, ${mine.res.info.adaptive.accepted}, ${mine.res.info.adaptive.rejected} ` +
        `| ${theirs.rtol.toExponential(0)}, ${theirs.err.toExponential(2)}, ${(theirs.seconds * 1000).toFixed(0)} ms, ${theirs.nfev} | ${ratio.toFixed(1)}× ` +
        `(floor 10×: ${ratio >= 10 ? 'MET' : 'NOT MET'})${note}`,
    );
  }
}

const python = spawnSync('python3', ['-c', 'import scipy'], { encoding: 'utf8' });
if (python.status !== 0) {
  console.log('SKIPPED scipy comparison: python3 with scipy not found');
} else {
  const problem = discretise(s, pieces, { ...auto, cellKm: coarseKm });
  const op = makeDiffusionOperator(problem.grid, problem.diffusionAtCells, problem.residenceAtCells, problem.ends);
  const g = s.pest.growth;
  if (g.form !== 'allee-cubic') throw new Error('bench (b) expects the allee-cubic profile');
  const input = {
    lower: Array.from(op.lower),
    diag: Array.from(op.diag),
    upper: Array.from(op.upper),
    host: Array.from(problem.hostAtCells),
    mortality: Array.from(problem.mortalityAtCells),
    rate: g.rate,
    allee: g.alleeThreshold,
    hostKill: s.pest.hostKillRate,
    u0: Array.from(problem.u0),
    h0: Array.from(problem.stockingAtCells),
    tEnd: s.horizonYears,
    rtols: [3e-2, 1e-2, 3e-3, 1e-3, 3e-4, 1e-4, 3e-5, 1e-5, 3e-6],
    repeats: 3,
  };
  // OPENBLAS_CORETYPE / OPENBLAS_L2_SIZE (set on some machines for old OpenBLAS builds) can slow a current
  // numpy: the reference runs without them.
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const r = spawnSync('python3', [fileURLToPath(new URL('./fv_reference.py', import.meta.url))], {
    env,
    input: JSON.stringify(input),
    encoding: 'utf8',
    maxBuffer: 256 << 20,
  });
  if (r.status !== 0) throw new Error(r.stderr);
  console.log(`reference: ${r.stderr.trim()}`);
  const rows = JSON.parse(r.stdout) as { rtol: number; seconds: number; status: number; nfev: number; nlu: number; u: number[] }[];
  const scipyRows = rows.map((row) => ({ ...row, err: l1(g25, row.u, ref) }));
  for (const row of scipyRows) {
    const front = (rightFrontKm(g25, Float64Array.from(row.u), level) - frontRef) * 1000;
    console.log(`scipy BDF rtol ${row.rtol.toExponential(0)}: ${(row.seconds * 1000).toFixed(0)} ms, L1 error ${row.err.toExponential(2)} km, front error ${front.toFixed(1)} m (nfev ${row.nfev}, LU ${row.nlu}, status ${row.status})`);
  }
  adaptiveTable(scipyRows);
  for (const o of oursRows) {
    // Cheapest scipy run whose error is at most ours (equal or smaller error).
    const ok = scipyRows.filter((r) => r.err <= o.err).sort((a, b) => a.seconds - b.seconds)[0];
    if (!ok) {
      console.log(`(b) ${o.label}: no scipy tolerance reached our error ${o.err.toExponential(2)}`);
      continue;
    }
    const ratio = (ok.seconds * 1000) / o.ms;
    console.log(`(b) ${o.label}: ours ${o.ms.toFixed(0)} ms at L1 ${o.err.toExponential(2)}; cheapest scipy at equal or smaller error: rtol ${ok.rtol.toExponential(0)}, ${(ok.seconds * 1000).toFixed(0)} ms → ours ${ratio.toFixed(1)}× faster (floor 10×: ${ratio >= 10 ? 'MET' : 'NOT MET'})`);
  }
}
