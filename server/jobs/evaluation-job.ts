/**
 * One evaluation as a sequence of tasks on any TaskRunner: the central-value analysis, then (with an
 * `uncertainty` block) the ensemble's chunks of draws, then the summary. Each finished piece is handed to
 * the caller (onPoint, onChunk) so it can be stored; given those stored pieces back (checkpoint), a run
 * resumes where it stopped. The numbers never depend on the runner or on how often the run was resumed:
 * draw i depends only on (scenario, seed, i), chunks follow a fixed rule of the draw count, and results
 * are assembled in draw order.
 *
 * Task keys are deterministic (tool version + scenario fingerprint + piece), so a distributed runner that
 * is handed the same piece twice (a retry, a restarted server) computes it once.
 */
import { planEnsemble } from '../analysis/ensemble/ensemble.ts';
import type { ResultDocument } from '../analysis/result.ts';
import { singleRunShare } from '../analysis/bypass/analyse-bypass.ts';
import { fingerprint } from '../model/canonical.ts';
import type { Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import { TOOL } from '../version.ts';
import { ensembleChunks, type ChunkTask, type FinishTask, type PointOutcomeMessage, type PointTask } from './evaluation-tasks.ts';
import { fromJsonSafe } from './json-safe.ts';
import { CancelledError, type TaskRunner } from './task-runner.ts';

export interface EvaluationCheckpoint {
  /** The central-value document (JSON-safe), once computed. */
  point?: unknown;
  /** Finished chunks by chunk index (JSON-safe draws). */
  chunks?: ReadonlyMap<number, unknown>;
}

export interface EvaluationHooks {
  signal?: AbortSignal;
  onProgress?: (fraction: number, stage: string) => void;
  /** The central-value document is known (store it to resume from it). */
  onPoint?: (document: unknown) => void;
  /** A chunk of draws finished (store it to resume from it). */
  onChunk?: (chunk: number, draws: unknown) => void;
  /** Pieces stored by an earlier, interrupted run of the same scenario. */
  checkpoint?: EvaluationCheckpoint;
}

export type EvaluationOutcome = { kind: 'done'; document: ResultDocument } | { kind: 'invalid'; code: string; problems: Problem[] };

/** The stable name of a scenario's work for a runner: tool version + fingerprint. */
export function workKey(scenario: Scenario): string {
  return `v${TOOL.version}:${fingerprint(scenario)}`;
}

/** Number of chunks the ensemble of a scenario is cut into (0 without an uncertainty block). */
export function chunkCount(scenario: Scenario): number {
  return scenario.uncertainty ? ensembleChunks(scenario).length : 0;
}

/** A stored chunk is taken back only when it holds exactly the draws the chunk rule gives now. */
function storedChunkFits(stored: unknown, indices: readonly number[]): boolean {
  const draws = fromJsonSafe<{ index?: unknown }[]>(stored);
  return Array.isArray(draws) && draws.length === indices.length && draws.every((d, j) => d?.index === indices[j]);
}

/**
 * Runs (or resumes) one evaluation on `runner`. The central-value analysis and the ensemble's chunks are
 * handed to the runner together (the draws do not depend on the central values), so on several workers the
 * central values are computed while the draws are; only the summary waits for both.
 * @throws CancelledError when the signal aborts before the document is complete
 */
export async function runEvaluation(scenario: Scenario, runner: TaskRunner, hooks: EvaluationHooks = {}): Promise<EvaluationOutcome> {
  const key = workKey(scenario);
  const { signal } = hooks;
  const share = singleRunShare(scenario);
  const progress = (f: number, stage: string) => {
    if (!signal?.aborted) hooks.onProgress?.(Math.min(0.999, Math.max(0, f)), stage);
  };

  // The ensemble's chunks (none without an uncertainty block), and which of them are stored already.
  const plan = scenario.uncertainty ? planEnsemble(scenario) : undefined;
  const chunks = plan ? ensembleChunks(scenario) : [];
  const size = chunks[0]?.length ?? 0;
  const done = new Map<number, unknown>();
  for (const [k, d] of hooks.checkpoint?.chunks ?? []) if (chunks[k] && storedChunkFits(d, chunks[k])) done.set(k, d);
  const partial = new Map<number, number>();
  let pointShare = hooks.checkpoint?.point === undefined ? 0 : 1;
  const report = (stage?: string) => {
    let n = 0;
    for (const k of done.keys()) n += chunks[k].length;
    for (const [k, f] of partial) n += f * chunks[k].length;
    const drawsShare = plan ? n / plan.draws : 1;
    progress(plan ? share * pointShare + (1 - share) * drawsShare : pointShare, stage ?? (plan ? `ensemble: ${Math.floor(n)} of ${plan.draws} draws` : 'central values'));
  };
  report();

  // Both stages share one abort: an invalid scenario (found by the central values) stops the draws.
  const inner = new AbortController();
  const forward = () => inner.abort(signal?.reason);
  if (signal?.aborted) throw new CancelledError();
  signal?.addEventListener('abort', forward, { once: true });
  const started = performance.now();
  let ensembleMs = 0;
  try {
    type PointStage = { invalid: EvaluationOutcome } | { document: unknown };
    const pointStage = async (): Promise<PointStage> => {
      if (hooks.checkpoint?.point !== undefined) return { document: hooks.checkpoint.point };
      const [out] = await runner.map<PointTask, PointOutcomeMessage>('evaluation-point', [{ scenario }], {
        signal: inner.signal,
        key: `${key}:point`,
        onProgress: (_i, f, stage) => {
          pointShare = f;
          report(plan ? undefined : stage);
        },
      });
      if (out.kind === 'invalid') return { invalid: out };
      if (out.kind === 'cancelled') throw new CancelledError();
      pointShare = 1;
      hooks.onPoint?.(out.document);
      report();
      return { document: out.document };
    };
    const missing = chunks.map((_, k) => k).filter((k) => !done.has(k));
    const ensembleStage = async () => {
      if (!missing.length) return;
      await runner.map<ChunkTask, unknown>(
        'ensemble-chunk',
        missing.map((k) => ({ scenario, indices: chunks[k] })),
        {
          signal: inner.signal,
          key: `${key}:ens${size}`,
          taskKeys: missing.map((k) => `${key}:ens${size}:${k}`),
          onProgress: (i, f) => {
            partial.set(missing[i], f);
            report();
          },
          onResult: (i, draws) => {
            partial.delete(missing[i]);
            done.set(missing[i], draws);
            hooks.onChunk?.(missing[i], draws);
            report();
          },
        },
      );
      ensembleMs = performance.now() - started;
    };
    // The central values ending without a document (invalid scenario, failure) stop the draws. A failed
    // draw does not stop the central values: their message (naming the field) is the better one to show.
    const stopOther = <T>(p: Promise<T>, stops: (v: T) => boolean = () => false) =>
      p.then(
        (v) => {
          if (stops(v)) inner.abort();
          return v;
        },
        (e) => {
          inner.abort();
          throw e;
        },
      );
    const [point, ensemble] = await Promise.allSettled([stopOther(pointStage(), (v) => 'invalid' in v), ensembleStage()]);
    if (signal?.aborted) throw new CancelledError();
    if (point.status === 'rejected') throw point.reason;
    if ('invalid' in point.value) return point.value.invalid;
    if (ensemble.status === 'rejected') throw ensemble.reason;
    const document = point.value.document;
    if (!plan) return { kind: 'done', document: fromJsonSafe<ResultDocument>(document) };

    const draws: unknown[] = [];
    for (let k = 0; k < chunks.length; k++) draws.push(...(done.get(k) as unknown[]));
    progress(0.999, 'summarising the ensemble');
    const capacity = runner.capacity?.() ?? { tasks: runner.concurrency, text: `this machine, ${runner.concurrency} thread${runner.concurrency === 1 ? '' : 's'}` };
    const [doc] = await runner.map<FinishTask, unknown>(
      'evaluation-finish',
      [{ scenario, document, draws, threads: capacity.tasks, ranOn: capacity.text, wallMs: ensembleMs }],
      { signal: inner.signal, key: `${key}:finish` },
    );
    return { kind: 'done', document: fromJsonSafe<ResultDocument>(doc) };
  } finally {
    signal?.removeEventListener('abort', forward);
  }
}
