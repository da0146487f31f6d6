/**
 * Bench (c): a 1000-draw ensemble on the worker pool (all cores) for the "clearing holds" demo scenario
 * with ranges on five pest parameters. Floor: < 60 s on the 2-core machine, including each draw's critical
 * width for one option once the barrier analysis provides it per draw. `BENCH_DRAWS=N` changes the draws.
 */
import { readFileSync } from 'node:fs';
import { parseScenario } from '../server/model/scenario.ts';
import { runEnsembleParallel, defaultThreads } from '../server/analysis/ensemble-pool.ts';

const draws = Number(process.env.BENCH_DRAWS ?? 1000);
const raw = JSON.parse(readFileSync(new URL('../scenarios/clearing-holds.json', import.meta.url), 'utf8'));
raw.pest.diffusionOpen = { dist: 'lognormal', median: 1, spread: 1.5 };
raw.pest.edgePreferenceOpen = { dist: 'uniform', min: 0.65, max: 0.9 };
raw.pest.growth.alleeThreshold = { dist: 'triangular', min: 0.1, mode: 0.2, max: 0.3 };
raw.pest.mortalityOpen = { dist: 'uniform', min: 2, max: 8 };
raw.pest.diffusionHost = { dist: 'triangular', min: 0.7, mode: 1, max: 1.3 };
raw.barrier.options = [raw.barrier.options[0]];
raw.uncertainty = { draws, seed: 1 };
const scenario = parseScenario(raw);
const t0 = performance.now();
let last = 0;
const r = await runEnsembleParallel(scenario, {
  onProgress: (f) => {
    if (f - last >= 0.1 || f === 1) {
      last = f;
      process.stderr.write(`  ${Math.round(f * 100)} % after ${((performance.now() - t0) / 1000).toFixed(1)} s\n`);
    }
  },
});
const s = (performance.now() - t0) / 1000;
const o = r.options[0];
console.log(`(c) ${r.completed}-draw ensemble, ${r.threads} threads: ${s.toFixed(1)} s (${((1000 * s) / r.completed).toFixed(0)} ms per draw wall)`);
console.log(`    P(holds within horizon) ${o.holdsWithinHorizon.p.toFixed(3)} ± ${o.holdsWithinHorizon.standardError.toFixed(3)}; critical width per draw: ${o.criticalWidth.computed ? 'included' : 'NOT included (' + o.criticalWidth.note + ')'}`);
console.log(`    floor < 60 s for 1000 draws: ${r.completed === 1000 && s < 60 ? 'MET' : r.completed === 1000 ? 'NOT MET' : `extrapolated ${((s * 1000) / r.completed).toFixed(0)} s`}; threads available ${defaultThreads()}`);
