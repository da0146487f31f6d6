/**
 * Shared set-up of the landscape web tests: an app whose demo catalogue is the shipped demo map only
 * (scenarios/landscapes/, run at the web's coarse cell), and a job poller.
 */
import { mkdirSync, mkdtempSync, rmSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance } from 'fastify';
import { buildApp, type AppOptions } from '../../server/app.ts';

export const DEMO_LANDSCAPES_DIR = fileURLToPath(new URL('../../scenarios/landscapes/', import.meta.url));
export const DEMO_REF = 'demo-ossenvale-valley';

/** An app on a fresh folder, or on `root` of an earlier one (a restart: same database); `keep` leaves the folder. */
export async function landscapeApp(
  options: AppOptions = {},
  at: { root?: string; keep?: boolean } = {},
): Promise<{ app: FastifyInstance; root: string; close: () => Promise<void> }> {
  const root = at.root ?? mkdtempSync(join(tmpdir(), 'barrier-land-'));
  const scenariosDir = join(root, 'scenarios');
  const dataDir = join(root, 'data');
  if (!at.root) {
    mkdirSync(scenariosDir);
    symlinkSync(DEMO_LANDSCAPES_DIR, join(scenariosDir, 'landscapes'));
  }
  const app = await buildApp({ scenariosDir, dataDir, workerThreads: 1, ensembleThreads: 1, ...options });
  await app.ready();
  return {
    app,
    root,
    async close() {
      await app.close();
      if (!at.keep) rmSync(root, { recursive: true, force: true });
    },
  };
}

/** Polls a map evaluation until it ends; returns its final state. */
export async function waitForLandscape(app: FastifyInstance, id: string, timeoutMs = 120_000): Promise<Record<string, unknown>> {
  const t0 = Date.now();
  for (;;) {
    const body = (await app.inject(`/api/landscape-runs/${id}`)).json() as Record<string, unknown>;
    if (['done', 'failed', 'cancelled'].includes(String(body.status))) return body;
    if (Date.now() - t0 > timeoutMs) throw new Error(`map evaluation ${id} did not end within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The job id from a 303 redirect to /landscape-runs/<id>. */
export function runIdOf(location: unknown): string {
  const m = /^\/landscape-runs\/([0-9a-f-]{36})$/.exec(String(location));
  if (!m) throw new Error(`not a map run address: ${String(location)}`);
  return m[1];
}

/** Undoes the page's HTML escaping of attribute and text values. */
export const unescapeHtml = (s: string) => s.replace(/&#x27;/g, "'").replace(/&quot;/g, '"').replace(/&amp;/g, '&').replace(/&#x3D;/g, '=');

/** The landscape page's form fields (band rows and pest numbers) as a browser would post them. */
export function landscapeFormOf(html: string): Record<string, string> {
  const f: Record<string, string> = {};
  f.bandCount = /name="bandCount" value="(\d+)"/.exec(html)![1];
  for (const m of html.matchAll(/name="((?:band\[\d+\]\.(?:name|widthM))|pest\.\w+)" value="([^"]*)"/g)) f[m[1]] = unescapeHtml(m[2]);
  for (const m of html.matchAll(/name="(band\[\d+\]\.line)"[^>]*>([^<]*)</g)) f[m[1]] = unescapeHtml(m[2]);
  for (const m of html.matchAll(/<select id="band-(\d+)-cover" name="(band\[\d+\]\.cover)">([\s\S]*?)<\/select>/g)) f[m[2]] = /value="([^"]+)" selected/.exec(m[3])![1];
  return f;
}
