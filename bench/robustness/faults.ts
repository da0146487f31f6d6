/**
 * `npm run bench:faults [-- TRIALS]`: kill and restart runs, loopback only, stopping by themselves.
 *  1. Server: start `npm start` (server/main.ts) on a free port with a fresh DATA_DIR, save scenarios from 8
 *     concurrent clients, SIGKILL the server at a random moment, start it again and check that every save
 *     that was acknowledged (201) is there. TRIALS times (default 8).
 *  2. CLI: 24 runs of `npm run evaluate -- … --json --out r.json --pdf r.pdf` into one folder, alternating two
 *     scenarios, killed (SIGKILL or SIGTERM) around the time the files are written; after each, the next run's
 *     recovery (recoverOutputs) is applied. Counts hidden leftovers before and after recovery, and pairs whose
 *     PDF and JSON come from different runs (scenario fingerprints differ).
 *  3. Jobs: up to 4 times, start the server, have 3 evaluations (12-draw ensembles) accepted, SIGKILL it at a
 *     random moment; then start it once more and check that every accepted evaluation finishes ('done').
 * Prints the figures; exits 1 when an acknowledged save is lost, a leftover survives recovery, a mixed pair
 * remains or an accepted evaluation does not finish.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { recoverOutputs } from '../../server/cli.ts';
import { FIXTURE_SCENARIOS_DIR } from '../../tests/helpers/build-app.ts';
import { smallEnsembleScenario } from '../../tests/analysis/ensemble/ensemble-fixture.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const trials = Number(process.argv[2] ?? 8);
const quick = readFileSync(join(FIXTURE_SCENARIOS_DIR, 'quick-check.json'), 'utf8');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function freePort(): Promise<number> {
  return new Promise((res) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const p = (s.address() as { port: number }).port;
      s.close(() => res(p));
    });
  });
}

async function startServer(dataDir: string, port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
    cwd: root,
    env: { ...process.env, DATA_DIR: dataDir, PORT: String(port), HOST: '127.0.0.1', WORKERS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.resume();
  child.stderr!.resume();
  for (let i = 0; i < 300; i++) {
    try {
      const r = await fetch(`http://127.0.0.1:${port}/api/limits`);
      if (r.ok) return child;
    } catch {
      // not up yet
    }
    await sleep(100);
  }
  child.kill('SIGKILL');
  throw new Error('server did not start within 30 s');
}

/** Resolves when the process has exited (also when it already had: an 'exit' listener added late never fires). */
const exited = (c: ChildProcess) => new Promise<void>((r) => (c.exitCode !== null || c.signalCode !== null ? r() : c.once('exit', () => r())));

let failed = false;

// ---- 1. server kill / restart ----------------------------------------------------------------------
{
  const dataDir = mkdtempSync(join(tmpdir(), 'barrier-faults-'));
  const port = await freePort();
  const acknowledged: string[] = [];
  let lost = 0;
  let attempts = 0;
  for (let k = 0; k < trials; k++) {
    const server = await startServer(dataDir, port);
    let running = true;
    const clients = Array.from({ length: 8 }, async (_, c) => {
      while (running) {
        attempts++;
        try {
          const body = JSON.stringify({ ...JSON.parse(quick), title: `fault trial ${k} client ${c} #${attempts}` });
          const r = await fetch(`http://127.0.0.1:${port}/api/scenarios`, { method: 'POST', headers: { 'content-type': 'application/json' }, body });
          if (r.status === 201) acknowledged.push(((await r.json()) as { ref: string }).ref);
          else await r.arrayBuffer();
        } catch {
          // the server went away mid-request: not acknowledged
        }
      }
    });
    await sleep(300 + Math.random() * 1200);
    server.kill('SIGKILL');
    running = false;
    const gone = exited(server);
    await Promise.all(clients);
    await gone;
  }
  const server = await startServer(dataDir, port);
  for (const ref of acknowledged) {
    const r = await fetch(`http://127.0.0.1:${port}/api/scenarios/${ref}`);
    if (r.status !== 200) lost++;
    await r.arrayBuffer();
  }
  // A graceful stop for comparison: time from SIGTERM to exit.
  const t0 = performance.now();
  server.kill('SIGTERM');
  const code = await new Promise<number | null>((r) => server.once('exit', (c) => r(c)));
  process.stdout.write(
    `server: ${trials} SIGKILLs during saves; ${attempts} save attempts, ${acknowledged.length} acknowledged, ${lost} of them lost after restart; ` +
      `SIGTERM exit ${code} after ${(performance.now() - t0).toFixed(0)} ms\n`,
  );
  if (lost) failed = true;
  rmSync(dataDir, { recursive: true, force: true });
}

// ---- 2. CLI kills while writing --pdf with --out ----------------------------------------------------
{
  const dir = mkdtempSync(join(tmpdir(), 'barrier-cli-kill-'));
  const files = ['A', 'B'].map((name) => {
    const f = join(dir, `scenario-${name}.json`);
    writeFileSync(f, JSON.stringify({ ...JSON.parse(quick), title: `Ossenvale kill trial ${name}` }));
    return f;
  });
  const out = join(dir, 'r.json');
  const pdf = join(dir, 'r.pdf');
  const run = (file: string) =>
    spawn(process.execPath, ['--import', 'tsx', 'server/cli.ts', file, '--json', '--out', out, '--pdf', pdf, '--quiet', '--threads', '1'], { cwd: root, stdio: 'ignore' });
  // One full run to time it; kills then fall around the end of a run, where the files are written.
  let t0 = performance.now();
  await new Promise((r) => run(files[0]).once('exit', r));
  const fullMs = performance.now() - t0;
  const hidden = () => readdirSync(dir).filter((n) => n.startsWith('.'));
  const fingerprintPdf = () => /scenario ([0-9a-f]+)/.exec(readFileSync(pdf).toString('latin1'))?.[1];
  const fingerprintJson = () => (JSON.parse(readFileSync(out, 'utf8')) as { scenarioFingerprint: string }).scenarioFingerprint;
  let leftBefore = 0;
  let leftAfter = 0;
  let mixed = 0;
  let killedMidway = 0;
  for (let k = 0; k < 24; k++) {
    const child = run(files[k % 2]);
    t0 = performance.now();
    await sleep(fullMs * (0.6 + Math.random() * 0.5));
    const finishedFirst = child.exitCode !== null;
    child.kill(k % 3 === 0 ? 'SIGTERM' : 'SIGKILL');
    await exited(child);
    if (!finishedFirst) killedMidway++;
    if (hidden().length) leftBefore++;
    recoverOutputs([out, pdf]);
    if (hidden().length) leftAfter++;
    if (existsSync(out) && existsSync(pdf) && fingerprintPdf() !== fingerprintJson()) mixed++;
  }
  process.stdout.write(
    `cli: 24 runs (${killedMidway} killed before they finished; a full run takes ${(fullMs / 1000).toFixed(1)} s); ` +
      `hidden leftovers after the kill ${leftBefore}, after the next run's recovery ${leftAfter}; PDF/JSON pairs from different runs ${mixed}\n`,
  );
  if (leftAfter || mixed) failed = true;
  rmSync(dir, { recursive: true, force: true });
}
// ---- 3. evaluations accepted (202), server killed, started again: every one finishes ---------------------
{
  const dataDir = mkdtempSync(join(tmpdir(), 'barrier-faults-jobs-'));
  const port = await freePort();
  const scenario = smallEnsembleScenario({ uncertainty: { draws: 12, seed: 6, criticalWidth: false } });
  const accepted: string[] = [];
  const cycles = Math.min(trials, 4);
  for (let k = 0; k < cycles; k++) {
    const server = await startServer(dataDir, port);
    for (let j = 0; j < 3; j++) {
      const r = await fetch(`http://127.0.0.1:${port}/api/evaluations`, {
        method: 'POST',
        headers: { 'content-type': 'application/json' },
        body: JSON.stringify({ scenario: { ...scenario, title: `fault job ${k}.${j}` } }),
      });
      if (r.status === 202) accepted.push(((await r.json()) as { id: string }).id);
      else await r.arrayBuffer();
    }
    await sleep(300 + Math.random() * 1500);
    const gone = exited(server);
    server.kill('SIGKILL');
    await gone;
  }
  const t0 = performance.now();
  const server = await startServer(dataDir, port);
  const states: Record<string, number> = {};
  let resumed = 0;
  for (const id of accepted) {
    let s: { finished?: boolean; status?: string; resumed?: boolean } = {};
    for (let i = 0; i < 1800 && !s.finished; i++) {
      const r = await fetch(`http://127.0.0.1:${port}/api/evaluations/${id}`);
      s = r.status === 200 ? ((await r.json()) as typeof s) : { finished: true, status: `HTTP ${r.status}` };
      if (!s.finished) await sleep(100);
    }
    states[s.status ?? 'unknown'] = (states[s.status ?? 'unknown'] ?? 0) + 1;
    if (s.resumed) resumed++;
  }
  const allMs = performance.now() - t0;
  const stopAt = performance.now();
  const gone = exited(server);
  server.kill('SIGTERM');
  await gone;
  const done = states.done ?? 0;
  process.stdout.write(
    `jobs: ${cycles} SIGKILLs with evaluations accepted; ${accepted.length} accepted (202), after the restart ${JSON.stringify(states)} (${resumed} resumed), ` +
      `all finished ${(allMs / 1000).toFixed(1)} s after the restart; SIGTERM exit after ${(performance.now() - stopAt).toFixed(0)} ms\n`,
  );
  if (done !== accepted.length) failed = true;
  rmSync(dataDir, { recursive: true, force: true });
}
process.stdout.write(`faults: ${failed ? 'FAILED' : 'no acknowledged save lost, no leftover after recovery, no mixed pair, every accepted evaluation finished'}\n`);
process.exitCode = failed ? 1 : 0;
