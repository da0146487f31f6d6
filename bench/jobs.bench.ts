/**
 * Jobs bench: a 1000-draw ensemble on the local pool (1 and 2 threads) and on the queue (1 and 2 queue
 * worker processes of one thread each, Redis on 127.0.0.1 started here and stopped by PID), in one run,
 * interleaved (pool 1, queue 1, queue 2, pool 2, then again) so drifting machine load hits all alike.
 * Reports the 2-worker speed-up of the queue (target ≥ 1.8× on two free cores) and the queue's overhead
 * against the pool at equal worker count (target ≤ 10 %), and checks that the four, 3 queue workers and one
 * thread without any runner (evaluateScenario) give the same document.
 * Workers and pool threads are started and warmed before the clock starts (start-up is not part of a run):
 * every runner does one untimed run of the same ensemble first, and so does the queue each time a second
 * worker joins, so that no timed run pays for loading the analysis code or for its first, unoptimised draws
 * (a queue worker is a long-lived process; a pool's threads stay up between runs alike).
 *
 * The ensemble: the small test transect without barrier options at 10 m cells (each draw is one baseline run
 * of 800 cells × 400 steps, ~5 ms), so a run takes about 5 s on one thread and the fixed hand-overs at its
 * start and end (the central values, the summary) are a small part of it. The pool's own 2-thread speed-up is
 * printed beside the queue's: it is what the machine's two cores gave at the time (other work on the machine
 * lowers both alike, but not evenly: ±20 % between runs is common on the shared machine). So the bench also
 * times the hand-over alone: probe tasks of the same number and length that keep a thread busy for a fixed
 * wall time, which other work cannot stretch. Needs redis-server (Debian package); says SKIPPED without.
 */
import { loadavg } from 'node:os';
import { randomUUID } from 'node:crypto';
import { parseScenario } from '../server/model/scenario.ts';
import { evaluateScenario } from '../server/analysis/evaluate/evaluate.ts';
import { makePoolRunner } from '../server/jobs/pool-runner.ts';
import { makeQueueRunner } from '../server/jobs/queue-runner.ts';
import { chunkCount, runEvaluation } from '../server/jobs/evaluation-job.ts';
import type { TaskRunner } from '../server/jobs/task-runner.ts';
import { smallEnsembleScenario } from '../tests/analysis/ensemble/ensemble-fixture.ts';
import { comparable } from '../tests/jobs/compare.ts';
import { hasRedisServer, startQueueWorker, startRedis, type WorkerProcess } from '../tests/helpers/redis.ts';

const DRAWS = Number(process.env.BENCH_DRAWS ?? 1000);
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3);
const CELL_M = Number(process.env.BENCH_CELL_M ?? 10);

if (!hasRedisServer) {
  console.log('SKIPPED jobs bench: redis-server is not installed (Debian package redis-server)');
  process.exit(0);
}

const scenario = parseScenario(
  smallEnsembleScenario({
    uncertainty: { draws: DRAWS, seed: 1, criticalWidth: false },
    transport: undefined,
    barrier: undefined,
    horizonYears: 20,
    numerics: { cellM: CELL_M, stepYears: 0.05 },
  }),
);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

async function timed(runner: TaskRunner): Promise<{ seconds: number; doc: string }> {
  const t0 = performance.now();
  const out = await runEvaluation(scenario, runner);
  const seconds = (performance.now() - t0) / 1000;
  if (out.kind !== 'done') throw new Error('evaluation did not finish');
  return { seconds, doc: comparable(out.document) };
}

const redis = await startRedis();
process.env.QUEUE_NAME = `bench-${randomUUID().slice(0, 8)}`;
const workers: WorkerProcess[] = [];
const times: Record<string, number[]> = { pool1: [], queue1: [], queue2: [], pool2: [] };
let chunks = 0;
let busyMs = 0;
const probes: Record<string, number[]> = { pool1: [], queue1: [], queue2: [], pool2: [] };
const docs = new Set<string>();
const load: number[] = [loadavg()[0]];
try {
  const queue = await makeQueueRunner({ url: redis.url });
  // Threads started and kept, as a queue worker keeps its own: no run pays for loading the code.
  const pool1 = makePoolRunner({ threads: 1, minThreads: 1, idleTimeoutMs: 3_600_000 });
  const pool2 = makePoolRunner({ threads: 2, minThreads: 2, idleTimeoutMs: 3_600_000 });
  const warm = (r: TaskRunner) => r.map('runner-probe', [{ spinMs: 300 }, { spinMs: 300 }]);
  // An untimed run of the ensemble itself: the code loaded and the draws' functions optimised on every thread.
  const warmRun = async (r: TaskRunner) => void (await timed(r));
  await warmRun(pool1);
  await warmRun(pool2);
  const env = { REDIS_URL: redis.url, QUEUE_NAME: process.env.QUEUE_NAME, THREADS: '1' };
  workers.push(await startQueueWorker(env));
  await warm(queue);
  await warmRun(queue);
  for (let round = 0; round < ROUNDS; round++) {
    let r = await timed(pool1);
    times.pool1.push(r.seconds);
    docs.add(r.doc);
    r = await timed(queue); // one worker
    times.queue1.push(r.seconds);
    docs.add(r.doc);
    const second = await startQueueWorker(env);
    await warm(queue);
    await warmRun(queue);
    r = await timed(queue); // two workers
    times.queue2.push(r.seconds);
    docs.add(r.doc);
    await second.kill();
    r = await timed(pool2);
    times.pool2.push(r.seconds);
    docs.add(r.doc);
    load.push(loadavg()[0]);
    console.log(`round ${round + 1}: pool 1 thread ${times.pool1.at(-1)!.toFixed(2)} s, queue 1 worker ${times.queue1.at(-1)!.toFixed(2)} s, queue 2 workers ${times.queue2.at(-1)!.toFixed(2)} s, pool 2 threads ${times.pool2.at(-1)!.toFixed(2)} s`);
  }
  // The hand-over alone: the same shape of work as the ensemble (a task per chunk, then the summary) made of
  // probe tasks that each keep a thread busy for a fixed WALL time, so other work on the machine does not
  // stretch them: what remains above the busy time is the runner's own cost, and how well it spreads tasks.
  chunks = chunkCount(scenario) + 1;
  busyMs = Math.round((1000 * median(times.pool1)) / chunks);
  const probeRun = async (r: TaskRunner) => {
    const t0 = performance.now();
    await r.map('runner-probe', Array.from({ length: chunks }, () => ({ spinMs: busyMs })));
    await r.map('runner-probe', [{ spinMs: 20 }]);
    return (performance.now() - t0) / 1000;
  };
  for (let round = 0; round < ROUNDS; round++) {
    probes.pool1.push(await probeRun(pool1));
    probes.queue1.push(await probeRun(queue));
    const second = await startQueueWorker(env);
    await warm(queue);
    probes.queue2.push(await probeRun(queue));
    await second.kill();
    probes.pool2.push(await probeRun(pool2));
  }

  // Same numbers everywhere: three queue workers, and one thread with no runner at all (evaluateScenario).
  const extra = [await startQueueWorker(env), await startQueueWorker(env)];
  await warm(queue);
  docs.add((await timed(queue)).doc);
  await Promise.all(extra.map((w) => w.kill()));
  docs.add(comparable(JSON.parse(JSON.stringify(evaluateScenario(scenario)))));
  await Promise.all([queue.close(), pool1.close(), pool2.close()]);
} finally {
  await Promise.allSettled(workers.map((w) => w.kill()));
  await redis.stop();
}

const ratio = (a: number[], b: number[]) => median(a.map((x, i) => x / b[i]));
const speedup = ratio(times.queue1, times.queue2);
const poolSpeedup = ratio(times.pool1, times.pool2);
const over1 = ratio(times.queue1, times.pool1) - 1;
const over2 = ratio(times.queue2, times.pool2) - 1;
const verdict = (ok: boolean) => (ok ? 'MET' : 'NOT MET');
const med = (k: string) => median(times[k]).toFixed(2);
console.log(`\n${DRAWS}-draw ensemble (${CELL_M} m cells, ${chunkCount(scenario)} chunks), ${ROUNDS} round(s); 1-minute load average of the machine during the bench: ${load.map((x) => x.toFixed(1)).join(' → ')} (2 cores)`);
console.log(`median times: pool 1 thread ${med('pool1')} s, queue 1 worker ${med('queue1')} s, queue 2 workers ${med('queue2')} s, pool 2 threads ${med('pool2')} s`);
console.log(`queue, 2 workers vs 1: speed-up ${speedup.toFixed(2)}× (target ≥ 1.8×: ${verdict(speedup >= 1.8)}); the local pool's 2 threads vs 1 in the same rounds: ${poolSpeedup.toFixed(2)}×`);
console.log(`queue vs local pool, 1 worker: overhead ${(100 * over1).toFixed(1)} % (target ≤ 10 %: ${verdict(over1 <= 0.1)}); 2 workers: ${(100 * over2).toFixed(1)} % (${verdict(over2 <= 0.1)})`);
const pSpeedup = ratio(probes.queue1, probes.queue2);
const pOver1 = ratio(probes.queue1, probes.pool1) - 1;
const pOver2 = ratio(probes.queue2, probes.pool2) - 1;
const pmed = (k: string) => median(probes[k]).toFixed(2);
console.log(`hand-over alone (${chunks} + 1 probe tasks of fixed wall time, ${busyMs} ms each: the ensemble's shape without its computing): pool 1 thread ${pmed('pool1')} s, queue 1 worker ${pmed('queue1')} s, queue 2 workers ${pmed('queue2')} s, pool 2 threads ${pmed('pool2')} s`);
console.log(`  queue 2 workers vs 1: ${pSpeedup.toFixed(2)}× (${verdict(pSpeedup >= 1.8)}); queue vs pool, 1 worker: ${(100 * pOver1).toFixed(1)} % (${verdict(pOver1 <= 0.1)}), 2 workers: ${(100 * pOver2).toFixed(1)} % (${verdict(pOver2 <= 0.1)})`);
console.log(`same document from the pool (1 and 2 threads), 1, 2 and 3 queue workers and one thread without a runner: ${docs.size === 1 ? 'yes' : `NO (${docs.size} different)`}`);
if (docs.size !== 1) process.exitCode = 1;
