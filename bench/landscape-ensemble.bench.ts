/**
 * Map ensemble bench: P(site reached within 30 years) per option on the bench map (bench/landscape-map.ts,
 * 30 × 20 km) at 200 m cells (150 × 100), 1000 Latin hypercube draws over the pest's movement, growth rate
 * and host-kill rate, through a pool of 2 worker threads (the task runner transect ensembles use). Floor
 * (issue): < 5 min on 2 cores. `BENCH_MAP_DRAWS=100` runs fewer draws (the wall time per draw is printed, so
 * a short run tells the full run's time to within its noise); `BENCH_MAP_STEP_FACTOR` overrides the draws' step
 * factor (default DRAW_STEP_FACTOR, landscape/ensemble.ts).
 */
import { runLandscapeEnsemble } from '../server/analysis/landscape/ensemble.ts';
import { makePoolRunner } from '../server/jobs/pool-runner.ts';
import type { Pest } from '../server/model/pest.ts';
import type { ProbabilityEstimate } from '../server/analysis/result.ts';
import { benchLandscape, BENCH_PEST } from './landscape-map.ts';

const draws = Number(process.env.BENCH_MAP_DRAWS ?? 1000);
const stepFactor = process.env.BENCH_MAP_STEP_FACTOR ? Number(process.env.BENCH_MAP_STEP_FACTOR) : undefined;
const pest = {
  ...BENCH_PEST,
  diffusionHost: { dist: 'lognormal', median: 0.3, spread: 1.6 },
  growth: { form: 'logistic', rate: { dist: 'uniform', min: 0.5, max: 1.1 } },
  hostKillRate: { dist: 'uniform', min: 0.1, max: 0.5 },
} as unknown as Pest;

const l = benchLandscape(100);
const pool = makePoolRunner({ threads: 2 });
const t0 = performance.now();
let last = 0;
const r = await runLandscapeEnsemble(l, pest, { horizonYears: 30, detectionLevel: 0.01 }, {
  draws,
  seed: 20261203,
  cellM: 200,
  stepFactor,
  onProgress: (done, total) => {
    if (performance.now() - last > 30_000) (last = performance.now()), console.log(`   ${done}/${total} draws after ${((last - t0) / 1000).toFixed(0)} s`);
  },
}, pool);
const wall = (performance.now() - t0) / 1000;
await pool.close();

const pct = (p: ProbabilityEstimate) => `${(100 * p.p).toFixed(1)} % ± ${(100 * p.standardError).toFixed(1)}`;
console.log(`${r.completed} draws at ${r.cellM} m, step ${r.stepFactor}× the transect rule, baseline + ${r.options.length} options, 30 yr, 2 worker threads: wall ${wall.toFixed(0)} s (${((1000 * wall) / r.completed).toFixed(0)} ms per draw; 1000 draws ≈ ${(wall * (1000 / r.completed)).toFixed(0)} s); floor < 300 s for 1000 draws: ${wall * (1000 / r.completed) < 300 ? 'MET' : 'NOT MET'}${r.completed < 1000 ? ' (extrapolated from this shorter run)' : ''}`);
console.log(`   without a band: ${r.baseline.sites.map((s) => `${s.name} ${pct(s.reached)}`).join('; ')}`);
for (const o of r.options) console.log(`   ${o.id}: ${o.sites.map((s) => `${s.name} ${pct(s.reached)}`).join('; ')}; way past ${JSON.stringify(o.wayPast)}`);
