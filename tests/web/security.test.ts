/**
 * DNS rebinding: a page on a rebinding domain (Host and Origin both its own name) got answers from this
 * server, so it could read, delete and run everything. Only the configured host names are answered
 * (regression tests; common practice for local web servers, no source).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTestApp, FORM_HEADERS, type TestApp } from '../helpers/build-app.ts';
import { hostName, normaliseHost } from '../../server/web/plugins/security.ts';

describe('Host header check', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await buildTestApp({ allowedHosts: ['lab.example', '192.0.2.10'] });
  });
  afterAll(async () => {
    await t.close();
  });
  const evil = { host: 'rebind.evil.example:3201', origin: 'http://rebind.evil.example:3201' };

  it('a rebinding name is refused for reads, deletes and runs (regression: 200 and 303)', async () => {
    const list = await t.app.inject({ method: 'GET', url: '/api/scenarios', headers: evil });
    expect(list.statusCode).toBe(421);
    expect(list.json()).toMatchObject({ error: 'UNKNOWN_HOST' });
    expect(list.json().message).toContain('ALLOWED_HOSTS');
    const saved = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: '{}' });
    expect(saved.statusCode).toBe(400); // reached the route: localhost is allowed
    const del = await t.app.inject({ method: 'POST', url: '/scenarios/1/delete', headers: { ...evil, ...FORM_HEADERS }, payload: '' });
    expect(del.statusCode).toBe(421);
    expect(del.body).toContain('does not answer to the host name');
    const run = await t.app.inject({ method: 'POST', url: '/api/evaluations', headers: { ...evil, 'content-type': 'application/json' }, payload: '{"scenarioRef":"demo-quick-check"}' });
    expect(run.statusCode).toBe(421);
    expect((await t.app.inject({ method: 'GET', url: '/', headers: { host: 'rebind.evil.example' } })).statusCode).toBe(421);
  });

  it('loopback names and the configured names are answered, with any port', async () => {
    for (const host of ['localhost', 'localhost:3000', '127.0.0.1:3000', '[::1]:3000', 'LAB.example:8080', '192.0.2.10', 'lab.example.']) {
      const r = await t.app.inject({ method: 'GET', url: '/api/limits', headers: { host } });
      expect(r.statusCode, host).toBe(200);
    }
    for (const host of ['lab.example.evil', '127.0.0.2', 'user@localhost', 'localhost:99999x']) {
      const r = await t.app.inject({ method: 'GET', url: '/api/limits', headers: { host } });
      expect(r.statusCode, host).toBe(421);
    }
  });

  it('host names are read without port, brackets or a trailing dot', () => {
    expect(hostName('[::1]:3000')).toBe('::1');
    expect(hostName('Example.ORG.:80')).toBe('example.org');
    expect(hostName('a b')).toBeUndefined();
    expect(normaliseHost('::1')).toBe('::1');
    expect(normaliseHost('[::1]')).toBe('::1');
    expect(normaliseHost('lab.example:3000')).toBe('lab.example');
  });
});
