/**
 * Redis for the queue tests: the server CI started (TEST_REDIS_URL), or a private redis-server started
 * here on 127.0.0.1 on a free port (no persistence) and stopped by its PID. Where redis-server is not
 * installed the tests print "SKIPPED …" and are skipped.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { fileURLToPath } from 'node:url';

export const hasRedisServer = spawnSync('redis-server', ['--version'], { stdio: 'ignore' }).status === 0;

export function skipMessage(what: string): string {
  return `SKIPPED ${what}: redis-server is not installed (Debian package redis-server; .ci/run installs it)`;
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const port = (srv.address() as { port: number }).port;
      srv.close(() => resolve(port));
    });
  });
}

export interface RedisHandle {
  url: string;
  port: number;
  /** Stops the server (SIGKILL by PID: as a crash would). */
  kill(): Promise<void>;
  /** Starts it again on the same port (empty: no persistence). */
  restart(): Promise<void>;
  stop(): Promise<void>;
}

async function launch(port: number): Promise<ChildProcess> {
  const p = spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no'], { stdio: ['ignore', 'pipe', 'pipe'] });
  let log = '';
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`redis-server did not start:\n${log}`)), 10_000);
    p.stdout!.on('data', (c: Buffer) => {
      log += c.toString();
      if (log.includes('Ready to accept connections')) {
        clearTimeout(timer);
        resolve();
      }
    });
    p.on('exit', (code) => reject(new Error(`redis-server exited with ${code}:\n${log}`)));
  });
  return p;
}

/** A private redis-server (for tests that stop and restart it). */
export async function startRedis(): Promise<RedisHandle> {
  const port = await freePort();
  let proc: ChildProcess | undefined = await launch(port);
  const kill = async () => {
    const p = proc;
    proc = undefined;
    if (!p || p.exitCode !== null) return;
    const gone = new Promise((r) => p.once('exit', r));
    p.kill('SIGKILL');
    await gone;
  };
  return {
    url: `redis://127.0.0.1:${port}`,
    port,
    kill,
    async restart() {
      proc = await launch(port);
    },
    stop: kill,
  };
}

/** The shared test Redis (TEST_REDIS_URL from .ci/run) or a private one. */
export async function testRedis(): Promise<{ url: string; stop(): Promise<void> }> {
  if (process.env.TEST_REDIS_URL) return { url: process.env.TEST_REDIS_URL, stop: async () => {} };
  return startRedis();
}

const repo = fileURLToPath(new URL('../../', import.meta.url));

export interface WorkerProcess {
  pid: number;
  log(): string;
  /** SIGKILL (a crash). */
  kill(): Promise<void>;
  /** SIGTERM and wait for the exit code. */
  stop(): Promise<number | null>;
}

/** Starts `npm run worker`'s entry as a process and waits until it says it is ready. */
export async function startQueueWorker(env: Record<string, string>): Promise<WorkerProcess> {
  const p = spawn(process.execPath, ['--import', 'tsx', 'server/jobs/queue-worker.ts'], {
    cwd: repo,
    env: { ...process.env, THREADS: '1', QUEUE_LOCK_SECONDS: '2', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let log = '';
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`queue worker did not start:\n${log}`)), 30_000);
    const on = (c: Buffer) => {
      log += c.toString();
      if (log.includes('queue worker ready')) {
        clearTimeout(timer);
        resolve();
      }
    };
    p.stdout!.on('data', on);
    p.stderr!.on('data', on);
    p.on('exit', (code) => reject(new Error(`queue worker exited with ${code}:\n${log}`)));
  });
  return {
    pid: p.pid!,
    log: () => log,
    async kill() {
      if (p.exitCode !== null || p.signalCode) return;
      const gone = new Promise((r) => p.once('exit', r));
      p.kill('SIGKILL');
      await gone;
    },
    async stop() {
      if (p.exitCode !== null || p.signalCode) return p.exitCode;
      const gone = new Promise<number | null>((r) => p.once('exit', (code) => r(code)));
      p.kill('SIGTERM');
      return gone;
    },
  };
}
