/**
 * `npm run bench:load`: bounded load on a server listening on 127.0.0.1 only (a fresh data folder, port
 * chosen by the system), stopping by itself. Three phases, with the event-loop delay measured throughout:
 *  1. burst: 300 concurrent requests (pages, API reads, scenario saves);
 *  2. sustained: 40 clients × 25 requests, mixed;
 *  3. attack: 6 form posts of 9 999 row keys (~300 KB each, the post that froze the server for ~50 s) while a
 *     prober times a GET every 50 ms.
 * Prints status counts, latency quantiles and the longest event-loop stall; exits 1 on a 5xx or when the
 * prober waited more than 2 s.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { buildApp } from '../../server/app.ts';
import { FIXTURE_SCENARIOS_DIR } from '../../tests/helpers/build-app.ts';

const dataDir = mkdtempSync(join(tmpdir(), 'barrier-load-'));
const app = await buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, dataDir, workerThreads: 1 });
await app.listen({ host: '127.0.0.1', port: 0 });
const addr = app.server.address();
const base = `http://127.0.0.1:${typeof addr === 'object' && addr ? addr.port : 0}`;
const quick = readFileSync(join(FIXTURE_SCENARIOS_DIR, 'quick-check.json'), 'utf8');
const loop = monitorEventLoopDelay({ resolution: 10 });
loop.enable();

type Result = { status: number; ms: number };
async function request(path: string, init?: RequestInit): Promise<Result> {
  const t0 = performance.now();
  try {
    const r = await fetch(base + path, { ...init, signal: AbortSignal.timeout(60_000) });
    await r.arrayBuffer();
    return { status: r.status, ms: performance.now() - t0 };
  } catch {
    return { status: 0, ms: performance.now() - t0 };
  }
}
const mixed = (i: number) => {
  switch (i % 6) {
    case 0:
      return request('/');
    case 1:
      return request('/api/scenarios');
    case 2:
      return request('/scenarios/demo-quick-check');
    case 3:
      return request('/scenarios/new');
    case 4:
      return request('/api/scenarios', { method: 'POST', headers: { 'content-type': 'application/json' }, body: quick });
    default:
      return request('/api/fields');
  }
};
function report(name: string, rs: Result[], wallMs: number): boolean {
  const ms = rs.map((r) => r.ms).sort((a, b) => a - b);
  const q = (p: number) => ms[Math.min(ms.length - 1, Math.floor(p * ms.length))].toFixed(0);
  const by: Record<number, number> = {};
  for (const r of rs) by[r.status] = (by[r.status] ?? 0) + 1;
  const bad = rs.filter((r) => r.status >= 500 && r.status !== 503).length + (by[0] ?? 0);
  process.stdout.write(
    `${name}: ${rs.length} requests in ${(wallMs / 1000).toFixed(1)} s (${((rs.length / wallMs) * 1000).toFixed(0)}/s); status ${JSON.stringify(by)}; ` +
      `latency p50 ${q(0.5)} ms, p95 ${q(0.95)} ms, max ${q(1)} ms; event-loop delay max ${(loop.max / 1e6).toFixed(0)} ms\n`,
  );
  loop.reset();
  return bad === 0;
}

let ok = true;
let t0 = performance.now();
ok = report('burst', await Promise.all(Array.from({ length: 300 }, (_, i) => mixed(i))), performance.now() - t0) && ok;

t0 = performance.now();
const sustained = await Promise.all(
  Array.from({ length: 40 }, async (_, c) => {
    const rs: Result[] = [];
    for (let k = 0; k < 25; k++) rs.push(await mixed(c + k));
    return rs;
  }),
);
ok = report('sustained', sustained.flat(), performance.now() - t0) && ok;

const rows = new URLSearchParams({ _action: 'add:segments' });
for (let i = 0; i < 9_999; i++) rows.set(`transect.segments[${i}].lengthKm`, '1');
const attackBody = rows.toString();
t0 = performance.now();
let probing = true;
const probes: Result[] = [];
const prober = (async () => {
  while (probing) {
    probes.push(await request('/api/limits'));
    await new Promise((r) => setTimeout(r, 50));
  }
})();
const attack = await Promise.all(
  Array.from({ length: 6 }, () => request('/scenarios/new', { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: attackBody })),
);
probing = false;
await prober;
ok = report(`attack (${(attackBody.length / 1024).toFixed(0)} KB form posts)`, attack, performance.now() - t0) && ok;
const worstProbe = Math.max(...probes.map((p) => p.ms));
process.stdout.write(`  prober: ${probes.length} GETs during the attack, longest wait ${worstProbe.toFixed(0)} ms (was 48 s before the fix)\n`);
ok = ok && worstProbe < 2_000;

await app.close();
rmSync(dataDir, { recursive: true, force: true });
process.stdout.write(`load: ${ok ? 'no 5xx, no failed connection, server kept answering' : 'FAILED'}\n`);
process.exitCode = ok ? 0 : 1;
