/**
 * Movement typed as a typical distance moved per year instead of a diffusion coefficient: the root-mean-
 * square displacement of a random walk along a line in time t is √(2·D·t) (Einstein 1905; Berg, Random
 * Walks in Biology, 1993), so d km in one year is D = d²/2 km²/yr. The form converts it, says so, and stores
 * only D (one schema); a log-normal range converts exactly (median d²/2, spread squared); a uniform or
 * triangular range is refused by name rather than reshaped.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { formToScenario, scenarioToForm } from '../../server/web/form-state.ts';

describe('movement as a typical distance per year', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await buildTestApp();
  });
  afterAll(async () => {
    await t.close();
  });
  const form = async () => scenarioToForm((await t.app.inject(`/api/scenarios/${QUICK_REF}`)).json().scenario);
  const post = (fields: Record<string, string>) => t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload: formBody(fields) });

  it('1.5 km a year is read as D = 1.5²/2 = 1.125 km²/yr, shown back, and saved as the rate', async () => {
    const f = await form();
    const read = formToScenario({ ...f, 'pest.diffusionHost': '1.5', 'pest.diffusionHost~as': 'distance' });
    expect((read.input.pest as Record<string, unknown>).diffusionHost).toBe(1.125);
    expect(read.notes[0].message).toBe('a typical distance of 1.5 km a year read as a movement rate of 1.5²/2 = 1.125 km²/yr (D = d²/2)');
    const check = await post({ ...f, 'pest.diffusionHost': '1.5', 'pest.diffusionHost~as': 'distance', _action: 'check' });
    expect(check.statusCode).toBe(200);
    expect(check.body).toContain('Read as: pest.diffusionHost: a typical distance of 1.5 km a year read as a movement rate of 1.5²/2 &#x3D; 1.125 km²/yr');
    const r = await post({ ...f, 'pest.diffusionHost': '1.5', 'pest.diffusionHost~as': 'distance' });
    expect(r.statusCode, r.body.slice(0, 1500)).toBe(303);
    const ref = (r.headers.location as string).split('/')[2].split('?')[0];
    expect((await t.app.inject(`/api/scenarios/${ref}`)).json().scenario.pest.diffusionHost).toBe(1.125);
  });

  it('a log-normal range of distances is a log-normal range of rates (median d²/2, spread squared)', async () => {
    const f = await form();
    const read = formToScenario({ ...f, 'pest.diffusionOpen~as': 'distance', 'pest.diffusionOpen~kind': 'lognormal', 'pest.diffusionOpen~median': '2', 'pest.diffusionOpen~spread': '1.5' });
    expect((read.input.pest as Record<string, unknown>).diffusionOpen).toEqual({ dist: 'lognormal', median: 2, spread: 2.25 });
  });

  it('a uniform range of distances is refused, naming the input, and nothing is saved', async () => {
    const f = await form();
    const r = await post({ ...f, 'pest.diffusionHost~as': 'distance', 'pest.diffusionHost~kind': 'uniform', 'pest.diffusionHost~min': '1', 'pest.diffusionHost~max': '2' });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('a range of distances can be given as log-normal only');
  });

  it('the form offers the choice beside each movement box, with the rate as the default', async () => {
    const page = await t.app.inject(`/scenarios/${QUICK_REF}/edit`);
    expect(page.statusCode).toBe(200);
    for (const f of ['diffusionHost', 'diffusionOpen']) {
      expect(page.body).toMatch(new RegExp(`<select id="[^"]*-as" name="pest\\.${f}~as"[^>]*><option value="" selected>km²/yr \\(movement rate\\)</option><option value="distance">km per year \\(typical distance moved\\)</option>`));
    }
  });
});
