/**
 * Input edges answered the same way by the API, the CLI, the upload and the JSON editor (regression tests for
 * the hardening findings: a truncated upload gave 500; "Body is not valid JSON" named no position; a BOM was
 * accepted by the API only; duplicate keys took the last value silently; blank or control-character titles
 * were accepted and written raw to the terminal).
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { main, terminalSafe } from '../../server/cli.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { ScenarioError } from '../../server/model/errors.ts';

const quickText = readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8');
const withTitle = (title: string) => JSON.stringify({ ...JSON.parse(quickText), title });

let t: TestApp;
let dir: string;
beforeAll(async () => {
  t = await buildTestApp();
  dir = mkdtempSync(join(tmpdir(), 'barrier-edges-'));
});
afterAll(async () => {
  await t.close();
  rmSync(dir, { recursive: true, force: true });
});

/** The four ways a scenario text comes in; each answers { ok, text } (text: what the user sees). */
async function everyWay(text: string) {
  const api = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: text });
  const b = '----edge';
  const upload = await t.app.inject({
    method: 'POST',
    url: '/scenarios/upload',
    headers: { 'content-type': `multipart/form-data; boundary=${b}` },
    payload: `--${b}\r\nContent-Disposition: form-data; name="file"; filename="s.json"\r\nContent-Type: application/json\r\n\r\n${text}\r\n--${b}--\r\n`,
  });
  const editor = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/json`, headers: FORM_HEADERS, payload: formBody({ text, _action: 'check' }) });
  const file = join(dir, 'in.json');
  writeFileSync(file, text);
  const err: string[] = [];
  const spy = vi.spyOn(process.stderr, 'write').mockImplementation((s) => (err.push(String(s)), true));
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const code = await main([file, '--quiet', '--threads', '1']);
  spy.mockRestore();
  out.mockRestore();
  return {
    api: { status: api.statusCode, text: api.body },
    upload: { status: upload.statusCode, text: upload.body },
    editor: { status: editor.statusCode, text: editor.body },
    cli: { status: code, text: err.join('') },
  };
}

describe('the same answer by every way in', () => {
  it('a byte-order mark is accepted everywhere', async () => {
    const r = await everyWay(`\ufeff${quickText}`);
    expect(r.api.status).toBe(201);
    expect(r.upload.status).toBe(303);
    expect(r.editor.status).toBe(200);
    expect(r.editor.text).toContain('No problems found');
    expect(r.cli.status, r.cli.text).toBe(0);
  });

  it('a syntax error names its line and column everywhere (regression: "Body is not valid JSON")', async () => {
    const r = await everyWay('{\n  "title": "x",\n  "pest": {,\n}');
    for (const [way, a] of Object.entries(r)) {
      expect(a.status, way).toBe(way === 'cli' ? 1 : 400);
      expect(a.text, way).toContain('is not valid JSON at line 3, column 12: expected a field name in double quotes');
    }
  });

  it('a duplicate key is refused everywhere, naming the path (regression: the last value was taken silently)', async () => {
    const text = quickText.replace('"horizonYears": 6', '"horizonYears": 6, "horizonYears": 60');
    const r = await everyWay(text.replace(/"horizonYears"/, '"horizonYears"'));
    for (const [way, a] of Object.entries(r)) {
      expect(a.status, way).toBe(way === 'cli' ? 1 : 400);
      expect(a.text, way).toMatch(/horizonYears.*appears twice in the same object \(line \d+, column \d+ and line \d+, column \d+\)/s);
    }
  });

  it('__proto__ and constructor.prototype keys are refused with the key and the position', async () => {
    const text = quickText.replace('"pest": {', '"pest": { "constructor": { "prototype": { "x": 1 } }, "__proto__": { "y": 2 },');
    const r = await everyWay(text);
    for (const [way, a] of Object.entries(r)) {
      expect(a.status, way).toBe(way === 'cli' ? 1 : 400);
      expect(a.text, way).toMatch(/pest\.constructor\.prototype/);
      expect(a.text, way).toMatch(/pest\.__proto__.*is not allowed as a field name \(line \d+, column \d+\)/s);
    }
  });
});

describe('titles and names are plain text', () => {
  it('blank or control-character titles are refused with the character named', () => {
    const bad = (title: string) => {
      try {
        parseScenario(JSON.parse(withTitle(title)));
      } catch (e) {
        return (e as ScenarioError).problems.find((p) => p.path === 'title')?.message;
      }
      return undefined;
    };
    expect(bad('   ')).toBe('must not be only spaces; type a name');
    expect(bad('a\u0000b')).toMatch(/character 2 is U\+0000, a control character/);
    expect(bad('bell\u0007')).toMatch(/U\+0007/);
    expect(bad('\u001b[31mred')).toMatch(/character 1 is U\+001B/);
    expect(bad('two\nlines')).toMatch(/U\+000A.*nor are line breaks/);
    expect(bad('evil\u202eflip')).toMatch(/U\+202E, a text-direction mark/);
    expect(bad('Ossenvale – Wendle stand (km 3–6) ★ Å ß')).toBeUndefined();
    const s = JSON.parse(quickText);
    s.description = 'two\nlines\tand a tab';
    expect(() => parseScenario(s)).not.toThrow();
    s.transect.segments[0].name = 'x\u0085';
    expect(() => parseScenario(s)).toThrow(/transect\.segments\[0\]\.name .*U\+0085/);
  });

  it('the CLI never writes NUL, BEL or ESC from a file to the terminal', async () => {
    const file = join(dir, 'esc.json');
    writeFileSync(file, quickText.replace('"horizonYears": 6', '"horizonYears": 6, "\\u001b[2J\\u0007": 1').replace(/"title": "[^"]*"/, '"title": "\\u0000\\u001b]0;owned\\u0007"'));
    const err: string[] = [];
    const spy = vi.spyOn(process.stderr, 'write').mockImplementation((s) => (err.push(String(s)), true));
    const code = await main([file, '--quiet']);
    spy.mockRestore();
    expect(code).toBe(1);
    const text = err.join('');
    expect(text).not.toMatch(/[\u0000\u0007\u001b]/);
    expect(text).toContain('\\u{1b}[2J\\u{7}');
    expect(terminalSafe('a\u009bb\u202ec\nd\te')).toBe('a\\u{9b}b\\u{202e}c\nd\te');
  });
});

describe('uploads', () => {
  it('a truncated or malformed multipart upload answers 400 with what to do (regression: 500)', async () => {
    const b = '----cut';
    const full = `--${b}\r\nContent-Disposition: form-data; name="file"; filename="s.json"\r\nContent-Type: application/json\r\n\r\n${quickText}\r\n--${b}--\r\n`;
    for (const cut of [10, 60, 120, 400, full.length - 4]) {
      const r = await t.app.inject({ method: 'POST', url: '/scenarios/upload', headers: { 'content-type': `multipart/form-data; boundary=${b}` }, payload: full.slice(0, cut) });
      expect(r.statusCode, `cut at ${cut}`).toBe(400);
      expect(r.body).toMatch(/upload arrived incomplete or damaged|choose a scenario file/);
    }
    const noBoundary = await t.app.inject({ method: 'POST', url: '/scenarios/upload', headers: { 'content-type': 'multipart/form-data' }, payload: full });
    expect(noBoundary.statusCode).toBe(400);
    expect((await t.app.inject('/scenarios')).statusCode).toBe(200);
  });
});

describe('tiny widths (regression: saved with 201, then 500 from makeGrid "breakpoints must increase")', () => {
  it('are refused at save and at run by the API, the form and the CLI, naming the field', async () => {
    const raw = JSON.parse(quickText);
    raw.barrier.options[0].widthM = 1e-12;
    const save = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: JSON.stringify(raw) });
    expect(save.statusCode).toBe(400);
    expect(save.json().problems).toEqual([{ path: 'barrier.options[0].widthM', value: 1e-12, message: 'must be ≥ 1 and ≤ 100000 m' }]);
    const run = await t.app.inject({ method: 'POST', url: '/api/evaluations', headers: { 'content-type': 'application/json' }, payload: JSON.stringify({ scenario: raw }) });
    expect(run.statusCode).toBe(400);
    expect(run.json().problems[0].path).toBe('scenario.barrier.options[0].widthM');
    const file = join(dir, 'tiny.json');
    writeFileSync(file, JSON.stringify(raw));
    const err: string[] = [];
    const spy = vi.spyOn(process.stderr, 'write').mockImplementation((s) => (err.push(String(s)), true));
    const code = await main([file, '--quiet']);
    spy.mockRestore();
    expect(code).toBe(1);
    expect(err.join('')).toContain('barrier.options[0].widthM = 1e-12: must be ≥ 1 and ≤ 100000 m');
    expect(err.join('')).not.toContain('RangeError');
  });
});
