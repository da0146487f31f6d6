/**
 * The demo map in a real browser (playwright-core driving Debian's chromium): "Place on the map" and three
 * clicks on the map preview write a centre line in map metres inside the map; Run shows the progress and
 * the page moves on by itself to the result, whose maps fill the column. A screenshot of the result page
 * goes to test-output/landscape-result.png for a reviewer. Skips with a visible message without chromium.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { BrowserContext } from 'playwright-core';
import { landscapeApp, DEMO_REF } from './landscape-helpers.ts';

const CHROMIUM = '/usr/bin/chromium';
const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];
const OUTPUT_DIR = fileURLToPath(new URL('../../test-output/', import.meta.url));
const hasChromium = existsSync(CHROMIUM);
if (!hasChromium) console.warn(`SKIPPED: the landscape browser test needs chromium at ${CHROMIUM} (Debian package "chromium").`);

describe.skipIf(!hasChromium)('demo map in a real browser', () => {
  let t: Awaited<ReturnType<typeof landscapeApp>>;
  let base = '';
  let profile = '';
  let context: BrowserContext;
  beforeAll(async () => {
    t = await landscapeApp();
    base = await t.app.listen({ host: '127.0.0.1', port: 0 });
    profile = mkdtempSync(join(tmpdir(), 'barrier-chromium-land-'));
    const { chromium } = await import('playwright-core');
    context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true, viewport: { width: 1280, height: 900 } });
    mkdirSync(OUTPUT_DIR, { recursive: true });
  }, 120_000);
  afterAll(async () => {
    await context?.close();
    await t?.close();
    if (profile) rmSync(profile, { recursive: true, force: true });
  });

  it('clicks on the preview place a centre line; Run ends on the result page with its maps', async () => {
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.goto(`${base}/landscapes/${DEMO_REF}`);
    await page.click('button.place-line[data-row="0"]');
    const svg = page.locator('#band-preview svg').first();
    await svg.scrollIntoViewIfNeeded();
    // Three clicks down the middle of the drawn map (its frame is the upper part of the figure, above the legend).
    for (const fy of [0.15, 0.3, 0.45]) {
      const box = (await svg.boundingBox())!;
      await page.mouse.click(box.x + box.width * 0.5, box.y + box.height * fy);
    }
    await page.click('button.place-line[data-row="0"]'); // Finish
    const line = await page.inputValue('#band-0-line');
    const pts = line.split(';').map((p) => p.trim().split(' ').map(Number));
    expect(pts.length).toBe(3);
    for (const [x, y] of pts) {
      // Inside the demo map: x 480–510 km, y 4010–4030 km (UTM metres), a column at mid-map.
      expect(x).toBeGreaterThan(480_000);
      expect(x).toBeLessThan(510_000);
      expect(y).toBeGreaterThan(4_010_000);
      expect(y).toBeLessThan(4_030_000);
    }
    // Points go north to south down the page: y falls from the first click to the last.
    expect(pts[0][1]).toBeGreaterThan(pts[2][1]);
    await page.click('button[value="run"]');
    await page.waitForSelector('#answer', { timeout: 150_000 });
    expect(await page.locator('.landscape-map svg').count()).toBeGreaterThanOrEqual(4);
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBeLessThanOrEqual(0);
    await page.screenshot({ path: join(OUTPUT_DIR, 'landscape-result.png'), fullPage: true });
    expect(errors).toEqual([]);
  }, 200_000);
});
