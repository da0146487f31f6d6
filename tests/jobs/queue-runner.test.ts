/**
 * The distributed runner on BullMQ + Redis, with real queue worker processes (`npm run worker`'s entry):
 * the same ensemble document as the local pool with 2 workers; a worker killed mid-task (SIGKILL) has its
 * task retried by another (stalled-job detection) with the same final document; cancel removes waiting
 * tasks and stops running ones; a worker of another tool version refuses the task with both versions
 * named; a Redis restart is reported ("queue unavailable, retrying") and survived without losing work.
 * Skipped with a printed message where redis-server is not installed.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { Queue } from 'bullmq';
import { makeQueueRunner, type QueueRunner } from '../../server/jobs/queue-runner.ts';
import { makePoolRunner } from '../../server/jobs/pool-runner.ts';
import { redisConnection } from '../../server/jobs/queue-config.ts';
import { CancelledError } from '../../server/jobs/task-runner.ts';
import { runEvaluation } from '../../server/jobs/evaluation-job.ts';
import type { ProbeResult } from '../../server/jobs/probe-task.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { TOOL } from '../../server/version.ts';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { hasRedisServer, skipMessage, startQueueWorker, startRedis, testRedis, type WorkerProcess } from '../helpers/redis.ts';
import { comparable } from './compare.ts';

if (!hasRedisServer) console.log(skipMessage('tests/jobs/queue-runner.test.ts (queue runner and workers)'));

const scenario = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 12, seed: 11, criticalWidth: false } }));

/** Runs with its own queue name, so tests never see each other's jobs. */
function isolated() {
  const queue = `test-${randomUUID().slice(0, 8)}`;
  process.env.QUEUE_NAME = queue;
  return { QUEUE_NAME: queue };
}

describe.skipIf(!hasRedisServer)('queue runner with worker processes', () => {
  let redis: { url: string; stop(): Promise<void> };
  let localDoc: string;
  const workers: WorkerProcess[] = [];
  const runners: QueueRunner[] = [];
  const worker = async (env: Record<string, string>) => {
    const w = await startQueueWorker({ REDIS_URL: redis.url, ...env });
    workers.push(w);
    return w;
  };
  const runner = async () => {
    const r = await makeQueueRunner({ url: redis.url, reconcileMs: 500 });
    runners.push(r);
    return r;
  };

  beforeAll(async () => {
    redis = await testRedis();
    const pool = makePoolRunner({ threads: 2 });
    const local = await runEvaluation(scenario, pool);
    await pool.close();
    if (local.kind !== 'done') throw new Error('local run failed');
    localDoc = comparable(local.document);
  });
  afterAll(async () => {
    await Promise.allSettled(runners.map((r) => r.close()));
    await Promise.allSettled(workers.map((w) => w.kill()));
    await redis?.stop();
  });

  it('two queue workers share the tasks and give the same ensemble document as the local pool, bit for bit', async () => {
    const env = isolated();
    const [a, b] = await Promise.all([worker(env), worker(env)]);
    const r = await runner();
    const probes = await r.map<object, ProbeResult>('runner-probe', Array.from({ length: 8 }, (_, i) => ({ spinMs: 150, value: i })));
    expect(probes.map((p) => p.value)).toEqual([0, 1, 2, 3, 4, 5, 6, 7]);
    expect(new Set(probes.map((p) => p.pid))).toEqual(new Set([a.pid, b.pid]));
    const out = await runEvaluation(scenario, r);
    expect(out.kind).toBe('done');
    if (out.kind === 'done') expect(comparable(out.document)).toBe(localDoc);
    expect(r.workers()).toBe(2);
    expect(r.where).toMatch(/^2 queue workers/);
    await Promise.all([a.kill(), b.kill()]);
  });

  it('a worker killed in the middle of a task: another worker takes it over (stalled job) and the result is complete', async () => {
    const env = isolated();
    const a = await worker(env);
    const r = await runner();
    let progressed!: () => void;
    const running = new Promise<void>((res) => (progressed = res));
    const result = r.map<object, ProbeResult>('runner-probe', [{ spinMs: 2_500, value: 42 }], { onProgress: () => progressed() });
    await running; // worker A is computing it
    await a.kill();
    const b = await worker(env);
    const [out] = await result;
    expect(out).toEqual({ value: 42, pid: b.pid, moduleFormat: 'module' });
    // The same for an ensemble: kill one of two workers half-way; the document is still the local one.
    const c = await worker(env);
    let chunks = 0;
    let killed: Promise<void> | undefined;
    const ens = runEvaluation(scenario, r, {
      onChunk: () => {
        if (++chunks === 4) killed = c.kill();
      },
    });
    const doc = await ens;
    await killed;
    expect(doc.kind === 'done' && comparable(doc.document)).toBe(localDoc);
    await b.kill();
  });

  it('cancel removes waiting tasks and stops the running one within about a second', async () => {
    const env = isolated();
    const a = await worker(env);
    const r = await runner();
    const ac = new AbortController();
    let started!: () => void;
    const running = new Promise<void>((res) => (started = res));
    const t = r.map('runner-probe', [{ spinMs: 30_000 }, { spinMs: 30_000 }, { spinMs: 30_000 }], { signal: ac.signal, onProgress: () => started() });
    await running;
    const t0 = Date.now();
    ac.abort();
    await expect(t).rejects.toBeInstanceOf(CancelledError);
    // The worker is free again: a new task is answered at once (the 30 s one was stopped, the others removed).
    const [next] = await r.map<object, ProbeResult>('runner-probe', [{ value: 7 }]);
    expect(next.value).toBe(7);
    expect(Date.now() - t0).toBeLessThan(3_000);
    const q = new Queue(env.QUEUE_NAME, { connection: redisConnection(redis.url, 'test-inspect') });
    expect(await q.getWaitingCount()).toBe(0);
    await q.close();
    await a.kill();
  });

  it('two evaluations of the same scenario at once share its task ids: both finish with the local numbers, also when one is cancelled half-way', async () => {
    const env = isolated();
    const a = await worker(env);
    const r = await runner();
    const logged: string[] = [];
    const [one, two] = await Promise.all([runEvaluation(scenario, r), runEvaluation(scenario, r)]);
    for (const out of [one, two]) expect(out.kind === 'done' && comparable(out.document)).toBe(localDoc);
    // Again, the first cancelled after its third chunk: the cancel must not stop the pieces the second waits for.
    const ac = new AbortController();
    let chunks = 0;
    const first = runEvaluation(scenario, r, { signal: ac.signal, onChunk: () => ++chunks === 3 && ac.abort() });
    const second = runEvaluation(scenario, r, { onProgress: (_f, stage) => logged.push(stage) });
    await expect(first).rejects.toBeInstanceOf(CancelledError);
    const out = await second;
    expect(out.kind === 'done' && comparable(out.document)).toBe(localDoc);
    await a.kill();
  });

  it('a task cancelled for one batch while another batch waits for it is added again for the one still waiting', async () => {
    const env = isolated();
    const a = await worker(env);
    const r = await runner();
    const ac = new AbortController();
    let started!: () => void;
    const running = new Promise<void>((res) => (started = res));
    const payload = [{ spinMs: 1_500, value: 5 }];
    const cancelled = r.map<object, ProbeResult>('runner-probe', payload, { key: 'shared-probe', signal: ac.signal, onProgress: () => started() });
    const kept = r.map<object, ProbeResult>('runner-probe', payload, { key: 'shared-probe' });
    await running;
    ac.abort();
    await expect(cancelled).rejects.toBeInstanceOf(CancelledError);
    expect((await kept)[0]).toEqual({ value: 5, pid: a.pid, moduleFormat: 'module' });
    await a.kill();
  });

  it('a worker running another tool version refuses the task and names both versions', async () => {
    const env = isolated();
    const a = await worker(env);
    const q = new Queue(env.QUEUE_NAME, { connection: redisConnection(redis.url, 'test-old-server') });
    await q.add('runner-probe', { kind: 'runner-probe', payload: {}, toolVersion: '0.0.1-old' }, { jobId: 'old-version-task' });
    // The job's own record, polled: an event stream read from "now" can miss a refusal that comes at once
    // (it did on a loaded machine, and the test waited out its time).
    let reason = '';
    for (let waited = 0; !reason && waited < 30_000; waited += 100) {
      reason = (await q.getJob('old-version-task'))?.failedReason ?? '';
      if (!reason) await new Promise((r) => setTimeout(r, 100));
    }
    expect(reason).toContain(`running ${TOOL.name} ${TOOL.version}`);
    expect(reason).toContain('made by version 0.0.1-old');
    await q.close();
    await a.kill();
  });

  it('Redis restarted (empty) in the middle of a batch: reported as "queue unavailable, retrying", then every task finishes', async () => {
    const env = isolated();
    const own = await startRedis();
    try {
      const a = await startQueueWorker({ REDIS_URL: own.url, ...env });
      workers.push(a);
      const r = await makeQueueRunner({ url: own.url, reconcileMs: 300 });
      runners.push(r);
      let first!: () => void;
      const one = new Promise<void>((res) => (first = res));
      const batch = r.map<object, ProbeResult>('runner-probe', Array.from({ length: 6 }, (_, i) => ({ spinMs: 300, value: i })), { onResult: () => first() });
      await one;
      await own.kill();
      for (let i = 0; i < 50 && r.health!().ok; i++) await new Promise((res) => setTimeout(res, 100));
      expect(r.health!()).toMatchObject({ ok: false });
      expect(r.health!().message).toMatch(/^Queue unavailable, retrying/);
      await own.restart();
      const out = await batch;
      expect(out.map((p) => p.value)).toEqual([0, 1, 2, 3, 4, 5]);
      expect(r.health!().ok).toBe(true);
    } finally {
      await own.stop();
    }
  });
});
