/**
 * How an ensemble is cut into tasks, and how a chunk stops: the chunk rule depends on the scenario only
 * (every draw once, in order, at least MIN_CHUNKS chunks when there are that many draws, one draw per task
 * when a draw is estimated to take longer than a task should); a stored chunk that does not hold the draws
 * the rule gives now is computed again; a running chunk polls cancel between and inside its draws, so it
 * stops within about a second however many draws it holds.
 */
import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../server/model/scenario.ts';
import { chunkSize, ensembleChunks, estimatedDrawSeconds, MIN_CHUNKS, TARGET_TASK_SECONDS } from '../../server/jobs/evaluation-tasks.ts';
import { evaluateChunk } from '../../server/analysis/ensemble/chunks.ts';
import { CancelledError, type TaskContext } from '../../server/jobs/task-runner.ts';
import { makeInlineRunner } from '../../server/jobs/inline-runner.ts';
import { runEvaluation } from '../../server/jobs/evaluation-job.ts';
import { toJsonSafe } from '../../server/jobs/json-safe.ts';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { comparable } from './compare.ts';

const withDraws = (draws: number, over: object = {}) => parseScenario(smallEnsembleScenario({ uncertainty: { draws, seed: 2, criticalWidth: false }, ...over }));

describe('ensemble chunks', () => {
  it('cover every draw once, in order; small ensembles get at least MIN_CHUNKS chunks; the rule is the same on every call', () => {
    for (const draws of [2, 7, 32, 33, 100, 1000, 5000]) {
      const s = withDraws(draws);
      const chunks = ensembleChunks(s);
      expect(chunks.flat()).toEqual(Array.from({ length: draws }, (_, i) => i));
      if (draws >= MIN_CHUNKS) expect(chunks.length).toBeGreaterThanOrEqual(MIN_CHUNKS);
      expect(ensembleChunks(s)).toEqual(chunks);
    }
  });

  it('hold about TARGET_TASK_SECONDS of estimated work once the ensemble is large enough, and one draw when a draw is long', () => {
    // One option, no per-draw critical widths: ~0.08 s per draw estimated (measured 0.09 s on the development machine).
    const s = withDraws(20_000);
    const perDraw = estimatedDrawSeconds(s);
    expect(perDraw).toBeGreaterThan(0.02);
    expect(perDraw).toBeLessThan(0.5);
    const size = chunkSize(s);
    expect(size * perDraw).toBeGreaterThan(TARGET_TASK_SECONDS / 2);
    expect(size * perDraw).toBeLessThan(TARGET_TASK_SECONDS * 2);
    // A fine grid over a long horizon: a draw is estimated above a second, so each task is one draw.
    const heavy = withDraws(2_000, { numerics: { cellM: 2, stepYears: 0.01 }, horizonYears: 40 });
    expect(estimatedDrawSeconds(heavy)).toBeGreaterThan(TARGET_TASK_SECONDS);
    expect(chunkSize(heavy)).toBe(1);
  });

  it('a stored chunk that does not hold the draws of the current rule is computed again (same document)', async () => {
    const s = withDraws(6);
    const runner = makeInlineRunner();
    const plain = await runEvaluation(s, runner);
    const stored = new Map<number, unknown>();
    await runEvaluation(s, runner, { onChunk: (k, d) => stored.set(k, d) });
    // Chunk 0 stored with the draws of chunk 1 (as if cut by another rule): must not be taken.
    const wrong = new Map([[0, stored.get(1)]]);
    const resumed = await runEvaluation(s, runner, { checkpoint: { chunks: wrong } });
    expect(plain.kind === 'done' && resumed.kind === 'done').toBe(true);
    if (plain.kind === 'done' && resumed.kind === 'done') expect(comparable(resumed.document)).toBe(comparable(plain.document));
    expect(toJsonSafe(stored.get(0))).not.toEqual(toJsonSafe(stored.get(1)));
  });

  it('a running chunk polls cancel between draws: it stops after the draw under way and returns nothing', () => {
    const s = withDraws(50);
    let calls = 0;
    let cancelled = false;
    const ctx: TaskContext = {
      shouldCancel: () => cancelled,
      progress: () => {
        calls++;
        if (calls === 2) cancelled = true;
      },
    };
    expect(() => evaluateChunk({ scenario: s, indices: Array.from({ length: 50 }, (_, i) => i) }, ctx)).toThrow(CancelledError);
    expect(calls).toBe(2); // two draws finished, the third never started
  });

  it('a chunk of 200 draws (~20 s of work) cancelled after 0.3 s stops within about a second, by itself', () => {
    const s = withDraws(200);
    const t0 = Date.now();
    const ctx: TaskContext = { shouldCancel: () => Date.now() - t0 > 300, progress: () => {} };
    expect(() => evaluateChunk({ scenario: s, indices: Array.from({ length: 200 }, (_, i) => i) }, ctx)).toThrow(CancelledError);
    const took = Date.now() - t0;
    console.log(`chunk of 200 draws cancelled at 0.3 s: stopped after ${took} ms`);
    expect(took).toBeLessThan(1_300);
  });
});
