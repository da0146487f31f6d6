/**
 * Worker-thread entry (piscina): runs one evaluation with evaluateScenarioParallel (an ensemble goes to its
 * own pool of `ensembleThreads` threads, the same numbers as on one thread), posting progress through a
 * MessagePort and polling a shared cancel flag and the wall-time limit. Returns a plain outcome object;
 * errors never cross the thread boundary as exceptions, so the main thread always knows what happened.
 */
import type { MessagePort } from 'node:worker_threads';
import { evaluateScenarioParallel } from '../analysis/evaluate/evaluate.ts';
import { InputError, type Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';
import type { ResultDocument } from '../analysis/result.ts';

export interface EvaluateTask {
  scenario: Scenario;
  /** Progress messages: {type: 'started'} once, then {type: 'progress', fraction, stage}. */
  port: MessagePort;
  /** Int32Array view target; element 0 set to 1 asks the run to stop. */
  cancelBuffer: SharedArrayBuffer;
  /** Longest compute time [ms] counted from the start of this task. */
  wallMs: number;
  /** Worker threads for the draws of an ensemble. */
  ensembleThreads: number;
}

export type EvaluateOutcome =
  | { kind: 'done'; document: ResultDocument }
  | { kind: 'cancelled' }
  | { kind: 'timeout'; seconds: number }
  | { kind: 'invalid'; code: string; problems: Problem[] }
  | { kind: 'failed'; message: string };

/** Shortest interval between two progress messages [ms] (keeps the port quiet on fast runs). */
const PROGRESS_INTERVAL_MS = 150;

export default async function evaluateTask(task: EvaluateTask): Promise<EvaluateOutcome> {
  const flag = new Int32Array(task.cancelBuffer);
  const started = Date.now();
  const deadline = started + task.wallMs;
  let timedOut = false;
  const shouldCancel = () => {
    if (Atomics.load(flag, 0) !== 0) return true;
    if (Date.now() > deadline) timedOut = true;
    return timedOut;
  };
  let lastPost = 0;
  const onProgress = (fraction: number, stage: string) => {
    const now = Date.now();
    if (now - lastPost < PROGRESS_INTERVAL_MS && fraction < 1) return;
    lastPost = now;
    task.port.postMessage({ type: 'progress', fraction, stage });
  };
  task.port.postMessage({ type: 'started' });
  try {
    const document = await evaluateScenarioParallel(task.scenario, { onProgress, shouldCancel, threads: task.ensembleThreads });
    if (timedOut) return { kind: 'timeout', seconds: Number((task.wallMs / 1000).toFixed(1)) };
    if (Atomics.load(flag, 0) !== 0) return { kind: 'cancelled' };
    return { kind: 'done', document };
  } catch (e) {
    if (e instanceof InputError) return { kind: 'invalid', code: e.code, problems: e.problems };
    return { kind: 'failed', message: e instanceof Error ? e.message : String(e) };
  } finally {
    task.port.close();
  }
}
