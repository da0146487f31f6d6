/**
 * One real-browser walk through the app (playwright-core driving Debian's chromium): open the app, load a
 * demo scenario, change a clearing width, run, see the verdict, download the result JSON. A screenshot of
 * the result page is saved under test-output/. Skips with a visible message where chromium is missing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { buildTestApp, type TestApp } from '../helpers/build-app.ts';
import type { ResultDocument } from '../../server/analysis/result.ts';

const CHROMIUM = '/usr/bin/chromium';
/** Launch flags that work in containers without a display or sandbox (see STACK.md). */
const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];
const OUTPUT_DIR = fileURLToPath(new URL('../../test-output/', import.meta.url));
const hasChromium = existsSync(CHROMIUM);
if (!hasChromium) {
  console.warn(`SKIPPED: the browser test needs chromium at ${CHROMIUM} (Debian package "chromium"); .ci/run installs it.`);
}

describe.skipIf(!hasChromium)('in a real browser', () => {
  let t: TestApp;
  let base = '';
  let profile = '';
  beforeAll(async () => {
    t = await buildTestApp();
    base = await t.app.listen({ host: '127.0.0.1', port: 0 });
    profile = mkdtempSync(join(tmpdir(), 'barrier-chromium-'));
  });
  afterAll(async () => {
    await t?.close();
    if (profile) rmSync(profile, { recursive: true, force: true });
  });

  it('load a demo, change a width, run, see the verdict, download the JSON', async () => {
    const { chromium } = await import('playwright-core');
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      args: CHROMIUM_ARGS,
      headless: true,
      acceptDownloads: true,
      viewport: { width: 1200, height: 900 },
    });
    const problems: string[] = [];
    try {
      const page = context.pages()[0] ?? (await context.newPage());
      page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
      page.on('console', (m) => {
        if (m.type() === 'error') problems.push(`console: ${m.text()}`);
      });

      await page.goto(`${base}/`);
      await page.getByRole('link', { name: /Ossenvale test strip/ }).click();
      expect(await page.locator('h1').textContent()).toMatch(/Ossenvale test strip/);

      await page.getByRole('link', { name: 'Edit a copy' }).click();
      const width = page.locator('#f-barrier-options-0-widthM');
      expect(await width.inputValue()).toBe('300');
      const band = page.locator('[data-strip-marks] .band-option');
      const before = await band.getAttribute('style');
      await width.fill('450');
      // The strip follows the typed width (page script).
      expect(await band.getAttribute('style')).not.toBe(before);
      expect(await band.getAttribute('style')).toContain('width: 7.500%');

      await page.getByRole('button', { name: 'Save my copy and run' }).click();
      await page.waitForURL(/\/results\/[0-9a-f-]{36}$/, { timeout: 60_000 });

      const verdict = page.locator('article.verdict').first();
      expect(await verdict.locator('h3').textContent()).toContain('450 m wide');
      expect((await verdict.locator('.verdict-label').textContent())?.trim().length).toBeGreaterThan(3);
      expect(await page.locator('.cautions').textContent()).toContain('local regulator');

      const [download] = await Promise.all([page.waitForEvent('download'), page.locator('a[data-download="json"]').click()]);
      expect(download.suggestedFilename()).toMatch(/^result-[0-9a-f]{8}\.json$/);
      const doc = JSON.parse(readFileSync((await download.path())!, 'utf8')) as ResultDocument;
      expect(doc.options[0].widthM).toBe(450);
      expect(doc.title).toMatch(/Ossenvale test strip/);

      mkdirSync(OUTPUT_DIR, { recursive: true });
      await page.screenshot({ path: join(OUTPUT_DIR, 'web-results.png'), fullPage: true });
      expect(problems).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
