import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { buildTestApp, FIXTURE_SCENARIOS_DIR, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { parseScenarioText, pointScenario } from '../../server/model/scenario.ts';
import { surveyToCsv } from '../../server/model/survey.ts';
import { drawRecords, truthRun } from '../../server/analysis/calibration/synthetic.ts';
import { makeRng } from '../../server/numerics/rng.ts';

const quick = parseScenarioText(readFileSync(`${FIXTURE_SCENARIOS_DIR}quick-check.json`, 'utf8'));
// Invented records from the fixture's own pest (D = 0.2 km²/yr), found with chance 0.7.
const records = drawRecords(
  truthRun(pointScenario(quick), { fromKm: 0, toKm: 0.5, density: 1 }, 2019, { years: [2020, 2021, 2022, 2023, 2024], positionsKm: [0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5] }),
  0.7,
  makeRng(5),
);
const csv = surveyToCsv(records);

describe('fit pages and API', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await buildTestApp();
  });
  afterAll(async () => {
    await t.close();
  });

  it('GET the fit page: a form for the records, linked from the scenario page', async () => {
    const r = await t.app.inject({ url: `/scenarios/${QUICK_REF}/fit` });
    expect(r.statusCode).toBe(200);
    expect(r.body).toMatch(/Fit to survey records/);
    expect(r.body).toMatch(/name="records"/);
    const s = await t.app.inject({ url: `/scenarios/${QUICK_REF}` });
    expect(s.body).toContain(`href="/scenarios/${QUICK_REF}/fit"`);
  });

  it('bad records: 400 with the row and column, the text kept', async () => {
    const bad = 'year,km,detected\n2020,1,yes\n20x1,2,no\n';
    const r = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/fit`, payload: new URLSearchParams({ records: bad }).toString(), headers: { 'content-type': 'application/x-www-form-urlencoded' } });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('rows[3].year');
    expect(r.body).toContain('20x1');
  });

  it('a fit: values, ranges, chart, cautions and the adopt button; adopting saves a new scenario with the provenance', async () => {
    const r = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/fit`, payload: new URLSearchParams({ records: csv, startFrom: '0', startTo: '0.5' }).toString(), headers: { 'content-type': 'application/x-www-form-urlencoded' } });
    expect(r.statusCode).toBe(200);
    expect(r.body).toMatch(/Movement in host forest/);
    expect(r.body).toMatch(/fitted to \d+ detections/);
    expect(r.body).toContain('<svg');
    expect(r.body).toMatch(/regulator/);
    const hidden = /name="scenario" value="([^"]*)"/.exec(r.body)![1].replace(/&quot;/g, '"').replace(/&#x27;/g, "'").replace(/&amp;/g, '&').replace(/&#x3D;/g, '=').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&#x60;/g, '`');
    const a = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/fit/adopt`, payload: new URLSearchParams({ scenario: hidden }).toString(), headers: { 'content-type': 'application/x-www-form-urlencoded' } });
    expect(a.statusCode).toBe(303);
    const ref = a.headers.location!.split('/')[2].split('?')[0];
    const saved = await t.app.inject({ url: `/api/scenarios/${ref}` });
    const sc = saved.json().scenario;
    expect(sc.calibration.sentence).toMatch(/fitted to \d+ detections/);
    expect(sc.pest.diffusionHost.dist).toBe('lognormal');
  }, 60_000);

  it('POST /api/fits: the fit and the adopted scenario; bad records answer 400 naming the record', async () => {
    const r = await t.app.inject({ method: 'POST', url: '/api/fits', payload: { scenarioRef: QUICK_REF, records, start: { fromKm: 0, toKm: 0.5 } } });
    expect(r.statusCode).toBe(200);
    const body = r.json();
    expect(body.fit.parameters[0].path).toBe('pest.diffusionHost');
    expect(body.scenario.calibration.paths).toContain('pest.diffusionHost');
    const off = await t.app.inject({ method: 'POST', url: '/api/fits', payload: { scenarioRef: QUICK_REF, records: [...records.slice(0, 20), { year: 2024, atKm: 9, detected: true }] } });
    expect(off.statusCode).toBe(400);
    expect(off.json().problems).toEqual([{ path: 'records[20].atKm', value: 9, message: 'is off the transect: must be within [0, 6] km' }]);
    const both = await t.app.inject({ method: 'POST', url: '/api/fits', payload: { scenarioRef: QUICK_REF } });
    expect(both.statusCode).toBe(400);
    expect(JSON.stringify(both.json().problems)).toMatch(/exactly one of \\"records\\" or \\"recordsCsv\\"/);
  }, 60_000);
});
