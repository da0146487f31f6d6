/**
 * Landscape bench (engine part): the invented 30 × 20 km map (bench/landscape-map.ts), baseline + 3 band
 * options over 30 years, at 100 m (60 000 cells) and 50 m (240 000 cells) — wall time, the active share of
 * the map and peak memory; then memory of one run's arrays at 2 million cells. Floors (issue): 50 m < 30 s
 * and 100 m < 8 s on 2 cores; memory < 1 GB at 2 M cells. The evaluation here runs on ONE thread (the runs
 * of the options are independent and could go to a task runner; not done yet), so the wall time is compared
 * with the floors as measured. `BENCH_LANDSCAPE_CELLS=100` runs only the 100 m case.
 */
import { evaluateLandscape } from '../server/analysis/landscape/evaluate.ts';
import { landscapeProblem, problemStepper, type PointPest } from '../server/analysis/landscape/problem.ts';
import { benchLandscape, BENCH_PEST } from './landscape-map.ts';

const pest = BENCH_PEST as unknown as PointPest;
const cells = (process.env.BENCH_LANDSCAPE_CELLS ?? '100,50').split(',').map(Number);

for (const cellM of cells) {
  const l = benchLandscape(cellM);
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = evaluateLandscape(l, pest, { horizonYears: 30, crossSection: false });
  const wall = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(c0);
  const steps = r.baseline.numerics.steps;
  const active = [r.baseline, ...r.options.map((o) => o.run)].map((x) => x.numerics.activeCellsMax / x.numerics.mapCells);
  const cellSteps = [r.baseline, ...r.options.map((o) => o.run)].reduce((s, x) => s + x.numerics.activeCellsMax * x.numerics.steps, 0);
  console.log(
    `${cellM} m (${l.nx}×${l.ny} = ${l.nx * l.ny} cells), baseline + ${r.options.length} options, 30 yr, ${steps} steps of ${r.baseline.numerics.stepYears} yr: ` +
      `wall ${wall.toFixed(1)} s, CPU ${((cpu.user + cpu.system) / 1e6).toFixed(1)} s (one thread); largest active share ${active.map((a) => (100 * a).toFixed(0) + ' %').join(', ')}; ` +
      `≤ ${(cellSteps / 1e6).toFixed(0)} M cell-steps; floor ${cellM === 50 ? '30' : cellM === 100 ? '8' : '–'} s`,
  );
  for (const o of r.options) console.log(`   ${o.label}: ${o.verdict.kind}, way past ${o.wayPast}; ${o.sites.map((s) => `${s.name} ${s.baselineArrivalYears?.toFixed(1) ?? '–'} → ${s.optionArrivalYears?.toFixed(1) ?? '–'}`).join('; ')}`);
  console.log(`   peak RSS so far ${(process.memoryUsage().rss / 2 ** 20).toFixed(0)} MB`);
}

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
