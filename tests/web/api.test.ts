/**
 * The JSON API: scenario CRUD, evaluations (background, cancel, wall-time limit, rate limit), results,
 * reference routes and the generated OpenAPI document; bad input answers 400 with field paths.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { buildTestApp, QUICK_REF, waitForJob, type TestApp } from '../helpers/build-app.ts';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { FIELDS } from '../../server/model/fields.ts';
import { TOOL } from '../../server/version.ts';

const quickRaw = () => JSON.parse(readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8')) as Record<string, any>;
const quick = () => parseScenarioText(JSON.stringify(quickRaw()));

/** A run that takes seconds: fine cells and a short time step (for cancel and the wall-time limit). */
function slowScenario() {
  const s = quickRaw();
  s.horizonYears = 40;
  s.transect.segments[1].lengthKm = 30;
  s.numerics = { cellM: 5, stepYears: 0.0005 };
  return s;
}

let t: TestApp;
beforeAll(async () => {
  t = await buildTestApp();
});
afterAll(async () => {
  await t.close();
});

const json = (method: 'GET' | 'POST' | 'PUT' | 'DELETE', url: string, payload?: unknown) =>
  t.app.inject({ method, url, ...(payload === undefined ? {} : { payload: payload as object }) });

describe('scenarios', () => {
  it('lists demo scenarios', async () => {
    const r = await json('GET', '/api/scenarios');
    expect(r.statusCode).toBe(200);
    expect(r.json().scenarios).toContainEqual({ ref: QUICK_REF, kind: 'demo', title: quick().title });
  });

  it('create, read, update and delete a saved scenario', async () => {
    const created = await json('POST', '/api/scenarios', quickRaw());
    expect(created.statusCode).toBe(201);
    const { ref } = created.json();
    expect(created.headers.location).toBe(`/api/scenarios/${ref}`);
    expect(created.json().scenario).toEqual(quick());
    const read = await json('GET', `/api/scenarios/${ref}`);
    expect(read.json()).toMatchObject({ ref, kind: 'saved', readOnly: false });
    const changed = { ...quickRaw(), title: 'Changed by a script' };
    const put = await json('PUT', `/api/scenarios/${ref}`, changed);
    expect(put.statusCode).toBe(200);
    expect(put.json().scenario.title).toBe('Changed by a script');
    expect((await json('DELETE', `/api/scenarios/${ref}`)).statusCode).toBe(204);
    expect((await json('GET', `/api/scenarios/${ref}`)).statusCode).toBe(404);
    expect((await json('DELETE', `/api/scenarios/${ref}`)).statusCode).toBe(404);
  });

  it('answers 400 with every problem: field path, value found and allowed range', async () => {
    const bad = quickRaw();
    bad.pest.growth.rate = -1;
    bad.transect.segments[1].stocking = 1.5;
    bad.pest.diffusionHost = { dist: 'uniform', min: 0.5, max: 0.1 };
    bad.colour = 'green';
    const r = await json('POST', '/api/scenarios', bad);
    expect(r.statusCode).toBe(400);
    const body = r.json();
    expect(body.error).toBe('SCENARIO_INVALID');
    expect(body.problems).toEqual(
      expect.arrayContaining([
        { path: 'pest.growth.rate', value: -1, message: 'must be > 0 and ≤ 50 1/yr' },
        { path: 'transect.segments[1].stocking', value: 1.5, message: 'must be ≥ 0 and ≤ 1 of full stocking' },
        { path: 'pest.diffusionHost.max', value: 0.1, message: 'must be greater than min (0.5)' },
        { path: 'colour', value: 'green', message: 'is not a known field (check the spelling)' },
      ]),
    );
    expect(r.body).not.toMatch(/at .*\.ts:\d+/);
  });

  it('answers 400 for a body that is not JSON, and 415 for an unknown content type', async () => {
    const r = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: '{"title": ' });
    expect(r.statusCode).toBe(400);
    expect(r.json().message).toMatch(/JSON/);
    const x = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'text/yaml' }, payload: 'title: x' });
    expect(x.statusCode).toBe(415);
    expect(x.json().error).toBeDefined();
  });

  it('a deeply nested body answers 400 naming the field, never 500 (regression)', async () => {
    const payload = `{"title": "x", "deep": ${'['.repeat(5000)}1${']'.repeat(5000)}}`;
    const r = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload });
    expect(r.statusCode).toBe(400);
    expect(r.json().problems).toEqual([expect.objectContaining({ path: '', message: expect.stringMatching(/^is not valid JSON at line 1, column \d+: the text is nested more than 64 levels deep/) })]);
    const e = await t.app.inject({ method: 'POST', url: '/api/evaluations', headers: { 'content-type': 'application/json' }, payload: `{"scenarioRef": ${'['.repeat(5000)}${']'.repeat(5000)}}` });
    expect(e.statusCode).toBe(400);
    expect(e.json().problems[0].message).toMatch(/nested more than 64 levels deep/);
    // Within the depth limit, the schema names the field.
    const shallow = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: `{"title": "x", "deep": ${'['.repeat(40)}1${']'.repeat(40)}}` });
    expect(shallow.statusCode).toBe(400);
    expect(shallow.json().problems).toEqual(expect.arrayContaining([expect.objectContaining({ path: 'deep', message: 'is not a known field (check the spelling)' })]));
  });

  it('a bad result-list limit names the value and the allowed range (regression)', async () => {
    for (const limit of ['abc', '0', '2.5', '1e9']) {
      const r = await t.app.inject(`/api/results?limit=${limit}`);
      expect(r.statusCode, limit).toBe(400);
      expect(r.json().problems, limit).toEqual([{ path: 'query.limit', value: limit, message: 'must be a whole number from 1 to 500' }]);
    }
  });

  it('a number too large for a double is refused by name, never read as Infinity or null (regression)', async () => {
    const payload = JSON.stringify(quickRaw()).replace(/"horizonYears":\s*[0-9.]+/, '"horizonYears": 1e309');
    const r = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload });
    expect(r.statusCode).toBe(400);
    expect(r.json().problems).toEqual([{ path: 'horizonYears', value: '1e309', message: expect.stringMatching(/^is too large to be a number \(line 1, column \d+\)/) }]);
  });

  it('demo scenarios are read-only (409)', async () => {
    expect((await json('PUT', `/api/scenarios/${QUICK_REF}`, quickRaw())).statusCode).toBe(409);
    expect((await json('DELETE', `/api/scenarios/${QUICK_REF}`)).statusCode).toBe(409);
  });
});

describe('evaluations and results', () => {
  it('evaluates a stored scenario in the background and stores the result with its exact scenario and version', async () => {
    const r = await json('POST', '/api/evaluations', { scenarioRef: QUICK_REF });
    expect(r.statusCode).toBe(202);
    const job = r.json();
    expect(r.headers.location).toBe(`/api/evaluations/${job.id}`);
    expect(['queued', 'running', 'done']).toContain(job.status);
    const done = await waitForJob(t.app, job.id);
    expect(done).toMatchObject({ status: 'done', finished: true, fraction: 1 });
    const result = await json('GET', `/api/results/${done.resultId}`);
    expect(result.statusCode).toBe(200);
    const body = result.json();
    expect(body).toMatchObject({ scenarioRef: QUICK_REF, toolName: TOOL.name, toolVersion: TOOL.version });
    expect(body.scenario).toEqual(quick());
    expect(body.document.title).toBe(quick().title);
    expect(body.document.options).toHaveLength(1);
    const list = await json('GET', `/api/results?scenarioRef=${QUICK_REF}`);
    expect(list.json().results.map((x: { id: string }) => x.id)).toContain(done.resultId);
    expect((await json('DELETE', `/api/results/${done.resultId}`)).statusCode).toBe(204);
    expect((await json('GET', `/api/results/${done.resultId}`)).statusCode).toBe(404);
  });

  it('evaluates a posted scenario without storing it as a scenario', async () => {
    const r = await json('POST', '/api/evaluations', { scenario: quickRaw() });
    expect(r.statusCode).toBe(202);
    const done = await waitForJob(t.app, r.json().id);
    const body = (await json('GET', `/api/results/${done.resultId}`)).json();
    expect(body.scenarioRef).toBeNull();
    expect(body.scenario).toEqual(quick());
  });

  it('bad evaluation requests answer 400 with paths', async () => {
    const both = await json('POST', '/api/evaluations', { scenarioRef: QUICK_REF, scenario: quickRaw() });
    expect(both.statusCode).toBe(400);
    expect(both.json().problems[0].message).toMatch(/exactly one of/);
    const bad = quickRaw();
    bad.horizonYears = 'soon';
    const r = await json('POST', '/api/evaluations', { scenario: bad });
    expect(r.statusCode).toBe(400);
    expect(r.json().problems).toContainEqual({ path: 'scenario.horizonYears', value: 'soon', message: 'must be > 0 and ≤ 500 yr (a number)' });
    // A server limit (horizon above this server's 200 years) names the path from the body's root too.
    const long = quickRaw();
    long.horizonYears = 400;
    const limited = await json('POST', '/api/evaluations', { scenario: long });
    expect(limited.statusCode).toBe(400);
    expect(limited.json().problems[0]).toMatchObject({ path: 'scenario.horizonYears', value: 400 });
    const unknown = await json('POST', '/api/evaluations', { scenarioRef: 'demo-none' });
    expect(unknown.statusCode).toBe(404);
    const q = await json('GET', '/api/results?limit=0');
    expect(q.statusCode).toBe(400);
    expect(q.json().problems[0].path).toBe('query.limit');
  });

  it('unknown evaluations and results are 404 JSON', async () => {
    for (const url of ['/api/evaluations/x', '/api/results/x', '/api/nothing-here']) {
      const r = await json('GET', url);
      expect(r.statusCode, url).toBe(404);
      expect(r.headers['content-type']).toMatch(/application\/json/);
      expect(r.json().error).toBe('NOT_FOUND');
    }
    expect((await json('POST', '/api/evaluations/x/cancel')).statusCode).toBe(404);
  });
});

describe('a full queue', () => {
  it('answers 503 with a Retry-After (the server is busy; the request itself is fine), JSON for the API and a page for forms (regression: was 400)', async () => {
    const s = await buildTestApp({ limits: { maxQueued: 1, wallSeconds: 20 } });
    try {
      const ids: string[] = [];
      for (let i = 0; i < 2; i++) {
        const r = await s.app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowScenario() } });
        expect(r.statusCode).toBe(202);
        ids.push(r.json().id);
        // The first one leaves the queue for the only worker before the second is queued.
        for (let k = 0; i === 0 && k < 100 && (await s.app.inject(`/api/evaluations/${ids[0]}`)).json().status === 'queued'; k++) await new Promise((res) => setTimeout(res, 50));
      }
      const full = await s.app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowScenario() } });
      expect(full.statusCode).toBe(503);
      expect(full.headers['retry-after']).toBeDefined();
      expect(full.json().problems[0]).toMatchObject({ path: 'evaluations', message: expect.stringMatching(/queues at most 1 evaluations/) });
      const page = await s.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/run` });
      expect(page.statusCode).toBe(503);
      expect(page.headers['content-type']).toMatch(/text\/html/);
      expect(page.body).toContain('queues at most 1 evaluations');
      for (const id of ids) await s.app.inject({ method: 'POST', url: `/api/evaluations/${id}/cancel` });
      for (const id of ids) await waitForJob(s.app, id);
    } finally {
      await s.close();
    }
  });
});

describe('cancel and wall-time limit', () => {
  let s: TestApp;
  beforeAll(async () => {
    s = await buildTestApp({ limits: { wallSeconds: 1.5 } });
  });
  afterAll(async () => {
    await s.close();
  });

  it('a run can be cancelled; nothing is stored', async () => {
    const r = await s.app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowScenario() } });
    expect(r.statusCode).toBe(202);
    const id = r.json().id;
    for (let i = 0; i < 100 && (await s.app.inject(`/api/evaluations/${id}`)).json().status === 'queued'; i++) await new Promise((res) => setTimeout(res, 50));
    const c = await s.app.inject({ method: 'POST', url: `/runs/${id}/cancel` });
    expect(c.statusCode).toBe(303);
    const done = await waitForJob(s.app, id);
    expect(done.status).toBe('cancelled');
    expect(done.resultId).toBeNull();
    expect((await s.app.inject(`/runs/${id}`)).body).toContain('Cancelled');
  });

  it('the API cancels too, and its event stream ends with the final state', async () => {
    const r = await s.app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowScenario() } });
    const id = r.json().id;
    const c = await s.app.inject({ method: 'POST', url: `/api/evaluations/${id}/cancel` });
    expect(c.statusCode).toBe(202);
    expect(['cancelling', 'cancelled']).toContain(c.json().status);
    const events = await s.app.inject({ method: 'GET', url: `/api/evaluations/${id}/events`, headers: { accept: 'text/event-stream' } });
    expect(events.headers['content-type']).toMatch(/text\/event-stream/);
    const last = events.body.trim().split(/\n\n+/).at(-1)!;
    expect(last).toContain('event: end');
    expect(JSON.parse(last.split('data: ')[1])).toMatchObject({ status: 'cancelled', finished: true, resultUrl: null });
    expect((await s.app.inject({ method: 'GET', url: '/api/evaluations/nope/events', headers: { accept: 'text/event-stream' } })).statusCode).toBe(404);
  });

  it('a run longer than the wall-time limit is stopped with a clear message', async () => {
    const r = await s.app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: slowScenario() } });
    const done = await waitForJob(s.app, r.json().id);
    expect(done.status).toBe('failed');
    expect(done.message).toMatch(/Stopped after 1.5 s, the longest time this server spends on one evaluation/);
    // The time step set in the scenario (0.0005 yr: 80 000 steps per run) is what makes it long, and is named.
    const p = (done.problems as { path: string; message: string }[])[0];
    expect(p.path).toBe('numerics.stepYears');
    expect(p.message).toContain('80000 steps per run');
  });
});

describe('rate limit', () => {
  let s: TestApp;
  beforeAll(async () => {
    s = await buildTestApp({ computePerMinute: 2 });
  });
  afterAll(async () => {
    await s.close();
  });

  it('compute routes are rate limited (429, JSON for the API, a page for forms)', async () => {
    const api = [];
    for (let k = 0; k < 3; k++) api.push(await s.app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenarioRef: QUICK_REF } }));
    expect(api.map((r) => r.statusCode)).toEqual([202, 202, 429]);
    expect(api[2].json()).toMatchObject({ error: 'RATE_LIMITED' });
    expect(api[2].json().message).toMatch(/at most 2 per minute/);
    const statuses: number[] = [];
    for (let k = 0; k < 3; k++) statuses.push((await s.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/run` })).statusCode);
    expect(statuses).toEqual([303, 303, 429]);
    const page = await s.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/run` });
    expect(page.statusCode).toBe(429);
    expect(page.headers['content-type']).toMatch(/text\/html/);
    expect(page.body).toContain('Too many evaluations');
    // Reading is not limited.
    for (let k = 0; k < 5; k++) expect((await s.app.inject('/api/scenarios')).statusCode).toBe(200);
  });
});

describe('reference and OpenAPI', () => {
  it('fields and limits', async () => {
    const f = (await json('GET', '/api/fields')).json().fields as { key: string; unit: string; allowed: string; source: string }[];
    expect(f.map((x) => x.key)).toEqual(Object.keys(FIELDS));
    expect(f.find((x) => x.key === 'diffusionHost')).toMatchObject({ unit: 'km²/yr', allowed: '> 0 and ≤ 1000 km²/yr' });
    expect((await json('GET', '/api/limits')).json()).toMatchObject({ maxOptions: 8, maxHorizonYears: 200 });
  });

  it('the OpenAPI document is generated from the zod schemas', async () => {
    const r = await json('GET', '/api/openapi.json');
    expect(r.statusCode).toBe(200);
    const doc = r.json();
    expect(doc.openapi).toBe('3.0.3');
    expect(doc.info.version).toBe(TOOL.version);
    expect(Object.keys(doc.paths)).toEqual(
      expect.arrayContaining(['/api/scenarios', '/api/scenarios/{ref}', '/api/evaluations', '/api/evaluations/{id}', '/api/results', '/api/results/{id}', '/api/fields']),
    );
    expect(Object.keys(doc.paths).some((p: string) => !p.startsWith('/api/'))).toBe(false);
    const body = doc.paths['/api/scenarios'].post.requestBody.content['application/json'].schema;
    // The scenario schema's own ranges appear in the document.
    expect(body.properties.horizonYears).toMatchObject({ type: 'number', maximum: 500 });
    expect(body.required).toEqual(expect.arrayContaining(['title', 'pest', 'transect', 'infestation', 'horizonYears']));
    expect(JSON.stringify(body.properties.pest.properties.diffusionHost)).toContain('triangular');
  });
});
