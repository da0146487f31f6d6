/**
 * The server process killed outright (SIGKILL) with an evaluation under way: started again on the same
 * data folder it takes the evaluation up and finishes it (durable jobs, embedded default, and queue mode with
 * Redis and a queue worker); and `npm start`
 * stopped with SIGTERM stops the server itself (the signal reaches it: regression, the server kept running).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { randomUUID } from 'node:crypto';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { comparable } from '../jobs/compare.ts';
import { hasRedisServer, skipMessage, startQueueWorker, testRedis, type WorkerProcess } from '../helpers/redis.ts';

if (!hasRedisServer) console.log(skipMessage('tests/web/main-restart.test.ts, queue mode'));

const repo = fileURLToPath(new URL('../../', import.meta.url));
const root = mkdtempSync(join(tmpdir(), 'barrier-restart-'));
const children: ChildProcess[] = [];
afterAll(() => {
  for (const c of children) if (c.exitCode === null && !c.signalCode) c.kill('SIGKILL');
  rmSync(root, { recursive: true, force: true });
});

async function start(cmd: string, args: string[], env: Record<string, string>): Promise<{ child: ChildProcess; address: string; log: () => string }> {
  const child = spawn(cmd, args, { cwd: repo, env: { ...process.env, HOST: '127.0.0.1', PORT: '0', ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  children.push(child);
  let log = '';
  const address = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`server did not start:\n${log}`)), 60_000);
    const on = (c: Buffer) => {
      log += c.toString();
      const m = /Server listening at (http:\/\/127\.0\.0\.1:\d+)/.exec(log);
      if (m) {
        clearTimeout(timer);
        resolve(m[1]);
      }
    };
    child.stdout!.on('data', on);
    child.stderr!.on('data', on);
    child.on('exit', (code) => reject(new Error(`server exited with ${code}:\n${log}`)));
  });
  return { child, address, log: () => log };
}

const exited = (c: ChildProcess) => new Promise<void>((r) => (c.exitCode !== null || c.signalCode ? r() : c.once('exit', () => r())));

describe('server process restarts', () => {
  it('SIGKILL with an evaluation under way: after a restart it finishes, marked as resumed', async () => {
    const env = { DATA_DIR: join(root, 'data'), ENSEMBLE_THREADS: '1' };
    const first = await start(process.execPath, ['--import', 'tsx', 'server/main.ts'], env);
    const raw = smallEnsembleScenario({ uncertainty: { draws: 12, seed: 2, criticalWidth: false } });
    const posted = await fetch(`${first.address}/api/evaluations`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ scenario: raw }) });
    expect(posted.status).toBe(202);
    const { id } = (await posted.json()) as { id: string };
    for (let i = 0; i < 400; i++) {
      const s = (await (await fetch(`${first.address}/api/evaluations/${id}`)).json()) as { status: string; fraction: number };
      if (s.fraction > 0.1 || s.status !== 'queued') break;
      await new Promise((r) => setTimeout(r, 50));
    }
    first.child.kill('SIGKILL');
    await exited(first.child);
    const second = await start(process.execPath, ['--import', 'tsx', 'server/main.ts'], env);
    expect(second.log()).toContain(`resuming evaluation ${id}`);
    let s: { finished: boolean; status: string; resumed: boolean } = { finished: false, status: '', resumed: false };
    for (let i = 0; i < 1200 && !s.finished; i++) {
      s = (await (await fetch(`${second.address}/api/evaluations/${id}`)).json()) as typeof s;
      if (!s.finished) await new Promise((r) => setTimeout(r, 100));
    }
    expect(s).toMatchObject({ finished: true, status: 'done', resumed: true });
    second.child.kill('SIGTERM');
    await exited(second.child);
  });

  it.skipIf(!hasRedisServer)('queue mode: SIGKILL of the web server with an ensemble queued; after a restart a queue worker finishes it, with the numbers of a local run', async () => {
    const redis = await testRedis();
    const queue = `test-restart-${randomUUID().slice(0, 8)}`;
    const env = { DATA_DIR: join(root, 'data-queue'), REDIS_URL: redis.url, QUEUE_NAME: queue };
    let worker: WorkerProcess | undefined;
    try {
      const first = await start(process.execPath, ['--import', 'tsx', 'server/main.ts'], env);
      const raw = smallEnsembleScenario({ uncertainty: { draws: 12, seed: 8, criticalWidth: false } });
      const posted = await fetch(`${first.address}/api/evaluations`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ scenario: raw }) });
      expect(posted.status).toBe(202);
      const { id } = (await posted.json()) as { id: string };
      // No worker yet: the tasks wait in Redis, the job in the database.
      await new Promise((r) => setTimeout(r, 500));
      first.child.kill('SIGKILL');
      await exited(first.child);
      worker = await startQueueWorker({ REDIS_URL: redis.url, QUEUE_NAME: queue });
      const second = await start(process.execPath, ['--import', 'tsx', 'server/main.ts'], env);
      expect(second.log()).toContain(`resuming evaluation ${id}`);
      let s: { finished: boolean; status: string; resumed: boolean; resultId: string | null } = { finished: false, status: '', resumed: false, resultId: null };
      for (let i = 0; i < 1200 && !s.finished; i++) {
        s = (await (await fetch(`${second.address}/api/evaluations/${id}`)).json()) as typeof s;
        if (!s.finished) await new Promise((r) => setTimeout(r, 100));
      }
      expect(s).toMatchObject({ finished: true, status: 'done', resumed: true });
      const result = (await (await fetch(`${second.address}/api/results/${s.resultId}`)).json()) as { document: unknown };
      expect(comparable(result.document)).toBe(comparable(JSON.parse(JSON.stringify(evaluateScenario(parseScenario(raw))))));
      second.child.kill('SIGTERM');
      await exited(second.child);
    } finally {
      await worker?.kill();
      await redis.stop();
    }
  });

  it('SIGTERM to `npm start` stops the server (the signal reaches it)', async () => {
    const s = await start('npm', ['start'], { DATA_DIR: join(root, 'data-npm') });
    expect((await fetch(`${s.address}/`)).status).toBe(200);
    s.child.kill('SIGTERM');
    await exited(s.child);
    let refused = false;
    for (let i = 0; i < 50 && !refused; i++) {
      refused = await fetch(`${s.address}/`).then(
        () => false,
        () => true,
      );
      if (!refused) await new Promise((r) => setTimeout(r, 100));
    }
    expect(refused).toBe(true);
  });
});
