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
import { chunkSize, ensembleChunks, type ChunkTask, type FinishTask, type PointOutcomeMessage, type PointTask } from './evaluation-tasks.ts';
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
  return scenario.uncertainty ? ensembleChunks(planEnsemble(scenario).draws).length : 0;
}

/**
 * Runs (or resumes) one evaluation on `runner`.
 * @throws CancelledError when the signal aborts before the document is complete
 */
export async function runEvaluation(scenario: Scenario, runner: TaskRunner, hooks: EvaluationHooks = {}): Promise<EvaluationOutcome> {
  const key = workKey(scenario);
  const { signal } = hooks;
  const share = singleRunShare(scenario);
  const progress = (f: number, stage: string) => {
    if (!signal?.aborted) hooks.onProgress?.(Math.min(0.999, Math.max(0, f)), stage);
  };

  let point = hooks.checkpoint?.point;
  if (point === undefined) {
    const [out] = await runner.map<PointTask, PointOutcomeMessage>('evaluation-point', [{ scenario }], {
      signal,
      key: `${key}:point`,
      onProgress: (_i, f, stage) => progress(share * f, stage),
    });
    if (out.kind === 'invalid') return out;
    if (out.kind === 'cancelled') throw new CancelledError();
    point = out.document;
    hooks.onPoint?.(point);
  }
  if (!scenario.uncertainty) return { kind: 'done', document: fromJsonSafe<ResultDocument>(point) };

  const plan = planEnsemble(scenario);
  const chunks = ensembleChunks(plan.draws);
  const size = chunkSize(plan.draws);
  const done = new Map<number, unknown>(hooks.checkpoint?.chunks ?? []);
  const partial = new Map<number, number>();
  const drawsDone = () => {
    let n = 0;
    for (const k of done.keys()) n += chunks[k].length;
    for (const [k, f] of partial) n += f * chunks[k].length;
    return n;
  };
  const report = () => {
    const n = drawsDone();
    progress(share + (1 - share) * (n / plan.draws), `ensemble: ${Math.floor(n)} of ${plan.draws} draws`);
  };
  report();
  const missing = chunks.map((_, k) => k).filter((k) => !done.has(k));
  const started = performance.now();
  if (missing.length) {
    await runner.map<ChunkTask, unknown>(
      'ensemble-chunk',
      missing.map((k) => ({ scenario, indices: chunks[k] })),
      {
        signal,
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
  }
  const draws: unknown[] = [];
  for (let k = 0; k < chunks.length; k++) draws.push(...(done.get(k) as unknown[]));
  progress(0.999, 'summarising the ensemble');
  const [doc] = await runner.map<FinishTask, unknown>(
    'evaluation-finish',
    [{ scenario, document: point, draws, threads: runner.concurrency, wallMs: performance.now() - started }],
    { signal, key: `${key}:finish` },
  );
  return { kind: 'done', document: fromJsonSafe<ResultDocument>(doc) };
}
