/**
 * The one evaluate orchestrator: an ensemble's draws go to the task runner as 'ensemble-chunk' tasks, and
 * the document is the same whatever runner computes them (inline, a spy runner with odd chunk order, the
 * synchronous path) — wall times and thread counts apart.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../../server/model/scenario.ts';
import { evaluate, evaluateScenario } from '../../../server/analysis/evaluate/evaluate.ts';
import { makeInlineRunner } from '../../../server/jobs/inline-runner.ts';
import { taskHandler } from '../../../server/jobs/tasks.ts';
import type { MapOptions, TaskRunner } from '../../../server/jobs/task-runner.ts';
import { ENSEMBLE_CHUNK, chunkSize } from '../../../server/analysis/ensemble/chunks.ts';
import { stripVolatile } from '../../golden/golden.ts';
import { smallEnsembleScenario } from '../ensemble-fixture.ts';

/** A runner that records what it is asked and finishes the tasks in reverse order (results must still come back in payload order). */
function reversingRunner(): TaskRunner & { calls: { kind: string; n: number }[] } {
  const calls: { kind: string; n: number }[] = [];
  return {
    calls,
    where: 'test, reversed order',
    concurrency: 3,
    async map<P, R>(kind: string, payloads: readonly P[], opts: MapOptions<R> = {}): Promise<R[]> {
      calls.push({ kind, n: payloads.length });
      const h = taskHandler(kind);
      const out: R[] = new Array(payloads.length);
      for (let i = payloads.length - 1; i >= 0; i--) {
        out[i] = (await h(payloads[i])) as R;
        opts.onResult?.(i, out[i]);
      }
      return out;
    },
    async close() {},
  };
}

describe('evaluate with a task runner', () => {
  const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 12, seed: 4, criticalWidth: false } }));
  const fixed = { now: () => new Date('2026-01-01T00:00:00Z') };
  it('hands the draws out as ensemble-chunk tasks and gives the synchronous document', async () => {
    const reference = stripVolatile(evaluateScenario(s, fixed));
    const spy = reversingRunner();
    const viaSpy = stripVolatile(await evaluate(s, { ...fixed, runner: spy }));
    expect(spy.calls).toEqual([{ kind: ENSEMBLE_CHUNK, n: Math.ceil(12 / chunkSize(12, 3)) }]);
    expect(viaSpy).toEqual(reference);
    expect(stripVolatile(await evaluate(s, { ...fixed, runner: makeInlineRunner() }))).toEqual(reference);
  });
  it('a cancel keeps the draws finished before it, in draw order', async () => {
    let seen = 0;
    const doc = await evaluate(s, { ...fixed, runner: makeInlineRunner(), onProgress: (_, stage) => void (stage.startsWith('ensemble') && seen++), shouldCancel: () => seen >= 3 });
    expect(doc.uncertainty!.status).toBe('cancelled');
    expect(doc.uncertainty!.completed).toBe(3);
  });
});
