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
  const { signal } = hooks;
  const run = startRun(scenario, runner, hooks);
  run.report();

  // Both stages share one abort: an invalid scenario (found by the central values) stops the draws.
  const forward = () => run.inner.abort(signal?.reason);
  if (signal?.aborted) throw new CancelledError();
  signal?.addEventListener('abort', forward, { once: true });
  const started = performance.now();
  try {
    // The central values ending without a document (invalid scenario, failure) stop the draws. A failed
    // draw does not stop the central values: their message (naming the field) is the better one to show.
    const [point, ensemble] = await Promise.allSettled([stopOther(run.inner, pointStage(run), (v) => 'invalid' in v), ensembleStage(run, started)]);
    if (signal?.aborted) throw new CancelledError();
    if (point.status === 'rejected') throw point.reason;
    if ('invalid' in point.value) return point.value.invalid;
    if (ensemble.status === 'rejected') throw ensemble.reason;
    const document = point.value.document;
    if (!run.plan) return { kind: 'done', document: fromJsonSafe<ResultDocument>(document) };
    return await summarise(run, document, ensemble.value);
  } finally {
    signal?.removeEventListener('abort', forward);
  }
}

/** One evaluation under way: its pieces, what is done of them, and its progress report. */
interface Run {
  scenario: Scenario;
  runner: TaskRunner;
  hooks: EvaluationHooks;
  key: string;
  plan: ReturnType<typeof planEnsemble> | undefined;
  /** The ensemble's chunks of draw indices (none without an uncertainty block). */
  chunks: number[][];
  /** Finished chunks by index (stored ones taken back, then those finished now). */
  done: Map<number, unknown>;
  /** Share done of each chunk under way. */
  partial: Map<number, number>;
  /** Share done of the central values. */
  pointShare: number;
  inner: AbortController;
  /** Reports the share done to the caller (with the stage, or the draws done when not given). */
  report(stage?: string): void;
  progress(f: number, stage: string): void;
}

function startRun(scenario: Scenario, runner: TaskRunner, hooks: EvaluationHooks): Run {
  const { signal } = hooks;
  const share = singleRunShare(scenario);
  // The ensemble's chunks (none without an uncertainty block), and which of them are stored already.
  const plan = scenario.uncertainty ? planEnsemble(scenario) : undefined;
  const chunks = plan ? ensembleChunks(scenario) : [];
  const done = new Map<number, unknown>();
  for (const [k, d] of hooks.checkpoint?.chunks ?? []) if (chunks[k] && storedChunkFits(d, chunks[k])) done.set(k, d);
  const run: Run = {
    scenario,
    runner,
    hooks,
    key: workKey(scenario),
    plan,
    chunks,
    done,
    partial: new Map(),
    pointShare: hooks.checkpoint?.point === undefined ? 0 : 1,
    inner: new AbortController(),
    progress(f, stage) {
      if (!signal?.aborted) hooks.onProgress?.(Math.min(0.999, Math.max(0, f)), stage);
    },
    report(stage) {
      let n = 0;
      for (const k of done.keys()) n += chunks[k].length;
      for (const [k, f] of run.partial) n += f * chunks[k].length;
      const drawsShare = plan ? n / plan.draws : 1;
      run.progress(plan ? share * run.pointShare + (1 - share) * drawsShare : run.pointShare, stage ?? (plan ? `ensemble: ${Math.floor(n)} of ${plan.draws} draws` : 'central values'));
    },
  };
  return run;
}

type PointStage = { invalid: EvaluationOutcome } | { document: unknown };

/** The central values: taken back from the checkpoint, or computed (one task). */
async function pointStage(run: Run): Promise<PointStage> {
  const { hooks } = run;
  if (hooks.checkpoint?.point !== undefined) return { document: hooks.checkpoint.point };
  const [out] = await run.runner.map<PointTask, PointOutcomeMessage>('evaluation-point', [{ scenario: run.scenario }], {
    signal: run.inner.signal,
    key: `${run.key}:point`,
    onProgress: (_i, f, stage) => {
      run.pointShare = f;
      run.report(run.plan ? undefined : stage);
    },
  });
  if (out.kind === 'invalid') return { invalid: out };
  if (out.kind === 'cancelled') throw new CancelledError();
  run.pointShare = 1;
  hooks.onPoint?.(out.document);
  run.report();
  return { document: out.document };
}

/** The ensemble's chunks not stored yet, one task each; resolves with the time from `started` [ms] (0 when none ran). */
async function ensembleStage(run: Run, started: number): Promise<number> {
  const { chunks, done, partial, key } = run;
  const size = chunks[0]?.length ?? 0;
  const missing = chunks.map((_, k) => k).filter((k) => !done.has(k));
  if (!missing.length) return 0;
  await run.runner.map<ChunkTask, unknown>(
    'ensemble-chunk',
    missing.map((k) => ({ scenario: run.scenario, indices: chunks[k] })),
    {
      signal: run.inner.signal,
      key: `${key}:ens${size}`,
      taskKeys: missing.map((k) => `${key}:ens${size}:${k}`),
      onProgress: (i, f) => {
        partial.set(missing[i], f);
        run.report();
      },
      onResult: (i, draws) => {
        partial.delete(missing[i]);
        done.set(missing[i], draws);
        run.hooks.onChunk?.(missing[i], draws);
        run.report();
      },
    },
  );
  return performance.now() - started;
}

/** `p`, aborting `inner` when it fails or when `stops` says its value ends the run. */
function stopOther<T>(inner: AbortController, p: Promise<T>, stops: (v: T) => boolean = () => false): Promise<T> {
  return p.then(
    (v) => {
      if (stops(v)) inner.abort();
      return v;
    },
    (e) => {
      inner.abort();
      throw e;
    },
  );
}

/** The ensemble summary over every draw in draw order (one task). */
async function summarise(run: Run, document: unknown, ensembleMs: number): Promise<EvaluationOutcome> {
  const { runner, chunks, done } = run;
  const draws: unknown[] = [];
  for (let k = 0; k < chunks.length; k++) draws.push(...(done.get(k) as unknown[]));
  run.progress(0.999, 'summarising the ensemble');
  const capacity = runner.capacity?.() ?? { tasks: runner.concurrency, text: `this machine, ${runner.concurrency} thread${runner.concurrency === 1 ? '' : 's'}` };
  const [doc] = await runner.map<FinishTask, unknown>(
    'evaluation-finish',
    [{ scenario: run.scenario, document, draws, threads: capacity.tasks, ranOn: capacity.text, wallMs: ensembleMs }],
    { signal: run.inner.signal, key: `${run.key}:finish` },
  );
  return { kind: 'done', document: fromJsonSafe<ResultDocument>(doc) };
}
