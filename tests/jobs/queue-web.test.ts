/**
 * The web server in queue mode: an evaluation accepted while no queue worker runs waits in the queue;
 * the server stopped and started again takes it up (resumed after a restart) and, once a worker
 * connects, it finishes with the numbers of a local run. The run page and the result say where the work ran
 * (queue workers, not this machine's threads).
 * Skipped with a printed message where redis-server is not installed.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import { buildApp } from '../../server/app.ts';
import { makeQueueRunner } from '../../server/jobs/queue-runner.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { FIXTURE_SCENARIOS_DIR, waitForJob } from '../helpers/build-app.ts';
import { hasRedisServer, skipMessage, startQueueWorker, testRedis } from '../helpers/redis.ts';
import { comparable } from './compare.ts';

if (!hasRedisServer) console.log(skipMessage('tests/jobs/queue-web.test.ts (web server in queue mode)'));

const dataDir = mkdtempSync(join(tmpdir(), 'barrier-queue-web-'));
afterAll(() => rmSync(dataDir, { recursive: true, force: true }));

describe.skipIf(!hasRedisServer)('web server in queue mode', () => {
  it('a job accepted before a restart finishes after it, on a queue worker, with the local numbers', async () => {
    const redis = await testRedis();
    const queue = `test-web-${randomUUID().slice(0, 8)}`;
    process.env.QUEUE_NAME = queue;
    const raw = smallEnsembleScenario({ uncertainty: { draws: 8, seed: 4, criticalWidth: false } });
    const cleanup: (() => Promise<unknown>)[] = [];
    try {
      const r1 = await makeQueueRunner({ url: redis.url, reconcileMs: 500 });
      const a = await buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, dataDir, runner: r1, shutdownGraceMs: 500 });
      const id = (await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: raw } })).json().id as string;
      await new Promise((r) => setTimeout(r, 1_000));
      const waiting = (await a.inject(`/api/evaluations/${id}`)).json();
      expect(waiting.finished).toBe(false);
      expect(waiting.where).toMatch(/^0 queue workers/);
      expect(waiting.trouble).toMatch(/^No queue worker is connected: the work waits in the queue until one starts/);
      expect((await a.inject(`/runs/${id}`)).body).toMatch(/Runs on: <span data-where>0 queue workers \(Redis at redis:\/\/127\.0\.0\.1:\d+\)<\/span>/);
      await a.close();
      await r1.close();

      const w = await startQueueWorker({ REDIS_URL: redis.url, QUEUE_NAME: queue });
      cleanup.push(() => w.kill());
      const r2 = await makeQueueRunner({ url: redis.url, reconcileMs: 500 });
      cleanup.push(() => r2.close());
      const b = await buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, dataDir, runner: r2 });
      cleanup.unshift(() => b.close());
      const done = await waitForJob(b, id, 120_000);
      expect(done.status).toBe('done');
      expect(done.resumed).toBe(true);
      expect(done.where).toMatch(/^1 queue worker \(Redis at redis:\/\/127\.0\.0\.1:\d+\)$/);
      // The run page and the result say where the work ran, not this machine's threads.
      const result = (await b.inject(`/api/results/${done.resultId}`)).json();
      expect(result.document.uncertainty.ranOn).toBe('1 queue worker');
      expect(result.document.uncertainty.threads).toBe(1);
      const page = (await b.inject(`/results/${done.resultId}`)).body;
      expect(page).toMatch(/ s on 1 queue worker\./);
      expect(page).not.toMatch(/ s on \d+ threads?\./);
      expect(comparable(result.document)).toBe(comparable(JSON.parse(JSON.stringify(evaluateScenario(parseScenario(raw))))));
    } finally {
      for (const c of cleanup) await c().catch(() => {});
      await redis.stop();
    }
  });
});
