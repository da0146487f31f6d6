/**
 * App-wide behaviour: security headers, body-size limit, the one error handler (no stack traces), the
 * data folder created on first start, static assets, and pages that carry no inline script.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { buildApp } from '../../server/app.ts';
import { DATABASE_FILE } from '../../server/web/store.ts';
import { FIXTURE_SCENARIOS_DIR, QUICK_REF } from '../helpers/build-app.ts';

let app: FastifyInstance;
let root: string;
let dataDir: string;

beforeAll(async () => {
  root = mkdtempSync(join(tmpdir(), 'barrier-app-'));
  dataDir = join(root, 'not', 'there', 'yet');
  app = await buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, dataDir, workerThreads: 1, bodyLimit: 50_000 });
  // Routes that fail on purpose, to check what the error handler lets out.
  app.get('/boom', async () => {
    throw new Error('secret detail at /home/someone/server.ts:12');
  });
  app.get('/api/boom', async () => {
    throw new TypeError('secret detail in the API');
  });
  await app.ready();
});
afterAll(async () => {
  await app.close();
  rmSync(root, { recursive: true, force: true });
});

describe('first start', () => {
  it('creates the data folder and the database file', () => {
    expect(existsSync(join(dataDir, DATABASE_FILE))).toBe(true);
  });
});

describe('security headers', () => {
  it('pages carry a content security policy that allows scripts from this server only', async () => {
    const r = await app.inject('/');
    const csp = String(r.headers['content-security-policy']);
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("script-src-attr 'none'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("form-action 'self'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe/);
    expect(r.headers['x-content-type-options']).toBe('nosniff');
    expect(r.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(r.headers['referrer-policy']).toBe('same-origin');
  });

  it('no page has an inline script or inline event handler (they would be blocked)', async () => {
    for (const url of ['/', `/scenarios/${QUICK_REF}`, `/scenarios/${QUICK_REF}/edit`, '/scenarios/new', '/results', '/fields', '/api']) {
      const html = (await app.inject(url)).body;
      expect(html.match(/<script(?![^>]*\bsrc=)[^>]*>/g), url).toBeNull();
      expect(html.match(/\son[a-z]+="/g), url).toBeNull();
    }
  });
});

describe('requests from other sites', () => {
  it('a form post sent by a page of another site is refused; the app\'s own pages and scripts are not', async () => {
    const url = `/scenarios/${QUICK_REF}/duplicate`;
    const foreign = await app.inject({ method: 'POST', url, headers: { origin: 'https://elsewhere.example', host: 'localhost:80' } });
    expect(foreign.statusCode).toBe(403);
    expect(foreign.body).toContain('came from another site');
    const api = await app.inject({ method: 'DELETE', url: '/api/scenarios/1', headers: { origin: 'null', host: 'localhost:80' } });
    expect(api.statusCode).toBe(403);
    expect(api.json().error).toBe('CROSS_SITE');
    const own = await app.inject({ method: 'POST', url, headers: { origin: 'http://localhost:80', host: 'localhost:80' } });
    expect(own.statusCode).toBe(303);
    const script = await app.inject({ method: 'POST', url });
    expect(script.statusCode).toBe(303);
  });
});

describe('limits and errors', () => {
  it('a body over the size limit answers 413', async () => {
    const big = 'x'.repeat(60_000);
    const api = await app.inject({ method: 'POST', url: '/api/scenarios', payload: { title: big } });
    expect(api.statusCode).toBe(413);
    expect(api.json().error).toBe('FST_ERR_CTP_BODY_TOO_LARGE');
    const form = await app.inject({ method: 'POST', url: '/scenarios/new', headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: `title=${big}` });
    expect(form.statusCode).toBe(413);
    expect(form.headers['content-type']).toMatch(/text\/html/);
  });

  it('an unexpected failure answers 500 with a reference, never the message or a stack trace', async () => {
    const page = await app.inject('/boom');
    expect(page.statusCode).toBe(500);
    expect(page.headers['content-type']).toMatch(/text\/html/);
    expect(page.body).toContain('Something went wrong on our side');
    expect(page.body).not.toContain('secret');
    expect(page.body).not.toMatch(/\.ts:\d+/);
    const api = await app.inject('/api/boom');
    expect(api.statusCode).toBe(500);
    const body = api.json();
    expect(body).toMatchObject({ error: 'INTERNAL', problems: [] });
    expect(body.reference).toMatch(/^[0-9a-f]{8}$/);
    expect(api.body).not.toContain('secret');
    expect(api.body).not.toContain('stack');
  });

  it('a malformed or over-long address answers through the app\'s own error pages (regression)', async () => {
    // Both were answered by the router itself: a bare JSON body without `problems`, even for a page.
    const badPage = await app.inject('/scenarios/%');
    expect(badPage.statusCode).toBe(400);
    expect(badPage.headers['content-type']).toMatch(/text\/html/);
    expect(badPage.body).toContain('not a valid address');
    const badApi = await app.inject('/api/scenarios/%zz');
    expect(badApi.statusCode).toBe(400);
    expect(badApi.json()).toMatchObject({ error: 'BAD_URL', problems: [{ path: 'url' }] });
    const long = `/api/results/${'a'.repeat(200)}`;
    const longApi = await app.inject(long);
    expect(longApi.statusCode).toBe(414);
    expect(longApi.json()).toMatchObject({ error: 'URL_TOO_LONG', problems: [{ path: 'url', message: expect.stringMatching(/at most 80 characters/) }] });
    const longPage = await app.inject(`/scenarios/${'a'.repeat(200)}/edit`);
    expect(longPage.statusCode).toBe(414);
    expect(longPage.headers['content-type']).toMatch(/text\/html/);
  });

  it('the event stream of a job refuses clients that do not accept events', async () => {
    const r = await app.inject({ method: 'GET', url: '/runs/none/events', headers: { accept: 'application/json' } });
    expect(r.statusCode).toBe(406);
  });
});

describe('static assets', () => {
  it('serves the style sheet and the page scripts, and nothing outside the assets folder', async () => {
    for (const f of ['site.css', 'scenario-form.js', 'run-progress.js']) {
      expect((await app.inject(`/assets/${f}`)).statusCode, f).toBe(200);
    }
    for (const f of ['../app.ts', '%2e%2e/app.ts', '..%2F..%2Fpackage.json']) {
      expect((await app.inject(`/assets/${f}`)).statusCode, f).toBe(404);
    }
  });
});
