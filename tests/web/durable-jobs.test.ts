/**
 * Durable jobs in the embedded default (SQLite + worker threads): an accepted evaluation survives a stop
 * of the server and resumes from its stored chunks with the numbers of an uninterrupted run; stopping ends
 * progress streams and returns within a bounded time; progress streams are capped per evaluation and per
 * client; the run page says what it is doing in plain words.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildApp } from '../../server/app.ts';
import { openStore } from '../../server/web/store.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { jobPayload, statusText, timeLeftText } from '../../server/web/routes/run-pages.ts';
import { makeJobRunner, type JobView } from '../../server/web/jobs.ts';
import { makePoolRunner } from '../../server/jobs/pool-runner.ts';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { FIXTURE_SCENARIOS_DIR, waitForJob } from '../helpers/build-app.ts';
import { comparable } from '../jobs/compare.ts';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});
const newDir = () => {
  const d = mkdtempSync(join(tmpdir(), 'barrier-durable-'));
  dirs.push(d);
  return d;
};
const app = (dataDir: string, extra: Parameters<typeof buildApp>[0] = {}) =>
  buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, dataDir, workerThreads: 1, ensembleThreads: 1, ...extra });

/** A scenario whose one run takes several seconds (a long horizon on a fine grid with short steps). */
function slowRaw() {
  return smallEnsembleScenario({ uncertainty: undefined, transport: undefined, horizonYears: 40, numerics: { cellM: 5, stepYears: 0.0005 } });
}

describe('durable jobs (embedded)', () => {
  it('a stopped server resumes an ensemble from its stored chunks; the result equals an uninterrupted run', async () => {
    const dataDir = newDir();
    const raw = smallEnsembleScenario({ uncertainty: { draws: 16, seed: 9, criticalWidth: false } });
    const a = await app(dataDir);
    const posted = await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: raw } });
    expect(posted.statusCode).toBe(202);
    const id = posted.json().id as string;
    // Stored before the 202: the row is there at once.
    for (let i = 0; i < 600; i++) {
      const s = (await a.inject(`/api/evaluations/${id}`)).json();
      if (s.fraction >= 0.3 || s.finished) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    await a.close();
    const store = openStore(dataDir);
    const row = store.jobs.get(id)!;
    const storedChunks = store.jobs.chunks(id).size;
    store.close();
    expect(row.status).toBe('queued');
    expect(storedChunks).toBeGreaterThan(0);
    expect(storedChunks).toBeLessThan(16);

    const b = await app(dataDir);
    try {
      const resumed = (await b.inject(`/api/evaluations/${id}`)).json();
      expect(resumed.resumed).toBe(true);
      expect(resumed.fraction).toBeGreaterThan(0.2); // started from the stored chunks, not from zero
      const page = await b.inject(`/runs/${id}`);
      if (page.statusCode === 200) expect(page.body).toContain('Resumed after a restart');
      const done = await waitForJob(b, id);
      expect(done.status).toBe('done');
      const result = (await b.inject(`/api/results/${done.resultId}`)).json();
      expect(comparable(result.document)).toBe(comparable(JSON.parse(JSON.stringify(evaluateScenario(parseScenario(raw))))));
    } finally {
      await b.close();
    }
  });

  it('stopping the server ends open progress streams and returns within a few seconds while a long run computes; the job stays queued', async () => {
    const dataDir = newDir();
    const a = await app(dataDir, { shutdownGraceMs: 1_000 });
    const address = await a.listen({ host: '127.0.0.1', port: 0 });
    const id = (await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowRaw() } })).json().id as string;
    const stream = await fetch(`${address}/api/evaluations/${id}/events`, { headers: { accept: 'text/event-stream' } });
    expect(stream.status).toBe(200);
    const body = stream.text();
    await new Promise((r) => setTimeout(r, 500));
    const t0 = Date.now();
    await a.close();
    expect(Date.now() - t0).toBeLessThan(5_000);
    const text = await body;
    const last = text.trim().split(/\n\n+/).at(-1)!;
    expect(last).toContain('event: end');
    expect(JSON.parse(last.split('data: ')[1])).toMatchObject({ serverStopping: true, finished: false });
    const store = openStore(dataDir);
    expect(store.jobs.get(id)?.status).toBe('queued');
    store.close();
  });

  it('shutdown says which evaluations were not finished (running and waiting), and they stay queued for the next start', async () => {
    const store = openStore(newDir());
    const runner = makePoolRunner({ threads: 1 });
    const logged: string[] = [];
    const jobs = makeJobRunner({ store, runner, concurrency: 1, wallSeconds: 600, maxQueued: 10, log: (m) => logged.push(m) });
    try {
      const scenario = parseScenario(slowRaw());
      const first = jobs.submit({ scenario, scenarioRef: null });
      const second = jobs.submit({ scenario: { ...scenario, title: 'second slow run' }, scenarioRef: null });
      await new Promise((r) => setTimeout(r, 300));
      const report = await jobs.shutdown(500);
      expect(report.unfinished.map((u) => [u.id, u.status])).toEqual([
        [first.id, 'running'],
        [second.id, 'queued'],
      ]);
      const line = logged.find((m) => m.startsWith('stopping with 2 evaluation(s) not finished'));
      expect(line).toContain(first.id);
      expect(line).toContain('"second slow run"');
      expect(store.jobs.unfinished('evaluation').map((r) => r.status)).toEqual(['queued', 'queued']);
      expect(() => jobs.submit({ scenario, scenarioRef: null })).toThrow(/stopping/);
    } finally {
      await jobs.close();
      await runner.close();
      store.close();
    }
  });

  it('caps progress streams per evaluation and per client (429 with a message)', async () => {
    const dataDir = newDir();
    const a = await app(dataDir, { streamLimits: { perJob: 2, perClient: 3 }, shutdownGraceMs: 500 });
    const address = await a.listen({ host: '127.0.0.1', port: 0 });
    const controllers: AbortController[] = [];
    const open = async (id: string) => {
      const ac = new AbortController();
      controllers.push(ac);
      return fetch(`${address}/runs/${id}/events`, { headers: { accept: 'text/event-stream' }, signal: ac.signal });
    };
    try {
      const one = (await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowRaw() } })).json().id as string;
      const two = (await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowRaw() } })).json().id as string;
      expect((await open(one)).status).toBe(200);
      expect((await open(one)).status).toBe(200);
      const third = await open(one);
      expect(third.status).toBe(429);
      expect(await third.text()).toContain('already has 2 open progress streams');
      expect((await open(two)).status).toBe(200);
      const fourth = await open(two);
      expect(fourth.status).toBe(429);
      expect(await fourth.text()).toContain('This client already has 3 open progress streams');
      // A closed stream frees its place.
      controllers[0].abort();
      await new Promise((r) => setTimeout(r, 300));
      expect((await open(one)).status).toBe(200);
    } finally {
      for (const c of controllers) c.abort();
      await a.close();
    }
  });
});

describe('cancel and wall-time limit on a big grid (regression: 15–20 s on 80 000 cells)', () => {
  /** 40 km at 0.5 m: 80 000 cells. */
  const bigRaw = () =>
    smallEnsembleScenario({
      uncertainty: undefined,
      transport: undefined,
      barrier: undefined,
      transect: { segments: [{ habitat: 'host-forest', lengthKm: 40, stocking: 1, stemsPerHa: 400 }] },
      horizonYears: 30,
      numerics: { cellM: 0.5, stepYears: 0.01 },
    });
  const waitRunning = async (a: Awaited<ReturnType<typeof app>>, id: string) => {
    for (let i = 0; i < 400; i++) {
      const s = (await a.inject(`/api/evaluations/${id}`)).json();
      if (s.status === 'running') return;
      if (s.status !== 'queued') throw new Error(`did not start: ${JSON.stringify(s)}`);
      await new Promise((r) => setTimeout(r, 25));
    }
    throw new Error('never started');
  };
  const waitFinished = async (a: Awaited<ReturnType<typeof app>>, id: string) => {
    for (;;) {
      const s = (await a.inject(`/api/evaluations/${id}`)).json();
      if (s.finished) return s;
      await new Promise((r) => setTimeout(r, 25));
    }
  };

  it('Cancel acts within about a second', async () => {
    const a = await app(newDir(), { limits: { maxCells: 100_000 } });
    try {
      const posted = await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: bigRaw() } });
      expect(posted.statusCode, posted.body).toBe(202);
      const id = posted.json().id as string;
      await waitRunning(a, id);
      await new Promise((r) => setTimeout(r, 700));
      const t0 = Date.now();
      await a.inject({ method: 'POST', url: `/api/evaluations/${id}/cancel` });
      const s = await waitFinished(a, id);
      expect(s.status).toBe('cancelled');
      expect(Date.now() - t0).toBeLessThan(1_500);
    } finally {
      await a.close();
    }
  });

  it('the wall-time limit stops within about a second of the limit and names the cells', async () => {
    const a = await app(newDir(), { limits: { maxCells: 100_000, wallSeconds: 2 } });
    try {
      const id = (await a.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: bigRaw() } })).json().id as string;
      await waitRunning(a, id);
      const t0 = Date.now();
      const s = await waitFinished(a, id);
      expect(s.status).toBe('failed');
      expect(Date.now() - t0).toBeLessThan(4_000); // 2 s limit + stop; generous for the shared machine
      expect(s.message).toMatch(/^Stopped after 2 s/);
      expect(s.problems[0].path).toBe('numerics.cellM');
    } finally {
      await a.close();
    }
  });
});

describe('run page status texts', () => {
  const base: JobView = {
    id: 'x', status: 'queued', fraction: 0, stage: 'waiting for a free worker', title: 't', scenarioRef: null, createdAt: '', resultId: null,
    problems: [], message: '', resumed: 0, ahead: 0, secondsLeft: null, where: 'this machine, 2 worker threads', trouble: null,
  };
  it('says "Starting" when nothing runs ahead, and how many are ahead otherwise (regression: always "Waiting for a free worker")', () => {
    expect(statusText(base)).toBe('Starting');
    expect(statusText({ ...base, ahead: 2 })).toBe('Waiting for a free worker (2 evaluations ahead)');
  });
  it('a cancelled run keeps the share it reached (regression: the bar showed 100 %) and never says "done" while running', () => {
    const p = jobPayload({ ...base, status: 'cancelled', fraction: 0.3, stage: 'cancelled', message: 'Cancelled at 30 %; nothing was saved.' });
    expect(p.fraction).toBe(0.3);
    expect(p.percentText).toBe('30 %');
    expect(p.statusText).toBe('Cancelled');
  });
  it('shows the time left while running and where the work runs', () => {
    const p = jobPayload({ ...base, status: 'running', fraction: 0.5, stage: 'ensemble: 6 of 12 draws', secondsLeft: 130 });
    expect(p.timeLeftText).toBe('about 3 min left');
    expect(p.where).toBe('this machine, 2 worker threads');
    expect(timeLeftText(5)).toBe('a few seconds left');
    expect(timeLeftText(42)).toBe('about 50 s left');
  });
});
