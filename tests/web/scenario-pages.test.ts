/**
 * Scenario pages through app.inject: lists, the form (errors beside fields, typed text kept, row
 * buttons), saving, the JSON editor, upload, download, duplicate and delete — including bad input.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { scenarioToForm } from '../../server/web/form-state.ts';
import { parseScenarioText } from '../../server/model/scenario.ts';

const quickText = readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8');
const quick = () => parseScenarioText(quickText);

let t: TestApp;
beforeAll(async () => {
  t = await buildTestApp();
});
afterAll(async () => {
  await t.close();
});

const get = (url: string) => t.app.inject({ method: 'GET', url });
const postForm = (url: string, fields: Record<string, string>) => t.app.inject({ method: 'POST', url, headers: FORM_HEADERS, payload: formBody(fields) });

/** Text of the first element with this id (for checking what sits beside an input). */
function around(html: string, id: string, chars = 1500): string {
  const at = html.indexOf(`id="${id}"`);
  expect(at, `element #${id} on the page`).toBeGreaterThan(-1);
  return html.slice(Math.max(0, at - 200), at + chars);
}

describe('lists and overview', () => {
  it('the home page lists the demo scenarios with run buttons', async () => {
    const r = await get('/');
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toMatch(/text\/html/);
    expect(r.body).toContain('Ossenvale test strip');
    expect(r.body).toContain(`action="/scenarios/${QUICK_REF}/run"`);
    expect((await get('/scenarios')).statusCode).toBe(200);
  });

  it('the overview shows the layout, pest table with units and default sources, and actions', async () => {
    const r = await get(`/scenarios/${QUICK_REF}`);
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('Wendle stand');
    expect(r.body).toContain('0.2 km²/yr');
    expect(r.body).toContain('Fisher 1937');
    expect(r.body).toContain('class="strip-bar"');
    expect(r.body).toContain('illustrative values');
    expect(r.body).not.toContain('Delete…');
  });

  it('an unknown scenario is a 404 page, never a file lookup', async () => {
    for (const ref of ['nope', '..%2F..%2Fpackage.json', 'demo-..', '0', '99999']) {
      const r = await get(`/scenarios/${ref}`);
      expect(r.statusCode, ref).toBe(404);
      expect(r.body).toContain('was not found');
    }
  });

  it('the field guide and API pages render', async () => {
    const fields = await get('/fields');
    expect(fields.statusCode).toBe(200);
    expect(fields.body).toContain('Movement in host forest');
    expect(fields.body).toContain('km²/yr');
    expect(fields.body).toContain('regulator');
    const api = await get('/api');
    expect(api.statusCode).toBe(200);
    expect(api.body).toContain('/api/evaluations');
  });
});

describe('the scenario form', () => {
  it('a new scenario starts from the documented defaults', async () => {
    const r = await get('/scenarios/new');
    expect(r.statusCode).toBe(200);
    expect(around(r.body, 'f-pest-diffusionHost')).toContain('value="0.5"');
    expect(r.body).toContain('Default: 0.5 km²/yr');
    expect(r.body).toContain('<script src="/assets/scenario-form.js" defer>');
  });

  it('editing a demo says a copy will be saved', async () => {
    const r = await get(`/scenarios/${QUICK_REF}/edit`);
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('saving creates your own copy');
    expect(around(r.body, 'f-barrier-options-0-widthM')).toContain('value="300"');
  });

  it('bad values answer 400 with each problem beside its input and the typed text kept', async () => {
    const fields = { ...scenarioToForm(quick()), 'pest.growth.rate': 'quick', 'barrier.options[0].widthM': '-20', _action: 'save' };
    const r = await postForm(`/scenarios/${QUICK_REF}/edit`, fields);
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('Please correct these before continuing');
    const rate = around(r.body, 'f-pest-growth-rate');
    expect(rate).toContain('value="quick"');
    expect(rate).toContain('aria-invalid="true"');
    expect(rate).toMatch(/must be &gt; 0 and ≤ 50 1\/yr/);
    const width = around(r.body, 'f-barrier-options-0-widthM', 600);
    expect(width).toContain('value="-20"');
    expect(width).toMatch(/must be ≥ 1 and ≤ 100000 m/);
    expect(r.body).toContain('href="#f-pest-growth-rate"');
    // Nothing was saved.
    expect((await t.app.inject('/api/scenarios')).json().scenarios.filter((s: { kind: string }) => s.kind === 'saved')).toHaveLength(0);
  });

  it('Check validates without saving', async () => {
    const r = await postForm(`/scenarios/${QUICK_REF}/edit`, { ...scenarioToForm(quick()), _action: 'check' });
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('No problems found');
  });

  it('row buttons add, move and remove segments without saving', async () => {
    const base = { ...scenarioToForm(quick()) };
    const added = await postForm('/scenarios/new', { ...base, _action: 'add:segments' });
    expect(added.statusCode).toBe(200);
    expect(added.body).toContain('name="transect.segments[2].lengthKm"');
    expect(around(added.body, 'f-transect-segments-2-lengthKm', 300)).toContain('autofocus');
    const moved = await postForm('/scenarios/new', { ...base, _action: 'down:segments:0' });
    expect(around(moved.body, 'f-transect-segments-0-name', 200)).toContain('value="Orrin stand"');
    const removed = await postForm('/scenarios/new', { ...base, _action: 'remove:segments:1' });
    expect(removed.body).not.toContain('name="transect.segments[1].lengthKm"');
    expect(removed.body).toContain('Wendle stand');
  });

  it('saving a demo creates a saved copy and redirects to it; saving again updates it', async () => {
    const fields = { ...scenarioToForm(quick()), title: 'My strip', _action: 'save' };
    const r = await postForm(`/scenarios/${QUICK_REF}/edit`, fields);
    expect(r.statusCode).toBe(303);
    const loc = r.headers.location as string;
    expect(loc).toMatch(/^\/scenarios\/\d+\?saved=1$/);
    const ref = loc.split('/')[2].split('?')[0];
    const page = await get(loc);
    expect(page.body).toContain('My strip');
    expect(page.body).toContain('Saved.');
    const again = await postForm(`/scenarios/${ref}/edit`, { ...fields, title: 'My strip, renamed' });
    expect(again.headers.location).toBe(`/scenarios/${ref}?saved=1`);
    const api = (await t.app.inject(`/api/scenarios/${ref}`)).json();
    expect(api.scenario.title).toBe('My strip, renamed');
    // The demo itself is unchanged.
    expect((await t.app.inject(`/api/scenarios/${QUICK_REF}`)).json().scenario.title).toBe(quick().title);
  });
});

describe('JSON editor, upload and download', () => {
  it('the JSON editor lists problems by path and keeps the text', async () => {
    const text = quickText.replace('"horizonYears": 6', '"horizonYears": 0');
    const r = await postForm(`/scenarios/${QUICK_REF}/json`, { text, _action: 'save' });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('<code>horizonYears</code>');
    expect(r.body).toContain('must be &gt; 0 and ≤ 500 yr');
    expect(r.body).toContain('&quot;horizonYears&quot;: 0');
    const bad = await postForm(`/scenarios/${QUICK_REF}/json`, { text: '{ not json', _action: 'check' });
    expect(bad.statusCode).toBe(400);
    expect(bad.body).toContain('is not valid JSON');
    const ok = await postForm(`/scenarios/${QUICK_REF}/json`, { text: quickText, _action: 'save' });
    expect(ok.statusCode).toBe(303);
  });

  it('uploads a scenario file (multipart) and rejects a bad one with its problems', async () => {
    const boundary = '----barrier-test';
    const multipart = (name: string, content: string) =>
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${name}"\r\nContent-Type: application/json\r\n\r\n${content}\r\n--${boundary}--\r\n`;
    const headers = { 'content-type': `multipart/form-data; boundary=${boundary}` };
    const ok = await t.app.inject({ method: 'POST', url: '/scenarios/upload', headers, payload: multipart('s.json', quickText) });
    expect(ok.statusCode).toBe(303);
    expect(ok.headers.location).toMatch(/^\/scenarios\/\d+\?saved=1$/);
    const bad = await t.app.inject({ method: 'POST', url: '/scenarios/upload', headers, payload: multipart('s.json', quickText.replace('"lengthKm": 3,', '"lengthKm": "three",')) });
    expect(bad.statusCode).toBe(400);
    expect(bad.body).toContain('The file could not be loaded');
    expect(bad.body).toContain('transect.segments[0].lengthKm');
    const none = await postForm('/scenarios/upload', {});
    expect(none.statusCode).toBe(400);
    expect(none.body).toContain('choose a scenario file');
  });

  it('upload and JSON editor problems name the value found, not only the path and range (regression)', async () => {
    // The form keeps the typed text beside each field; an uploaded file's content is not shown anywhere, so
    // the problem itself must say what was found.
    const boundary = '----barrier-test';
    const headers = { 'content-type': `multipart/form-data; boundary=${boundary}` };
    const content = quickText.replace('"lengthKm": 3,', '"lengthKm": "three",');
    const payload = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="s.json"\r\nContent-Type: application/json\r\n\r\n${content}\r\n--${boundary}--\r\n`;
    const bad = await t.app.inject({ method: 'POST', url: '/scenarios/upload', headers, payload });
    expect(bad.statusCode).toBe(400);
    expect(bad.body).toMatch(/<code>transect\.segments\[0\]\.lengthKm<\/code>[^<]*found &quot;three&quot;/);
    const json = await postForm(`/scenarios/${QUICK_REF}/json`, { text: quickText.replace('"horizonYears": 6', '"horizonYears": 900'), _action: 'check' });
    expect(json.statusCode).toBe(400);
    expect(json.body).toMatch(/<code>horizonYears<\/code>[^<]*found 900[^<]*must be &gt; 0 and ≤ 500 yr/);
    // The path is printed once (it was printed twice when a problem had no label: "horizonYears horizonYears").
    expect(json.body).not.toContain('<strong>horizonYears</strong>');
  });

  it('a file over the upload limit answers 413 on the scenario list, naming the file and the limit (regression)', async () => {
    const boundary = '----barrier-test';
    const headers = { 'content-type': `multipart/form-data; boundary=${boundary}` };
    const big = quickText.replace('"horizonYears": 6', `"horizonYears": 6, "notes": "${'x'.repeat(1_010_000)}"`);
    const payload = `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.json"\r\nContent-Type: application/json\r\n\r\n${big}\r\n--${boundary}--\r\n`;
    const r = await t.app.inject({ method: 'POST', url: '/scenarios/upload', headers, payload });
    expect(r.statusCode).toBe(413);
    expect(r.body).toContain('The file could not be loaded');
    expect(r.body).toMatch(/<code>file<\/code>[^<]*found &quot;big\.json&quot;[^<]*larger than 1 MB/);
    expect(r.body).toContain('action="/scenarios/upload"');
  });

  it('downloads a scenario as a file', async () => {
    const r = await get(`/scenarios/${QUICK_REF}/scenario.json`);
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-disposition']).toBe('attachment; filename="quick-check.json"');
    expect(parseScenarioText(r.body)).toEqual(quick());
  });
});

describe('duplicate and delete', () => {
  it('duplicates, confirms, then deletes a saved scenario; demos cannot be deleted', async () => {
    const dup = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/duplicate` });
    expect(dup.statusCode).toBe(303);
    const ref = (dup.headers.location as string).split('/')[2];
    expect(dup.headers.location).toBe(`/scenarios/${ref}/edit`);
    expect((await get(`/scenarios/${ref}`)).body).toContain('Copy of Ossenvale test strip');
    const confirm = await get(`/scenarios/${ref}/delete`);
    expect(confirm.statusCode).toBe(200);
    expect(confirm.body).toContain('This cannot be undone');
    const del = await t.app.inject({ method: 'POST', url: `/scenarios/${ref}/delete` });
    expect(del.statusCode).toBe(303);
    expect((await get(`/scenarios/${ref}`)).statusCode).toBe(404);
    expect((await get(`/scenarios/${QUICK_REF}/delete`)).statusCode).toBe(409);
    expect((await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/delete` })).statusCode).toBe(409);
  });
});
