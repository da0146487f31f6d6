/**
 * The local pool runner: payload order, progress, failures named, cancel within about a second even when a
 * task ignores it, and the same ensemble document as the inline runner and the single-thread evaluation.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { makePoolRunner } from '../../server/jobs/pool-runner.ts';
import { makeInlineRunner } from '../../server/jobs/inline-runner.ts';
import { CancelledError } from '../../server/jobs/task-runner.ts';
import { runEvaluation } from '../../server/jobs/evaluation-job.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { comparable } from './compare.ts';
import '../../server/jobs/task-modules.ts';
import type { ProbeResult } from '../../server/jobs/probe-task.ts';

const pool = makePoolRunner({ threads: 2 });
afterAll(() => pool.close());

describe('pool runner', () => {
  it('returns results in payload order, reports each result and progress', async () => {
    const seen: number[] = [];
    const progressed = new Set<number>();
    const out = await pool.map<{ spinMs: number; value: number }, ProbeResult>(
      'runner-probe',
      [{ spinMs: 400, value: 1 }, { spinMs: 10, value: 2 }, { spinMs: 200, value: 3 }],
      { onResult: (i) => seen.push(i), onProgress: (i) => progressed.add(i) },
    );
    expect(out.map((r) => r.value)).toEqual([1, 2, 3]);
    expect(out.every((r) => r.pid === process.pid)).toBe(true);
    expect([...seen].sort()).toEqual([0, 1, 2]);
    expect(progressed.has(0)).toBe(true);
    expect(pool.where).toBe('this machine, 2 worker threads');
    expect(pool.concurrency).toBe(2);
  });

  it('runs the sources in its threads as ES modules, as on the main thread (a CommonJS compile ran draws 1.4 times slower)', async () => {
    const [r] = await pool.map<object, ProbeResult>('runner-probe', [{ value: 1 }]);
    expect(r.moduleFormat).toBe('module');
  });

  it('names a failing task and an unknown kind', async () => {
    await expect(pool.map('runner-probe', [{ fail: 'bad chunk 7' }])).rejects.toThrow('bad chunk 7');
    await expect(pool.map('no-such-kind', [1])).rejects.toThrow(/no-such-kind/);
  });

  it('cancel stops the batch within about a second, even a task that never polls (its thread is stopped)', async () => {
    const ac = new AbortController();
    const t0 = Date.now();
    const run = pool.map('runner-probe', [{ spinMs: 20_000, ignoreCancel: true }, { spinMs: 20_000 }, { spinMs: 20_000 }], { signal: ac.signal });
    setTimeout(() => ac.abort(), 300);
    await expect(run).rejects.toBeInstanceOf(CancelledError);
    expect(Date.now() - t0).toBeLessThan(1_500);
    // The pool still works after a thread was stopped.
    expect((await pool.map<object, ProbeResult>('runner-probe', [{ value: 4 }]))[0].value).toBe(4);
  });
});

describe('evaluation on any runner', () => {
  it('a 20-draw ensemble gives the same document on one thread, inline tasks and the 2-thread pool (chunks resumed too)', async () => {
    const scenario = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 20, seed: 5, criticalWidth: false } }));
    const single = evaluateScenario(scenario, { now: () => new Date(0) });
    const inline = await runEvaluation(scenario, makeInlineRunner());
    const stored = new Map<number, unknown>();
    let point: unknown;
    const pooled = await runEvaluation(scenario, pool, { onChunk: (k, d) => stored.set(k, d), onPoint: (d) => (point = d) });
    expect(inline.kind).toBe('done');
    expect(pooled.kind).toBe('done');
    if (inline.kind !== 'done' || pooled.kind !== 'done') return;
    expect(single.uncertainty?.completed).toBe(20);
    expect(comparable(inline.document)).toBe(comparable(single));
    expect(comparable(pooled.document)).toBe(comparable(single));
    // Resumed from half the chunks (as after a restart): the same document.
    const half = new Map([...stored].filter(([k]) => k % 2 === 0));
    const resumed = await runEvaluation(scenario, pool, { checkpoint: { point, chunks: half } });
    expect(resumed.kind === 'done' && comparable(resumed.document)).toBe(comparable(single));
  });
});
