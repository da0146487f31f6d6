/**
 * 2-D bench against scipy: a 20 × 20 km map of uniform host forest at 100 m (200 × 200 = 40 000 cells), a
 * 1 km infested disc in the centre, a host-killing logistic pest, 8 years, solved by our map stepper
 * (numerics/raster/stepper.ts: TR-BDF2 with line-factorised stages and an active window) and by scipy's
 * solve_ivp (BDF, sparse analytic Jacobian) on the same finite-volume semi-discretisation — the sparse
 * diffusion operator is exported from our operator as coordinates (bench/fv2d_reference.py). Error: L1
 * distance of the year-8 density map, Σ|u − u_ref| h² [km²], against scipy at rtol 1e-9 (the reference;
 * our finest step's distance to it is printed as a check that the two solve the same equations).
 * Table: for each of our steps, the cheapest scipy run whose error is at or below ours. Floor (issue): ours
 * ≥ 10× faster at equal or smaller error. Ours: best of 3 runs, taken before and after the scipy runs (the
 * machine is shared); scipy: one run per tolerance after a warm-up, all in this one bench run.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { RASTER_CLASSES, type RasterLandscape } from '../server/domain/raster.ts';
import { landscapeProblem, problemStepper, type LandscapeProblem, type PointPest } from '../server/analysis/landscape/problem.ts';

const N = 200;
const CELL_M = 100;
const T = 8;
const pest = { name: 'bench borer (invented)', illustrative: true, diffusionHost: 0.3, diffusionOpen: 1.2, edgePreferenceOpen: 0.8, growth: { form: 'logistic', rate: 0.8 }, hostKillRate: 0.3, mortalityOpen: 1.5 } as unknown as PointPest;

function uniformMap(): RasterLandscape {
  const n = N * N;
  const infested = new Float32Array(n);
  for (let k = 0; k < n; k++) {
    const x = ((k % N) + 0.5) * CELL_M - 10000;
    const y = (Math.floor(k / N) + 0.5) * CELL_M - 10000;
    if (Math.hypot(x, y) < 1000) infested[k] = 1;
  }
  return {
    nx: N,
    ny: N,
    cellM: CELL_M,
    originXM: 0,
    originYM: 0,
    crs: { code: 'EPSG:3857', proj4: '', name: 'bench metres' },
    classAtCells: new Uint8Array(n).fill(RASTER_CLASSES.indexOf('host')),
    hostCoverAtCells: new Float32Array(n).fill(1),
    stemsAtCells: new Float32Array(n).fill(400),
    outside: 'impassable',
    infestedAtCells: infested,
    sites: [],
    bands: [],
  };
}

const map = uniformMap();
const problem = (stepYears?: number) => landscapeProblem(map, pest, { mapEdges: 'reflecting', infestedDensity: 1, horizonYears: T, stepYears });

function run(p: LandscapeProblem): Float64Array {
  const stepper = problemStepper(p);
  const u = Float64Array.from(p.u0);
  const h = Float64Array.from(p.stockingAtCells);
  const steps = Math.round(T / p.stepYears);
  for (let i = 0; i < steps; i++) stepper.step(u, h, p.stepYears);
  return u;
}

function ours(stepYears: number): { u: Float64Array; ms: number } {
  const p = problem(stepYears);
  let best = Infinity;
  let u!: Float64Array;
  for (let rep = 0; rep < 3; rep++) {
    const t0 = performance.now();
    u = run(p);
    best = Math.min(best, performance.now() - t0);
  }
  return { u, ms: best };
}

/** The operator L of the semi-discretisation as coordinates: (L u)_k = Σ_faces g (u_n/ρ_n − u_k/ρ_k) − lethal u_k/ρ_k. */
function operatorCoordinates(p: LandscapeProblem): { rows: number[]; cols: number[]; vals: number[] } {
  const { nx, ny, gx, gy, invResidence: ir, lethal } = p.op;
  const rows: number[] = [];
  const cols: number[] = [];
  const vals: number[] = [];
  const add = (i: number, j: number, v: number) => (rows.push(i), cols.push(j), vals.push(v));
  for (let k = 0; k < nx * ny; k++) {
    const q = k % nx;
    const faces: [number, number][] = [];
    if (q < nx - 1) faces.push([k + 1, gx[k]]);
    if (q > 0) faces.push([k - 1, gx[k - 1]]);
    if (k + nx < nx * ny) faces.push([k + nx, gy[k]]);
    if (k - nx >= 0) faces.push([k - nx, gy[k - nx]]);
    let diag = -lethal[k] * ir[k];
    for (const [j, g] of faces) {
      if (g === 0) continue;
      add(k, j, g * ir[j]);
      diag -= g * ir[k];
    }
    add(k, k, diag);
  }
  return { rows, cols, vals };
}

const l1 = (a: Float64Array | number[], b: Float64Array | number[]) => {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += Math.abs(a[k] - b[k]);
  return s * (CELL_M / 1000) ** 2;
};

const auto = problem().stepYears; // the map's automatic step
const steps = [2 * auto, auto, auto / 2, auto / 4];
const before = steps.map(ours);

const p0 = problem(auto);
const rtols = [1e-2, 1e-3, 1e-4, 1e-5, 1e-6, 1e-9];
const input = { n: N * N, ...operatorCoordinates(p0), rate: 0.8, hostKill: 0.3, u0: Array.from(p0.u0), h0: Array.from(p0.stockingAtCells), tEnd: T, rtols };
const py = spawnSync('python3', [fileURLToPath(new URL('./fv2d_reference.py', import.meta.url))], { input: JSON.stringify(input), maxBuffer: 1 << 30, encoding: 'utf8' });
if (py.status !== 0) {
  console.log(`SKIPPED: the scipy reference did not run (python3 with numpy and scipy is needed): ${py.stderr?.trim().split('\n').slice(-2).join(' ')}`);
  process.exit(0);
}
const sp = JSON.parse(py.stdout) as { rtol: number; seconds: number; status: number; nfev: number; nlu: number; u: number[] }[];
const after = steps.map(ours);
const ref = sp[sp.length - 1].u;

console.log(`${N}×${N} cells of ${CELL_M} m, ${T} yr, logistic pest with host loss (2 × ${N * N} unknowns); ${py.stderr.trim().split('\n').at(-1)}`);
console.log(`reference: scipy BDF rtol 1e-9 (${sp[sp.length - 1].seconds.toFixed(1)} s, ${sp[sp.length - 1].nlu} LU factorisations)`);
console.log('ours (step yr)   ms     L1 km²      | scipy rtol    ms      L1 km²     LU');
for (let i = 0; i < steps.length; i++) {
  const ms = Math.min(before[i].ms, after[i].ms);
  const e = l1(before[i].u, ref);
  const s = sp.slice(0, -1).map((x) => ({ ...x, e: l1(x.u, ref) })).filter((x) => x.e <= e && x.status === 0).sort((a, b) => a.seconds - b.seconds)[0];
  const ratio = s ? (1000 * s.seconds) / ms : NaN;
  console.log(
    `${steps[i].toFixed(5).padStart(10)} ${ms.toFixed(0).padStart(7)} ${e.toExponential(2).padStart(10)}  | ` +
      (s ? `${s.rtol.toExponential(0).padStart(8)} ${(1000 * s.seconds).toFixed(0).padStart(7)} ${s.e.toExponential(2).padStart(10)} ${String(s.nlu).padStart(5)}   ×${ratio.toFixed(1)} ${ratio >= 10 ? 'MET' : 'NOT MET'} (floor ≥ 10×)` : 'no scipy run this accurate'),
  );
}
for (const x of sp.slice(0, -1)) console.log(`   scipy rtol ${x.rtol.toExponential(0)}: ${(1000 * x.seconds).toFixed(0)} ms, L1 ${l1(x.u, ref).toExponential(2)} km², ${x.nfev} f, ${x.nlu} LU`);
const errs = before.map((b) => l1(b.u, ref));
console.log(`observed order in time (halving the step): ${errs.slice(1).map((e, i) => Math.log2(errs[i] / e).toFixed(2)).join(', ')} (second-order scheme)`);
console.log(`check: our finest step (${steps.at(-1)!.toFixed(5)} yr) is ${l1(before.at(-1)!.u, ref).toExponential(2)} km² from the reference (total infested ${(l1(ref, new Float64Array(N * N))).toFixed(1)} km²): the same equations`);
