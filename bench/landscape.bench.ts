/**
 * Landscape bench (engine part): the invented 30 × 20 km map (bench/landscape-map.ts), baseline + 3 band
 * options over 30 years, at 100 m (60 000 cells) and 50 m (240 000 cells) — wall time, the active share of
 * the map and peak memory; then memory of one run's arrays at 2 million cells. Floors (issue): 50 m < 30 s
 * and 100 m < 8 s on 2 cores; memory < 1 GB at 2 M cells. Each size runs twice in the same process: on one
 * thread (evaluateLandscape) and with the runs handed to a pool of 2 worker threads (evaluateLandscapeOn, as
 * the CLI and the web app run them); the floors are judged on the pool run, and the two must agree bit for
 * bit. `BENCH_LANDSCAPE_CELLS=100` runs only the 100 m case.
 */
import { evaluateLandscape, evaluateLandscapeOn } from '../server/analysis/landscape/evaluate.ts';
import { landscapeProblem, problemStepper, type PointPest } from '../server/analysis/landscape/problem.ts';
import type { LandscapeResult } from '../server/analysis/landscape/result.ts';
import { makePoolRunner } from '../server/jobs/pool-runner.ts';
import { benchLandscape, BENCH_PEST } from './landscape-map.ts';

const pest = BENCH_PEST as unknown as PointPest;
const cells = (process.env.BENCH_LANDSCAPE_CELLS ?? '100,50').split(',').map(Number);
const pool = makePoolRunner({ threads: 2 });

/** Every arrival year of every run, for the bit-for-bit comparison. */
const arrivals = (r: LandscapeResult) => [r.baseline, ...r.options.map((o) => o.run)].map((x) => Array.from(x.arrival.years, (v) => (Number.isNaN(v) ? -1 : v)));

for (const cellM of cells) {
  const l = benchLandscape(cellM);
  const settings = { horizonYears: 30, crossSection: false };
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = evaluateLandscape(l, pest, settings);
  const wall1 = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(c0);
  const t1 = performance.now();
  const r2 = await evaluateLandscapeOn(pool, l, pest, settings);
  const wall2 = (performance.now() - t1) / 1000;
  const same = JSON.stringify(arrivals(r)) === JSON.stringify(arrivals(r2)) && JSON.stringify(r.options.map((o) => o.verdict)) === JSON.stringify(r2.options.map((o) => o.verdict));
  const steps = r.baseline.numerics.steps;
  const active = [r.baseline, ...r.options.map((o) => o.run)].map((x) => x.numerics.activeCellsMax / x.numerics.mapCells);
  const cellSteps = [r.baseline, ...r.options.map((o) => o.run)].reduce((s, x) => s + x.numerics.activeCellsMax * x.numerics.steps, 0);
  const floor = cellM === 50 ? 30 : cellM === 100 ? 8 : NaN;
  console.log(
    `${cellM} m (${l.nx}×${l.ny} = ${l.nx * l.ny} cells), baseline + ${r.options.length} options, 30 yr, ${steps} steps of ${r.baseline.numerics.stepYears} yr; ` +
      `largest active share ${active.map((a) => (100 * a).toFixed(0) + ' %').join(', ')}; ≤ ${(cellSteps / 1e6).toFixed(0)} M cell-steps (${((wall1 * 1e9) / cellSteps).toFixed(0)} ns each on one thread)`,
  );
  console.log(`   one thread: wall ${wall1.toFixed(1)} s (CPU ${((cpu.user + cpu.system) / 1e6).toFixed(1)} s); 2 worker threads: wall ${wall2.toFixed(1)} s (×${(wall1 / wall2).toFixed(2)}); results identical: ${same ? 'yes' : 'NO'}`);
  if (Number.isFinite(floor)) console.log(`   floor < ${floor} s on 2 cores: ${wall2.toFixed(1)} s ${wall2 < floor ? 'MET' : 'NOT MET'}`);
  for (const o of r2.options) console.log(`   ${o.label}: ${o.verdict.kind}, way past ${o.wayPast}; ${o.sites.map((s) => `${s.name} ${s.baselineArrivalYears?.toFixed(1) ?? '–'} → ${s.optionArrivalYears?.toFixed(1) ?? '–'}`).join('; ')}`);
  console.log(`   peak RSS so far ${(process.memoryUsage().rss / 2 ** 20).toFixed(0)} MB (this process; each worker thread holds its own run)`);
}
await pool.close();

// Memory at 2 million cells: the map, one run's problem and stepper, and ten steps.
{
  const l = benchLandscape(17.4); // 1724 × 1149 ≈ 1.98 M cells
  const before = process.memoryUsage().rss;
  const p = landscapeProblem(l, pest, { mapEdges: 'reflecting', infestedDensity: 1, horizonYears: 30 });
  const stepper = problemStepper(p);
  const u = Float64Array.from(p.u0);
  const h = Float64Array.from(p.stockingAtCells);
  for (let i = 0; i < 10; i++) stepper.step(u, h, p.stepYears);
  const rss = process.memoryUsage().rss;
  console.log(`2 M cells (${l.nx}×${l.ny} = ${l.nx * l.ny}): RSS ${(rss / 2 ** 20).toFixed(0)} MB (run arrays ${((rss - before) / 2 ** 20).toFixed(0)} MB); floor 1024 MB`);
}
