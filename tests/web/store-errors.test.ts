/**
 * Storage errors (regression tests): an unwritable DATA_DIR died at start with an SqliteError stack trace; a
 * full disk answered an opaque 500 on save; evaluations computed fully before failing to save. A full disk is
 * produced with SQLite's max_page_count (the database cannot grow: SQLITE_FULL, as on a full disk).
 */
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { DataDirError, openStore, StorageFullError } from '../../server/web/store.ts';
import { scenarioToForm } from '../../server/web/form-state.ts';

const root = fileURLToPath(new URL('../..', import.meta.url));
const quickText = readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8');
const scratch = mkdtempSync(join(tmpdir(), 'barrier-store-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

describe('an unusable DATA_DIR', () => {
  it('stops openStore with one message naming DATA_DIR and the reason', () => {
    const file = join(scratch, 'a-file');
    writeFileSync(file, 'not a folder');
    expect(() => openStore(join(file, 'data'))).toThrow(DataDirError);
    expect(() => openStore(join(file, 'data'))).toThrow(/^DATA_DIR ".*a-file\/data" cannot be used: it is not a folder \(ENOTDIR\)/);
    expect(() => openStore(file)).toThrow(/DATA_DIR .* cannot be used/);
  });

  it('npm start prints that line and exits 1, without a stack trace', () => {
    const file = join(scratch, 'b-file');
    writeFileSync(file, 'x');
    const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/main.ts'], {
      cwd: root,
      env: { ...process.env, DATA_DIR: join(file, 'data'), PORT: '0' },
      encoding: 'utf8',
      timeout: 60_000,
    });
    expect(r.status).toBe(1);
    expect(r.stderr).toContain(`DATA_DIR "${join(file, 'data')}" cannot be used: it is not a folder (ENOTDIR)`);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    expect(r.stderr).not.toContain('SqliteError');
  });
});

describe('a full disk', () => {
  let t: TestApp | undefined;
  afterEach(async () => {
    await t?.close();
    t = undefined;
  });

  it('answers 507 naming DATA_DIR on save, by the API and the form (regression: 500 INTERNAL)', async () => {
    t = await buildTestApp({ storage: { maxPageCount: 1 } });
    const big = JSON.parse(quickText);
    big.description = 'x'.repeat(4000);
    const api = await t.app.inject({ method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: JSON.stringify(big) });
    expect(api.statusCode).toBe(507);
    expect(api.json()).toMatchObject({ error: 'STORAGE_FULL' });
    expect(api.json().message).toMatch(/the disk holding the data folder \(DATA_DIR .*\) is full: nothing was saved/);
    const page = await t.app.inject({ method: 'POST', url: '/scenarios/new', headers: FORM_HEADERS, payload: formBody(scenarioToForm(big)) });
    expect(page.statusCode).toBe(507);
    expect(page.body).toContain('is full: nothing was saved');
    expect(page.body).not.toContain('reference');
  });

  it('is refused before an evaluation starts, not after it computed (507, nothing queued)', async () => {
    t = await buildTestApp({ storage: { minFreeBytes: Number.MAX_SAFE_INTEGER } });
    const api = await t.app.inject({ method: 'POST', url: '/api/evaluations', headers: { 'content-type': 'application/json' }, payload: JSON.stringify({ scenarioRef: QUICK_REF }) });
    expect(api.statusCode).toBe(507);
    expect(api.json().message).toMatch(/MB free, less than the \d+ MB an evaluation may need/);
    const page = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/run`, headers: FORM_HEADERS, payload: '' });
    expect(page.statusCode).toBe(507);
    expect((await t.app.inject('/api/results')).json().results).toEqual([]);
  });

  it('StorageFullError is what the store throws for SQLITE_FULL', () => {
    const dir = mkdtempSync(join(scratch, 'full-'));
    const store = openStore(dir, { maxPageCount: 1 });
    const s = JSON.parse(quickText);
    s.description = 'y'.repeat(4000);
    expect(() => store.createScenario(s)).toThrow(StorageFullError);
    store.close();
  });
});
