/**
 * A single-option web evaluation of the clearing-holds demo, from submit (POST /api/evaluations) to verdict
 * (the job finished and its result stored), through the app as a user's browser reaches it (fastify inject,
 * the app's own worker threads). Target < 1.5 s. Side by side in this run: the same scenario with fixed steps
 * at the automatic step size (`numerics.stepYears`, the engine before adaptive steps) as the reference.
 * Each variant runs REPEATS times after one warm-up; the best time is reported (the machine is shared).
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildApp } from '../server/app.ts';
import { parseScenario, pointScenario } from '../server/model/scenario.ts';
import { chooseResolution } from '../server/problem/resolution.ts';
import { buildProblem, layoutOf } from '../server/problem/problem.ts';

const REPEATS = Number(process.env.BENCH_REPEATS ?? 3);
const demo = JSON.parse(readFileSync(fileURLToPath(new URL('../scenarios/clearing-holds.json', import.meta.url)), 'utf8'));
const single = { ...demo, title: `${demo.title} (one option)`, barrier: { ...demo.barrier, options: demo.barrier.options.slice(0, 1) } };
const point = pointScenario(parseScenario(single));
const autoStep = chooseResolution(buildProblem(point), layoutOf(buildProblem(point))).stepYears;
const fixed = { ...single, numerics: { ...(single.numerics ?? {}), stepYears: autoStep } };

const dataDir = mkdtempSync(join(tmpdir(), 'bench-web-'));
const app = await buildApp({ dataDir });
await app.ready();
async function once(scenario: unknown): Promise<{ ms: number; verdict: string }> {
  const t0 = performance.now();
  const r = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario } });
  if (r.statusCode !== 202) throw new Error(`POST answered ${r.statusCode}: ${r.body.slice(0, 300)}`);
  const id = r.json().id as string;
  for (;;) {
    const s = (await app.inject(`/api/evaluations/${id}`)).json();
    if (s.finished) {
      if (s.status !== 'done') throw new Error(`evaluation ${s.status}: ${s.message}`);
      const doc = (await app.inject(`/api/results/${s.resultId}`)).json().document;
      return { ms: performance.now() - t0, verdict: doc.options[0].verdict.kind };
    }
    await new Promise((res) => setTimeout(res, 20));
  }
}
try {
  const rows: { name: string; best: number; verdict: string }[] = [];
  for (const [name, sc] of [['adaptive (default)', single], [`fixed steps of ${autoStep} yr (reference)`, fixed]] as const) {
    await once(sc);
    let best = Infinity;
    let verdict = '';
    for (let k = 0; k < REPEATS; k++) {
      const r = await once(sc);
      best = Math.min(best, r.ms);
      verdict = r.verdict;
    }
    rows.push({ name, best, verdict });
  }
  console.log('single-option web evaluation of clearing-holds, submit to verdict (best of', REPEATS, 'after a warm-up):');
  for (const r of rows) console.log(`  ${r.name}: ${(r.best / 1000).toFixed(2)} s, verdict ${r.verdict}`);
  const ours = rows[0].best / 1000;
  console.log(`  target < 1.5 s: ${ours < 1.5 ? 'MET' : 'NOT MET'} (${ours.toFixed(2)} s; reference ${(rows[1].best / 1000).toFixed(2)} s, ×${(rows[1].best / rows[0].best).toFixed(1)})`);
} finally {
  await app.close();
  rmSync(dataDir, { recursive: true, force: true });
}
