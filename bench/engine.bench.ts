/**
 * Bench (a): one evaluation (baseline + one option) on a 100 km transect at 25 m over 30 years —
 * wall time and cell-updates per second (cells × steps per second of wall time). Best of 3.
 * Bench (b) lives in scipy-reference.bench.ts.
 */
import { parseScenario, pointScenario } from '../server/model/scenario.ts';
import { runLayout } from '../server/analysis/run/simulate.ts';
import { buildLayout } from '../server/problem/layout.ts';
import { evaluateScenario } from '../server/analysis/evaluate/evaluate.ts';
import { transect100km } from './problems.ts';

const scenario = parseScenario(transect100km());
const s = pointScenario(scenario);

let best = Infinity;
let cellSteps = 0;
let detail = '';
for (let rep = 0; rep < 3; rep++) {
  const t0 = performance.now();
  const base = runLayout({ scenario: s, pieces: buildLayout(s), record: false });
  const opt = runLayout({ scenario: s, pieces: buildLayout(s, s.barrier!.options[0]), record: false });
  const ms = performance.now() - t0;
  if (ms < best) {
    best = ms;
    cellSteps = base.problem.grid.nCells * base.solver.info.steps + opt.problem.grid.nCells * opt.solver.info.steps;
    detail =
      `baseline ${base.problem.grid.nCells} cells × ${base.solver.info.steps} steps (dt ${base.problem.resolution.stepYears} yr), ` +
      `option ${opt.problem.grid.nCells} cells × ${opt.solver.info.steps} steps (dt ${opt.problem.resolution.stepYears} yr)`;
  }
}
console.log(`(a) engine runs, baseline + option, 100 km at 25 m, 30 yr: ${best.toFixed(0)} ms (best of 3)`);
console.log(`    ${detail}`);
console.log(`    ${(cellSteps / 1e6).toFixed(1)} M cell-updates, ${((cellSteps / best) * 1e3 / 1e6).toFixed(1)} M cell-updates/s`);

const t1 = performance.now();
const doc = evaluateScenario(scenario);
const evalMs = performance.now() - t1;
console.log(`    full evaluateScenario (everything the result document needs for this scenario): ${evalMs.toFixed(0)} ms`);
console.log(`    option verdict: ${doc.options[0]?.verdict?.kind ?? '(barrier analysis not on this branch)'}`);
