/**
 * The process entry (what `npm start` runs): listens where HOST/PORT say, serves the demo scenarios from
 * scenarios/, creates the data folder from DATA_DIR, and exits cleanly on SIGTERM.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { DATABASE_FILE } from '../../server/web/store.ts';

const repo = fileURLToPath(new URL('../../', import.meta.url));
const root = mkdtempSync(join(tmpdir(), 'barrier-main-'));
let child: ChildProcess | undefined;

afterAll(() => {
  if (child && child.exitCode === null) child.kill('SIGKILL');
  rmSync(root, { recursive: true, force: true });
});

describe('server/main.ts', () => {
  it('serves the demo scenarios on HOST:PORT and stops on SIGTERM', async () => {
    const dataDir = join(root, 'data');
    child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
      cwd: repo,
      env: { ...process.env, HOST: '127.0.0.1', PORT: '0', DATA_DIR: dataDir, WORKERS: '1' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let log = '';
    const address = await new Promise<string>((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`server did not start:\n${log}`)), 30_000);
      const onData = (chunk: Buffer) => {
        log += chunk.toString();
        const m = /Server listening at (http:\/\/127\.0\.0\.1:\d+)/.exec(log);
        if (m) {
          clearTimeout(timer);
          resolve(m[1]);
        }
      };
      child!.stdout!.on('data', onData);
      child!.stderr!.on('data', onData);
      child!.on('exit', (code) => reject(new Error(`server exited with ${code}:\n${log}`)));
    });
    const html = await (await fetch(`${address}/`)).text();
    const demos = readdirSync(join(repo, 'scenarios')).filter((f) => f.endsWith('.json'));
    expect(demos.length).toBeGreaterThanOrEqual(3);
    for (const f of demos) expect(html).toContain(`/scenarios/demo-${f.replace(/\.json$/, '')}`);
    expect(existsSync(join(dataDir, DATABASE_FILE))).toBe(true);
    const exit = new Promise<number | null>((resolve) => child!.on('exit', (code) => resolve(code)));
    child.kill('SIGTERM');
    expect(await exit).toBe(0);
  });

  it('a thread or time setting out of range stops the start with a message naming it (regression: ignored silently)', async () => {
    for (const [name, value, rule] of [
      ['ENSEMBLE_THREADS', 'abc', 'a whole number ≥ 1'],
      ['WORKERS', '0', 'a whole number ≥ 1'],
      ['WALL_SECONDS', '-5', 'a number > 0'],
    ] as const) {
      const p = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
        cwd: repo,
        env: { ...process.env, HOST: '127.0.0.1', PORT: '0', DATA_DIR: join(root, 'data-bad'), [name]: value },
        stdio: ['ignore', 'pipe', 'pipe'],
      });
      let err = '';
      p.stderr!.on('data', (c: Buffer) => (err += c.toString()));
      const code = await new Promise<number | null>((resolve) => p.on('exit', resolve));
      expect(code, name).toBe(1);
      expect(err).toContain(`${name} must be ${rule} (found "${value}")`);
    }
    expect(existsSync(join(root, 'data-bad'))).toBe(false);
  });
});
