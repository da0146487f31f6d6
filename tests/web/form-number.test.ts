/**
 * Numbers typed into form boxes are read the way the user meant and shown back, or refused naming the field
 * — never silently rescaled (regression: "1,200" typed into a width was read as 1.2 and saved as 1 m).
 * Reading rules: common practice for number entry in forms, no source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { readNumberList, readNumberText, scenarioToForm } from '../../server/web/form-state.ts';

describe('readNumberText', () => {
  it.each([
    ['1200', 'm', 1200, false],
    ['1 200', 'm', 1200, true],
    ['1\u202f200,5', 'm', 1200.5, true],
    ["1'200", 'm', 1200, true],
    ['1,200.5', 'm', 1200.5, true],
    ['12,000,000', 'm', 12_000_000, true],
    ['1.200,5', 'm', 1200.5, true],
    ['1.200.000', 'm', 1_200_000, true],
    ['0,5', '', 0.5, true],
    ['2,75', 'km²/yr', 2.75, true],
    ['1200 m', 'm', 1200, true],
    ['1.2 km', 'm', 1200, true],
    ['300 m', 'km', 0.3, true],
    ['0.5 km2/yr', 'km²/yr', 0.5, true],
    ['3 per year', '1/yr', 3, true],
    ['\u22123', 'km', -3, false],
    ['1e3', '', 1000, false],
    ['1.25', 'km²/yr', 1.25, false],
  ])('%j in a box in %j is %d', (text, unit, value, noted) => {
    const r = readNumberText(text, unit);
    expect(r.problem).toBeUndefined();
    expect(r.value).toBeCloseTo(value as number, 12);
    expect(r.note !== undefined).toBe(noted);
  });

  it.each([
    ['1,200', 'm', /ambiguous: "1,200" may mean 1\.2 or 1200/],
    ['12,500', '', /ambiguous/],
    ['1.200', 'm', /ambiguous: "1\.200" may mean 1200/],
    ['1200 ft', 'm', /has the unit "ft"; this box is in m: type the number only/],
    ['5 %', '', /takes a fraction, not a percentage: type 0\.05/],
    ['12 34', '', /spaces that do not group digits in threes/],
    ['1e-400', '', /too small to be told from 0/],
    ['1e400', '', /too large/],
  ])('%j in a box in %j is refused', (text, unit, message) => {
    const r = readNumberText(text, unit);
    expect(r.problem).toMatch(message);
    expect(r.value).toBe(text);
  });

  it('lists: a comma between digits, or spaces that may group thousands, are refused; ", " and ";" separate', () => {
    expect(readNumberList('300, 600; 1 200', 'm')).toMatchObject({ values: [300, 600, 1200] });
    expect(readNumberList('50 1200 2000', 'm')).toMatchObject({ values: [50, 1200, 2000] });
    expect(readNumberList('300,600', 'm').problem).toMatch(/comma between digits/);
    expect(readNumberList('300 600', 'm').problem).toMatch(/ambiguous/);
    expect(readNumberList('300, 1,200', 'm').problem).toMatch(/comma between digits/);
  });
});

describe('the form (app.inject)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await buildTestApp();
  });
  afterAll(async () => {
    await t.close();
  });
  const form = async () => {
    const r = await t.app.inject(`/api/scenarios/${QUICK_REF}`);
    return scenarioToForm(r.json().scenario);
  };
  const post = (fields: Record<string, string>) => t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload: formBody(fields) });

  it('"1,200" typed into a width is refused beside the field, once, and nothing is saved', async () => {
    const r = await post({ ...(await form()), 'barrier.options[0].widthM': '1,200' });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('value="1,200"');
    expect(r.body).toContain('is ambiguous: &quot;1,200&quot; may mean 1.2 or 1200');
    // One problem for the field, not a second "expected number" beside it.
    expect(r.body.match(/barrier\.options\[0\]\.widthM/g)!.length).toBeLessThan(6);
    expect(r.body).not.toMatch(/expected number/);
    expect((await t.app.inject('/api/scenarios')).json().scenarios.filter((s: { kind: string }) => s.kind === 'saved')).toHaveLength(0);
  });

  it('"1 200 m" is saved as 1200 and shown back on the saved scenario page', async () => {
    const r = await post({ ...(await form()), 'barrier.options[0].widthM': '1 200 m', 'barrier.lengthKm': '1,5' });
    expect(r.statusCode, r.body.slice(0, 2000)).toBe(303);
    const page = await t.app.inject(r.headers.location as string);
    expect(page.body).toContain('Numbers read from what you typed: barrier.lengthKm: 1.5 km; barrier.options[0].widthM: 1200 m.');
    const ref = (r.headers.location as string).split('/')[2].split('?')[0];
    const saved = (await t.app.inject(`/api/scenarios/${ref}`)).json().scenario;
    expect(saved.barrier.options[0].widthM).toBe(1200);
    expect(saved.barrier.lengthKm).toBe(1.5);
  });

  it('Check says how a number was read', async () => {
    const r = await post({ ...(await form()), 'barrier.options[0].widthM': '0.3 km', _action: 'check' });
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('Read as: barrier.options[0].widthM: &quot;0.3 km&quot; read as 300 m');
  });

  it('the read-back names only the saved values (the query cannot put text on the page)', async () => {
    const page = await t.app.inject(`/scenarios/${QUICK_REF}?saved=1&read=${encodeURIComponent('<script>x</script> title barrier.options[0].widthM')}`);
    expect(page.body).toContain('Numbers read from what you typed: barrier.options[0].widthM: 300 m.');
    expect(page.body).not.toContain('<script>x');
  });
});
