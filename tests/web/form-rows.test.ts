/**
 * Form posts cost work linear in their size and are capped (issue: a 300 KB post with 9 999 row keys
 * blocked the event loop ~50 s because the row buttons walked the whole form once per row). Regression
 * tests; the bounds on time are hang guards (old: 24–52 s), not speed targets.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { buildTestApp, FORM_HEADERS, type TestApp } from '../helpers/build-app.ts';
import { applyRowAction, formStateFromBody, FormTooLargeError, MAX_FORM_INPUTS, rowIndices, scenarioToForm, type FormState } from '../../server/web/form-state.ts';

const quick = () => JSON.parse(readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8')) as Record<string, unknown>;

/** A form with n segment rows of two inputs each (what the attack posted), as text. */
function manyRows(n: number): FormState {
  const state: FormState = {};
  for (let i = 0; i < n; i++) {
    state[`transect.segments[${i}].habitat`] = 'host-forest';
    state[`transect.segments[${i}].lengthKm`] = '1';
  }
  return state;
}

describe('row buttons are linear in the form size', () => {
  it('9 999 rows are moved and renumbered in well under a second per call (was ~50 s)', () => {
    const state = manyRows(9_999);
    const t0 = performance.now();
    const next = applyRowAction(state, { kind: 'down', group: 'segments', index: 0 });
    const ms = performance.now() - t0;
    expect(ms).toBeLessThan(2_000);
    expect(next['transect.segments[1].lengthKm']).toBe('1');
    expect(rowIndices(next, 'transect.segments')).toHaveLength(9_999);
  });

  it('keeps the other inputs and the row order exactly (remove, up, down, add)', () => {
    const state: FormState = { title: 'T', 'sites[0].name': 'a', 'sites[0].atKm': '1', 'sites[3].name': 'b', 'sites[3].atKm': '2', 'sites[7].name': 'c' };
    expect(applyRowAction(state, { kind: 'remove', group: 'sites', index: 3 })).toEqual({ title: 'T', 'sites[0].name': 'a', 'sites[0].atKm': '1', 'sites[1].name': 'c' });
    expect(applyRowAction(state, { kind: 'up', group: 'sites', index: 7 })).toMatchObject({ 'sites[1].name': 'c', 'sites[2].name': 'b', 'sites[2].atKm': '2' });
    expect(applyRowAction(state, { kind: 'down', group: 'sites', index: 0 })).toMatchObject({ 'sites[0].name': 'b', 'sites[1].name': 'a', 'sites[1].atKm': '1' });
    expect(rowIndices(applyRowAction(state, { kind: 'add', group: 'sites' }), 'sites')).toEqual([0, 1, 2, 3]);
  });
});

describe('form posts are capped with a named error', () => {
  it('the largest form the page makes (500 segments with every distribution part) is within the input limit', () => {
    const s = quick();
    const seg = { habitat: 'host-forest', lengthKm: 1, stocking: { dist: 'triangular', min: 0.1, mode: 0.5, max: 1 }, stemsPerHa: { dist: 'uniform', min: 100, max: 200 } };
    (s.transect as Record<string, unknown>).segments = Array.from({ length: 500 }, () => seg);
    const state = scenarioToForm(s);
    const n = Object.keys(state).length;
    expect(n).toBeLessThan(MAX_FORM_INPUTS);
    expect(() => formStateFromBody(state)).not.toThrow();
  });

  it('more inputs than any form has, or more rows than a table allows, are refused naming the limit', () => {
    const tooMany: Record<string, string> = {};
    for (let i = 0; i <= MAX_FORM_INPUTS; i++) tooMany[`x${i}`] = '';
    expect(() => formStateFromBody(tooMany)).toThrow(FormTooLargeError);
    try {
      formStateFromBody(manyRows(501));
    } catch (e) {
      expect((e as FormTooLargeError).problems).toEqual([{ path: 'transect.segments', value: '501 rows', message: 'has at most 500 rows in this form; this post was not read' }]);
    }
  });
});

describe('form routes (app.inject)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await buildTestApp({ formPerMinute: 5 });
  });
  afterAll(async () => {
    await t.close();
  });

  it('the 300 KB post of 9 999 row keys answers 413 at once, and the server keeps answering (regression: 49–52 s)', async () => {
    const payload = new URLSearchParams({ ...manyRows(9_999), _action: 'add:segments' }).toString();
    expect(payload.length).toBeGreaterThan(300_000);
    const t0 = performance.now();
    const r = await t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload });
    expect(performance.now() - t0).toBeLessThan(3_000);
    expect(r.statusCode).toBe(413);
    expect(r.body).toContain(`a scenario form has at most ${MAX_FORM_INPUTS} inputs`);
    const rows = await t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload: new URLSearchParams({ ...manyRows(600), _action: 'add:segments' }).toString() });
    expect(rows.statusCode).toBe(413);
    expect(rows.body).toContain('transect.segments');
    expect(rows.body).toContain('has at most 500 rows in this form');
    const padded = new URLSearchParams({ ...manyRows(2_000), ...Object.fromEntries(Array.from({ length: 20_000 }, (_, i) => [`pad${i}`, ''])) }).toString();
    const p = await t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload: padded });
    expect(p.statusCode).toBe(413);
    expect(p.body).toContain(`at most ${MAX_FORM_INPUTS} inputs`);
    expect((await t.app.inject('/scenarios')).statusCode).toBe(200);
  });

  it('form posts are rate limited per client with a 429 naming them', async () => {
    const codes: number[] = [];
    let last = '';
    for (let i = 0; i < 7; i++) {
      const r = await t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload: 'title=x&_action=check', remoteAddress: '10.0.0.9' });
      codes.push(r.statusCode);
      last = r.body;
    }
    expect(codes.slice(-1)[0]).toBe(429);
    expect(last).toContain('Too many form posts from this client: at most 5 per minute');
  });
});
