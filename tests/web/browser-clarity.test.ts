/**
 * Results a decision meeting can read, checked in a real browser (playwright-core driving Debian's
 * chromium), one test per finding that a browser can check: the transport risk beside the verdict and the
 * headline saying when transport decides; a held option never listing a breeding arrival; one recommended
 * width per scenario with the method collapsed; errors in view after a failed upload; no horizontal scroll at
 * 390 px; charts filling the column with text ≥ 12 px; options at the same km apart on the strip, km ticks,
 * narrow corridors visible; heading order and named row buttons; a range marks the single-value box as not
 * used; the parameter table (collapsed) with the result; verdicts in the results list; CSV of a table; two
 * results side by side; /api with this server's address.
 * Screenshots of each demo's results page and briefing cover go to test-output/ for a reviewer to look at.
 * Skips with a visible message where chromium (or pdftoppm, for the cover images) is missing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { BrowserContext, Page } from 'playwright-core';
import { buildTestApp, type TestApp } from '../helpers/build-app.ts';
import { demoResult, DEMO_NAMES, DEMO_RUN_AT, type DemoName } from '../helpers/demo-results.ts';
import { havePdftoppm } from '../helpers/pdf.ts';
import { openStore } from '../../server/web/store.ts';
import { renderBriefing } from '../../server/report/briefing.ts';

const CHROMIUM = '/usr/bin/chromium';
/** Launch flags that work in containers without a display or sandbox (see STACK.md). */
const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];
const OUTPUT_DIR = fileURLToPath(new URL('../../test-output/', import.meta.url));
const hasChromium = existsSync(CHROMIUM);
if (!hasChromium) console.warn(`SKIPPED: the browser tests of the result pages need chromium at ${CHROMIUM} (Debian package "chromium"); .ci/run installs it.`);
const hasPdftoppm = havePdftoppm();
if (!hasPdftoppm) console.warn('SKIPPED: the briefing cover screenshots need pdftoppm (Debian package "poppler-utils").');

describe.skipIf(!hasChromium)('results a decision meeting can read (real browser)', () => {
  let t: TestApp;
  let base = '';
  let profile = '';
  let context: BrowserContext;
  const resultIds = new Map<DemoName, string>();
  const savedIds = new Map<DemoName, number>();
  const problems: string[] = [];

  beforeAll(async () => {
    t = await buildTestApp();
    const store = openStore(t.dataDir);
    for (const name of DEMO_NAMES) {
      const d = demoResult(name);
      resultIds.set(name, store.saveResult({ scenarioRef: `demo-${name}`, scenario: d.scenario, document: d.doc }).id);
      savedIds.set(name, store.createScenario(d.scenario).id);
    }
    store.close();
    base = await t.app.listen({ host: '127.0.0.1', port: 0 });
    profile = mkdtempSync(join(tmpdir(), 'barrier-chromium-'));
    const { chromium } = await import('playwright-core');
    context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true, acceptDownloads: true, viewport: { width: 1280, height: 900 } });
    mkdirSync(OUTPUT_DIR, { recursive: true });
  }, 600_000);
  afterAll(async () => {
    await context?.close();
    await t?.close();
    if (profile) rmSync(profile, { recursive: true, force: true });
  });

  async function open(url: string, viewport = { width: 1280, height: 900 }): Promise<Page> {
    const page = await context.newPage();
    await page.setViewportSize(viewport);
    page.on('pageerror', (e) => problems.push(`page error on ${url}: ${e.message}`));
    page.on('console', (m) => {
      // A 4xx answer is expected where a test posts bad input (the failed upload); anything else is a problem.
      if (m.type() === 'error' && !/status of 4\d\d/.test(m.text())) problems.push(`console on ${url}: ${m.text()}`);
    });
    await page.goto(`${base}${url}`);
    return page;
  }
  const resultUrl = (n: DemoName) => `/results/${resultIds.get(n)}`;

  it('transport-decides: the headline says transport decides, first thing on the page; the banner and the side-by-side table and chart carry the risk', async () => {
    const page = await open(resultUrl('transport-decides'));
    const headline = page.locator('[data-headline]');
    expect(await headline.textContent()).toContain('Transport, not the width, decides');
    const box = (await headline.boundingBox())!;
    expect(box.y + box.height, 'headline inside the first screen').toBeLessThan(900);
    const banner = page.locator('article.verdict').first();
    expect(await banner.getAttribute('class')).not.toContain('tone-good');
    const risk = (await banner.locator('.transport-risk').textContent())!;
    expect(risk).toMatch(/People carrying the pest: \d+ % chance/);
    expect((await banner.boundingBox())!.y, 'banner with its risk within ~1.5 screens, not 5 000 px down').toBeLessThan(1400);
    await page.close();

    const compare = await open(`${resultUrl('transport-decides')}/compare`);
    const row = compare.locator('tr', { has: compare.locator('th', { hasText: 'People carrying the pest past it' }) });
    expect(await row.count()).toBe(1);
    expect(await row.locator('td').last().textContent()).toMatch(/\d+ % within 40 yr — transport decides/);
    expect(await compare.locator('tr', { has: compare.locator('th', { hasText: /^Verdict$/ }) }).locator('td').last().textContent()).toContain('transport decides');
    expect(await compare.locator('figure.chart svg').textContent()).toMatch(/transport risk \d+ % within 40 yr/);
    await compare.close();
  });

  it('clearing-not-crossed: the held option never lists a breeding arrival at a site; fringes are called fringes', async () => {
    const page = await open(resultUrl('clearing-not-crossed'));
    const table = page.locator('table[data-table="arrivals"]');
    const varrow = table.locator('tr', { has: page.locator('th', { hasText: 'Varrow lookout' }) });
    const cells = await varrow.locator('td').allTextContents();
    // columns: no clearing, A (560 m, not crossed), B (700 m, holds)
    expect(cells[1]).toContain('only a thin non-breeding fringe');
    expect(cells[1]).not.toMatch(/delays/i);
    expect(cells[2]).toContain('no breeding population');
    expect(cells[2]).toContain('thin non-breeding fringe');
    expect(cells[2]).not.toContain('breeding population arrives');
    await page.close();
  });

  it('every demo: one recommended minimum width, its basis beside it, the method collapsed under "How this was computed"', async () => {
    for (const name of DEMO_NAMES) {
      const page = await open(resultUrl(name));
      const text = (await page.locator('main').textContent())!;
      const widths = new Set([...text.matchAll(/Recommended minimum width: ([\d\u202f ]+) m/g)].map((m) => m[1]));
      expect(widths.size, name).toBeLessThanOrEqual(1);
      expect(text.includes('Recommended minimum width:') || text.includes('No recommended width'), name).toBe(true);
      const method = page.locator('#recommended-width details.method');
      expect(await method.count(), name).toBe(1);
      expect(await method.evaluate((d) => (d as HTMLDetailsElement).open), name).toBe(false);
      await page.close();
    }
  });

  it('the parameters that produced the result are on the results page, collapsed', async () => {
    const page = await open(resultUrl('clearing-holds'));
    const details = page.locator('details[data-parameters]');
    expect(await details.evaluate((d) => (d as HTMLDetailsElement).open)).toBe(false);
    await details.locator('summary').click();
    expect(await details.locator('table').textContent()).toContain('Movement in host forest');
    await page.close();
  });

  it('after a failed "Load and save" the problem box is at the top, in view and focused, with a link to the file field', async () => {
    const page = await open('/scenarios');
    await page.locator('#upload-file').setInputFiles({ name: 'broken.json', mimeType: 'application/json', buffer: Buffer.from('{ "version": 1, "title": ') });
    await Promise.all([page.waitForLoadState('load'), page.getByRole('button', { name: 'Load and save' }).click()]);
    await page.waitForSelector('#upload-problems');
    const focused = await page.evaluate(() => document.activeElement?.id);
    expect(focused).toBe('upload-problems');
    const box = (await page.locator('#upload-problems').boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(0);
    expect(box.y).toBeLessThan(900);
    expect(await page.locator('#upload-problems').textContent()).toMatch(/could not be loaded/);
    expect(await page.locator('#upload-problems a[href="#upload-file"]').count()).toBe(1);
    expect(await page.locator('#upload-file').getAttribute('aria-invalid')).toBe('true');
    await page.close();
  });

  it('no horizontal scroll at a 390 px viewport: edit page, results and compare pages of every demo, lists and references', async () => {
    const urls = [
      `/scenarios/${savedIds.get('clearing-holds')}/edit`,
      `/scenarios/${savedIds.get('transport-decides')}/edit`,
      `/scenarios/${savedIds.get('clearing-holds')}`,
      '/scenarios',
      '/results',
      '/fields',
      '/api',
      ...DEMO_NAMES.flatMap((n) => [resultUrl(n), `${resultUrl(n)}/compare`]),
    ];
    const wide: string[] = [];
    for (const url of urls) {
      const page = await open(url, { width: 390, height: 800 });
      const w = await page.evaluate(() => document.documentElement.scrollWidth);
      if (w > 390) wide.push(`${url}: ${w} px`);
      await page.close();
    }
    expect(wide.join('; ')).toBe('');
  });

  it('charts fill the column and their smallest text is at least 12 px at 100 % zoom, on a phone too; every density-map site line is named', async () => {
    const page = await open(resultUrl('clearing-holds'));
    const column = await page.locator('main').evaluate((m) => m.clientWidth - parseFloat(getComputedStyle(m).paddingLeft) - parseFloat(getComputedStyle(m).paddingRight));
    const charts = await page.locator('figure.chart svg').evaluateAll((svgs) =>
      svgs.map((svg) => {
        const vb = (svg as SVGSVGElement).viewBox.baseVal;
        const scale = svg.clientWidth / vb.width;
        const sizes = [...svg.querySelectorAll('text')].map((tx) => parseFloat(tx.getAttribute('font-size') ?? getComputedStyle(tx).fontSize));
        return { width: svg.clientWidth, minPx: Math.min(...sizes) * scale };
      }),
    );
    expect(charts.length).toBeGreaterThan(5);
    for (const c of charts) {
      expect(c.width).toBeGreaterThan(0.95 * column);
      expect(c.minPx).toBeGreaterThanOrEqual(12);
    }
    // On a phone (390 px) the charts keep their text ≥ 12 px and scroll sideways in their own box.
    const phone = await open(resultUrl('clearing-holds'), { width: 390, height: 800 });
    const small = await phone.locator('figure.chart svg').evaluateAll((svgs) =>
      svgs.map((svg) => {
        const vb = (svg as SVGSVGElement).viewBox.baseVal;
        const sizes = [...svg.querySelectorAll('text')].map((tx) => parseFloat(tx.getAttribute('font-size') ?? getComputedStyle(tx).fontSize));
        return Math.min(...sizes) * (svg.clientWidth / vb.width);
      }),
    );
    for (const px of small) expect(px).toBeGreaterThanOrEqual(12);
    expect(await phone.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    await phone.close();
    const map = page.locator('figure[data-chart="space-time-A"]');
    expect(await map.locator('svg').textContent()).toContain('dotted: protected sites — 1 Brackfen Mill village · 2 Saltrin Hollow seed orchard');
    await page.close();
  });

  it('on a phone (390 px) chart text stays at least 12 px: each chart keeps its legible width and scrolls inside its own box, the page does not', async () => {
    for (const name of DEMO_NAMES) {
      for (const url of [resultUrl(name), `${resultUrl(name)}/compare`]) {
        const page = await open(url, { width: 390, height: 800 });
        const charts = await page.locator('figure.chart svg').evaluateAll((svgs) =>
          svgs.map((svg) => {
            const vb = (svg as SVGSVGElement).viewBox.baseVal;
            const scale = svg.getBoundingClientRect().width / vb.width;
            const sizes = [...svg.querySelectorAll('text')].map((tx) => parseFloat(tx.getAttribute('font-size') ?? getComputedStyle(tx).fontSize));
            const box = svg.closest('.chart-scroll') as HTMLElement | null;
            return { key: svg.closest('figure')?.getAttribute('data-chart'), minPx: Math.min(...sizes) * scale, boxScrolls: box !== null && getComputedStyle(box).overflowX === 'auto' };
          }),
        );
        expect(charts.length).toBeGreaterThan(0);
        for (const c of charts) {
          expect(c.minPx, `${url} ${c.key}`).toBeGreaterThanOrEqual(12 - 1e-6);
          expect(c.boxScrolls, `${url} ${c.key}`).toBe(true);
        }
        expect(await page.evaluate(() => document.documentElement.scrollWidth), url).toBeLessThanOrEqual(390);
        await page.close();
      }
    }
  });

  it('the strip: options at the same km in separate lettered rows, km ticks, a 60 m corridor drawn visibly', async () => {
    const page = await open(`/scenarios/${savedIds.get('clearing-holds')}`);
    const bands = await page.locator('.strip .band-option').evaluateAll((els) => els.map((e) => ({ top: e.getBoundingClientRect().top, key: e.textContent })));
    expect(bands.map((b) => b.key)).toEqual(['A', 'B', 'C']);
    expect(new Set(bands.map((b) => Math.round(b.top))).size).toBe(3);
    expect((await page.locator('.strip-ticks .tick').count()) >= 4).toBe(true);
    await page.close();

    const edit = await open(`/scenarios/${savedIds.get('clearing-holds')}/edit`);
    // The demo's 60 m power-line corridor in 50 km: drawn at a visible width with an outline, server-side and after a live redraw.
    const corridor = edit.locator('[data-strip-bar] .seg.narrow.hab-clearing');
    expect(await corridor.count()).toBe(1);
    expect((await corridor.boundingBox())!.width).toBeGreaterThanOrEqual(4);
    await edit.locator('[name="transect.segments[0].lengthKm"]').fill('11');
    expect(await edit.locator('[data-strip-bar] .seg.narrow.hab-clearing').count()).toBe(1);
    expect((await edit.locator('[data-strip-bar] .seg.narrow.hab-clearing').boundingBox())!.width).toBeGreaterThanOrEqual(4);
    // Live redraw keeps the lanes: three options, three rows.
    expect(new Set(await edit.locator('.strip .band-option').evaluateAll((els) => els.map((e) => Math.round(e.getBoundingClientRect().top)))).size).toBe(3);
    await edit.close();
  });

  it('the form: headings in order, row buttons that name their table, a chosen range marks the single-value box as not used', async () => {
    const page = await open(`/scenarios/${savedIds.get('transport-decides')}/edit`);
    const levels = await page.locator('main h1, main h2, main h3, main h4').evaluateAll((hs) => hs.map((h) => Number(h.tagName.slice(1))));
    for (let i = 1; i < levels.length; i++) expect(levels[i] - levels[i - 1], `heading ${i}: ${levels}`).toBeLessThanOrEqual(1);
    const labels = await page.locator('td.row-actions button').evaluateAll((bs) => bs.map((b) => b.getAttribute('aria-label') ?? ''));
    expect(labels.length).toBeGreaterThan(0);
    for (const l of labels) expect(l).toMatch(/^(Remove|Move) (segment|site|option|distance row|pattern) \d+( up| down)?$/);
    // diffusionOpen is a log-normal range in this demo: its single box says so, server-side.
    const single = page.locator('#f-pest-diffusionOpen');
    expect(await single.getAttribute('class')).toContain('superseded');
    expect(await single.getAttribute('placeholder')).toContain('given as a range below');
    // Choosing a range for another field marks its box live.
    const host = page.locator('#f-pest-diffusionHost');
    expect(await host.getAttribute('class') ?? '').not.toContain('superseded');
    await page.locator('#f-pest-diffusionHost').locator('xpath=ancestor::div[contains(@class,"field")]').locator('details.dist summary').click();
    await page.locator('#f-pest-diffusionHost-kind').selectOption('uniform');
    expect(await host.getAttribute('class')).toContain('superseded');
    expect(await page.locator('#f-pest-diffusionHost').locator('xpath=ancestor::div[contains(@class,"field")]').locator('[data-range-given]').isVisible()).toBe(true);
    await page.close();
  });

  it('the results list shows each option’s verdict and the scenario fingerprint, so identical titles can be told apart; two results compare side by side', async () => {
    // A second result with the same title but another width (another scenario fingerprint).
    const d = demoResult('clearing-not-crossed');
    const store = openStore(t.dataDir);
    const other = store.saveResult({ scenarioRef: null, scenario: { ...d.scenario, barrier: { ...d.scenario.barrier!, options: [d.scenario.barrier!.options[1]] } }, document: { ...d.doc, options: [d.doc.options[1]], scenarioFingerprint: 'f'.repeat(64) } });
    store.close();
    const page = await open('/results');
    const rows = page.locator('table.results-list tbody tr', { hasText: d.doc.title });
    expect(await rows.count()).toBe(2);
    const texts = await rows.allTextContents();
    expect(texts[0]).not.toBe(texts[1]);
    for (const tx of texts) expect(tx).toMatch(/A [\d\u202f ]+ m: /);
    await page.locator(`input[name="pick"][value="${other.id}"]`).check();
    await page.locator(`input[name="pick"][value="${resultIds.get('clearing-not-crossed')}"]`).check();
    await Promise.all([page.waitForURL(/compare-results/), page.getByRole('button', { name: /Compare the two picked results/ }).click()]);
    expect(await page.locator('h1').textContent()).toBe('Two results side by side');
    expect(await page.locator('main').textContent()).toContain('Parameters that differ');
    await page.close();
  });

  it('every table of the results page downloads as CSV with the words the page shows', async () => {
    const page = await open(resultUrl('clearing-not-crossed'));
    const links = page.locator('a', { hasText: 'This table as CSV' });
    expect(await links.count()).toBeGreaterThan(6);
    const [download] = await Promise.all([page.waitForEvent('download'), page.locator('table[data-table="arrivals"]').locator('xpath=ancestor::div[1]/following-sibling::p[1]/a').click()]);
    const csv = readFileSync((await download.path())!, 'utf8');
    expect(csv.split('\r\n')[0]).toBe('"Protected site","No clearing","A: 560 m cut at km 8","B: 700 m cut at km 8"');
    expect(csv).toContain('thin non-breeding fringe');
    await page.close();
  });

  it('the API page shows this server’s address and no raw backticks', async () => {
    const page = await open('/api');
    const text = (await page.locator('main').textContent())!;
    expect(text).toContain(base);
    expect(text).not.toContain('`');
    await page.close();
  });

  it('screenshots of each demo’s results page (first screen and whole page) and briefing cover, in test-output/', async () => {
    for (const name of DEMO_NAMES) {
      const page = await open(resultUrl(name));
      await page.screenshot({ path: join(OUTPUT_DIR, `results-${name}-first-screen.png`) });
      await page.screenshot({ path: join(OUTPUT_DIR, `results-${name}.png`), fullPage: true });
      await page.close();
      const d = demoResult(name);
      const pdf = await renderBriefing(d.doc, { scenario: d.scenario, rawInput: d.raw, creationDate: DEMO_RUN_AT });
      const pdfPath = join(OUTPUT_DIR, `briefing-${name}.pdf`);
      writeFileSync(pdfPath, pdf);
      if (hasPdftoppm) {
        const r = spawnSync('pdftoppm', ['-png', '-r', '80', '-f', '1', '-l', '1', '-singlefile', pdfPath, join(OUTPUT_DIR, `briefing-cover-${name}`)]);
        expect(r.status).toBe(0);
        expect(existsSync(join(OUTPUT_DIR, `briefing-cover-${name}.png`))).toBe(true);
      }
      expect(existsSync(join(OUTPUT_DIR, `results-${name}.png`))).toBe(true);
    }
    expect(problems.join('; ')).toBe('');
  });
});
