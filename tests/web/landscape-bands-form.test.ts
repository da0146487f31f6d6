/**
 * The band-options table without JavaScript: "Add a band" and "Remove" post the form and the page comes
 * back with the table changed and every other row as typed; a centre line that does not read as points,
 * or a width out of range, comes back with the field named and marked, and nothing is queued.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { FastifyInstance } from 'fastify';
import { landscapeApp, landscapeFormOf, DEMO_REF } from './landscape-helpers.ts';
import { formBody } from '../helpers/build-app.ts';
import { applyBandAction, rowsToBands } from '../../server/web/landscape-bands-form.ts';

let t: Awaited<ReturnType<typeof landscapeApp>>;
let app: FastifyInstance;
beforeAll(async () => {
  t = await landscapeApp();
  app = t.app;
});
afterAll(async () => t?.close());

const formOf = landscapeFormOf;
const post = (fields: Record<string, string>) =>
  app.inject({ method: 'POST', url: `/landscapes/${DEMO_REF}/bands`, headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: formBody(fields) });

describe('band table without JavaScript', () => {
  it('add a row, edit it, remove another: the page keeps every other row as typed', async () => {
    const first = formOf((await app.inject(`/landscapes/${DEMO_REF}`)).body);
    expect(first.bandCount).toBe('3');
    const added = await post({ ...first, action: 'add' });
    expect(added.statusCode).toBe(200);
    const two = formOf(added.body);
    expect(two.bandCount).toBe('4');
    for (const k of [0, 1, 2]) for (const f of ['name', 'widthM', 'line', 'cover']) expect(two[`band[${k}].${f}`]).toBe(first[`band[${k}].${f}`]);
    two['band[3].name'] = 'My own cut';
    two['band[3].widthM'] = '800';
    two['band[3].line'] = '500000 4016000; 500000 4024000';
    const removed = await post({ ...two, action: 'remove-1' });
    const three = formOf(removed.body);
    expect(three.bandCount).toBe('3');
    expect(three['band[0].name']).toBe(first['band[0].name']);
    expect(three['band[1].name']).toBe(first['band[2].name']);
    expect(three['band[2].name']).toBe('My own cut');
    expect(three['band[2].line']).toBe('500000 4016000; 500000 4024000');
    expect(three['band[2].widthM']).toBe('800');
    expect(removed.body).toContain('Add a band');
  });

  it('a line that is not points, and a width out of range, are named and nothing is queued', async () => {
    const f = formOf((await app.inject(`/landscapes/${DEMO_REF}`)).body);
    const r = await post({ ...f, 'band[1].line': '496600 4017800; north', action: 'run' });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('<code>bands.options[1].line</code>');
    expect(r.body).toMatch(/id="band-1-line"[^>]*aria-invalid="true"/);
    const w = await post({ ...f, 'band[0].widthM': '-5', action: 'run' });
    expect(w.statusCode).toBe(400);
    expect(w.body).toContain('<code>bands.options[0].widthM</code>');
    expect(w.body).toMatch(/≥ 1/);
  });

  it('rows to band options: points read as numbers; actions respect the row limit', () => {
    const { options, problems } = rowsToBands([{ name: 'X', cover: 'clearing', widthM: '600', line: '1 2; 3,4' }]);
    expect(problems).toEqual([]);
    expect(options[0]).toEqual({ name: 'X', cover: 'clearing', widthM: 600, line: [[1, 2], [3, 4]] });
    let rows = applyBandAction([], 'add');
    for (let k = 0; k < 10; k++) rows = applyBandAction(rows, 'add');
    expect(rows.length).toBe(8);
    expect(applyBandAction(rows, 'remove-7').length).toBe(7);
    expect(applyBandAction(rows, 'bogus').length).toBe(8);
  });
});
