/**
 * The briefing states what text it can draw and refuses the rest by field (regression: CJK and emoji were
 * drawn as empty boxes; right-to-left names overlapped nearby text, since the layout has no bidirectional
 * reordering). Coverage comes from the embedded DejaVu Sans faces' own character maps.
 */
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { briefingTextProblems, undrawableText } from '../../../server/report/pdf/fonts.ts';
import { main } from '../../../server/cli.ts';
import { buildTestApp, waitForJob, type TestApp } from '../../helpers/build-app.ts';

const quickText = readFileSync(new URL('../../web/fixtures/scenarios/quick-check.json', import.meta.url), 'utf8');

describe('what the briefing can draw', () => {
  it('Latin, Greek, Cyrillic and the symbols the tool prints are drawn', () => {
    for (const t of ['Ossenvale – Wendle (km 3–6)', 'km² ± ≥ λ Δ θ €', 'Ærø Øst café naïve Łódź', 'Москва', 'Αθήνα', 'two\nlines']) expect(undrawableText(t), t).toBeUndefined();
  });

  it('CJK, emoji and right-to-left scripts are named with the character', () => {
    expect(undrawableText('Site 北')).toBe('has "北" (U+5317), which the briefing\'s font cannot draw');
    expect(undrawableText('fire 🔥')).toMatch(/U\+1F525/);
    expect(undrawableText('שלום')).toMatch(/right-to-left text \("ש", U\+05E9\)/);
    expect(undrawableText('مرحبا')).toMatch(/right-to-left/);
  });

  it('lists every field of a scenario it cannot draw, with the statement of what is supported', () => {
    const s = JSON.parse(quickText);
    s.title = '森林 test';
    s.sites[0].name = 'אתר';
    const problems = briefingTextProblems(s);
    expect(problems.map((p) => p.path)).toEqual(['title', 'sites[0].name']);
    expect(problems[0].message).toContain('the PDF briefing draws left-to-right text in the Latin, Greek and Cyrillic alphabets');
  });
});

describe('refused where a briefing is asked for', () => {
  let t: TestApp;
  let dir: string;
  beforeAll(async () => {
    t = await buildTestApp();
    dir = mkdtempSync(join(tmpdir(), 'barrier-fonts-'));
  });
  afterAll(async () => {
    await t.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it('the CLI refuses --pdf before the run, naming the field, and writes nothing', async () => {
    const s = JSON.parse(quickText);
    s.title = 'Ossenvale 🌲';
    const file = join(dir, 's.json');
    writeFileSync(file, JSON.stringify(s));
    const err: string[] = [];
    const spy = vi.spyOn(process.stderr, 'write').mockImplementation((x) => (err.push(String(x)), true));
    const code = await main([file, '--pdf', join(dir, 'b.pdf'), '--quiet']);
    spy.mockRestore();
    expect(code).toBe(1);
    expect(err.join('')).toMatch(/cannot write --pdf .*b\.pdf:\n {2}title = "Ossenvale 🌲": has "🌲" \(U\+1F332\)/);
    expect(existsSync(join(dir, 'b.pdf'))).toBe(false);
  });

  it('the web briefing answers 422 naming the field; the result page itself shows the text', async () => {
    const s = JSON.parse(quickText);
    s.title = 'Ossenvale 試験';
    const r = await t.app.inject({ method: 'POST', url: '/api/evaluations', headers: { 'content-type': 'application/json' }, payload: JSON.stringify({ scenario: s }) });
    expect(r.statusCode).toBe(202);
    const job = await waitForJob(t.app, r.json().id);
    const pdf = await t.app.inject(`/api/results/${job.resultId}/briefing.pdf`);
    expect(pdf.statusCode).toBe(422);
    expect(pdf.json().problems[0]).toMatchObject({ path: 'title', message: expect.stringMatching(/^has "試" \(U\+8A66\)/) });
    const page = await t.app.inject(`/results/${job.resultId}`);
    expect(page.statusCode).toBe(200);
    expect(page.body).toContain('Ossenvale 試験');
  });
});
