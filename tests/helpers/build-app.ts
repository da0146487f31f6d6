/**
 * Builds the web app for route tests (app.inject) with a fresh data folder and one worker thread.
 * By default the demo catalogue is the small, fast fixture scenario in tests/web/fixtures/scenarios/.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { FastifyInstance } from 'fastify';
import { buildApp, type AppOptions } from '../../server/app.ts';

export const FIXTURE_SCENARIOS_DIR = fileURLToPath(new URL('../web/fixtures/scenarios/', import.meta.url));
export const QUICK_REF = 'demo-quick-check';

export interface TestApp {
  app: FastifyInstance;
  dataDir: string;
  close(): Promise<void>;
}

export async function buildTestApp(options: AppOptions = {}): Promise<TestApp> {
  const dataDir = mkdtempSync(join(tmpdir(), 'barrier-web-'));
  const app = await buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, workerThreads: 1, ...options, dataDir: options.dataDir ?? dataDir });
  await app.ready();
  return {
    app,
    dataDir,
    async close() {
      await app.close();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

/** Polls an evaluation through the API until it finishes; returns its final state. */
export async function waitForJob(app: FastifyInstance, id: string, timeoutMs = 60_000): Promise<Record<string, unknown>> {
  const t0 = Date.now();
  for (;;) {
    const r = await app.inject(`/api/evaluations/${id}`);
    const body = r.json() as Record<string, unknown>;
    if (body.finished) return body;
    if (Date.now() - t0 > timeoutMs) throw new Error(`evaluation ${id} did not finish within ${timeoutMs} ms: ${r.body}`);
    await new Promise((res) => setTimeout(res, 100));
  }
}

/** URL-encodes a flat form body as a browser would. */
export function formBody(fields: Record<string, string>): string {
  return new URLSearchParams(fields).toString();
}

export const FORM_HEADERS = { 'content-type': 'application/x-www-form-urlencoded' };
