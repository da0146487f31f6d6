/**
 * The pest's numbers per habitat class on the landscape page: shown with the field table's labels, units and
 * allowed ranges; a posted number goes into the run's scenario; a number out of range comes back named by
 * the one landscape schema (pest.<field>, its value and the allowed range), marked, with nothing queued; a
 * range from the file is kept, not edited.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { landscapeApp, landscapeFormOf, unescapeHtml, runIdOf, DEMO_REF } from './landscape-helpers.ts';
import { formBody } from '../helpers/build-app.ts';
import { applyPostedPest, pestFieldsets, postedPest } from '../../server/web/landscape-pest-form.ts';
import { FIELDS, describeRange } from '../../server/model/fields.ts';

let t: Awaited<ReturnType<typeof landscapeApp>>;
let app: FastifyInstance;
beforeAll(async () => {
  t = await landscapeApp();
  app = t.app;
});
afterAll(async () => t?.close());

const unescape = unescapeHtml;
const formOf = landscapeFormOf;
const post = (url: string, fields: Record<string, string>) => app.inject({ method: 'POST', url, headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: formBody(fields) });

describe('pest per habitat class on the landscape page', () => {
  it('shows every per-class field with its label, unit, allowed range and the scenario value', async () => {
    const html = (await app.inject(`/landscapes/${DEMO_REF}`)).body;
    const f = formOf(html);
    // The demo pest (scenarios/landscapes/ossenvale-valley.json): movement 1 km²/yr everywhere, mortality 4/yr in the open.
    expect(f['pest.diffusionOpen']).toBe('1');
    expect(f['pest.mortalityOpen']).toBe('4');
    expect(f['pest.edgePreferenceNonHost']).toBe('0.6');
    expect(html).toContain(`${FIELDS.diffusionOpen.label} [${FIELDS.diffusionOpen.unit}]`);
    expect(unescape(html)).toContain(`Allowed ${describeRange(FIELDS.mortalityOpen)}`);
  });

  it('a value out of range comes back named with the allowed range, marked, and nothing is queued', async () => {
    const f = formOf((await app.inject(`/landscapes/${DEMO_REF}`)).body);
    const r = await post(`/landscapes/${DEMO_REF}/bands`, { ...f, 'pest.mortalityOpen': '-3', action: 'run' });
    expect(r.statusCode).toBe(400);
    const body = unescape(r.body);
    expect(body).toMatch(/pest\.mortalityOpen/);
    expect(body).toContain(describeRange(FIELDS.mortalityOpen).replace(/ \/yr$/, ''));
    expect(body).toMatch(/id="pest-mortalityOpen" name="pest.mortalityOpen" value="-3"[^>]*aria-invalid="true"/);
    expect(r.headers.location).toBeUndefined();
  });

  it('"Add a band" keeps the typed pest numbers, and Run puts them into the run\'s scenario', async () => {
    const f = formOf((await app.inject(`/landscapes/${DEMO_REF}`)).body);
    const added = await post(`/landscapes/${DEMO_REF}/bands`, { ...f, 'pest.diffusionOpen': '2.5', action: 'add' });
    expect(formOf(added.body)['pest.diffusionOpen']).toBe('2.5');
    const run = await post(`/landscapes/${DEMO_REF}/bands`, { ...f, 'pest.diffusionOpen': '2.5', action: 'run' });
    expect(run.statusCode, run.body.slice(0, 400)).toBe(303);
    const id = runIdOf(run.headers.location);
    const again = formOf((await app.inject(`/landscape-runs/${id}/bands`)).body);
    expect(again['pest.diffusionOpen']).toBe('2.5');
    await app.inject({ method: 'POST', url: `/landscape-runs/${id}/cancel` });
  });

  it('writes numbers, leaves out empty fields, keeps other text for the schema, and keeps ranges from the file', () => {
    const range = { dist: 'lognormal', median: 0.5, spread: 2 };
    const pest = { diffusionHost: range, diffusionOpen: 1, mortalityNonHost: 1.5 };
    const out = applyPostedPest(pest, postedPest({ 'pest.diffusionHost': '9', 'pest.diffusionOpen': '1e-1', 'pest.mortalityNonHost': ' ', 'pest.mortalityOpen': 'fast', other: 'x' }));
    expect(out).toEqual({ diffusionHost: range, diffusionOpen: 0.1, mortalityOpen: 'fast' });
    const host = pestFieldsets(pest, null, [{ path: 'pest.diffusionOpen', value: 1, message: 'x' }])[0].fields[0];
    expect(host.range).toBe('log-normal, median 0.5 km²/yr, spread ×2');
    expect(pestFieldsets(pest, null, [{ path: 'pest.diffusionOpen', value: 1, message: 'x' }])[1].fields[0].bad).toBe(true);
  });
});
