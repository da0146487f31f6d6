/**
 * buildApp(options): registers plugins and routes; never listens (tests use inject).
 * This first version serves a plain page listing the demo scenarios; the web issue builds it out.
 */
import Fastify, { type FastifyInstance } from 'fastify';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

export interface AppOptions {
  /** Folder of demo scenario files. */
  scenariosDir?: string;
  logger?: boolean;
}

export const DEFAULT_SCENARIOS_DIR = fileURLToPath(new URL('../scenarios/', import.meta.url));

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

export async function buildApp(options: AppOptions = {}): Promise<FastifyInstance> {
  const app = Fastify({ logger: options.logger ?? false });
  const dir = options.scenariosDir ?? DEFAULT_SCENARIOS_DIR;
  app.get('/', async (_req, reply) => {
    const items = readdirSync(dir)
      .filter((f) => f.endsWith('.json'))
      .map((f) => {
        const s = JSON.parse(readFileSync(join(dir, f), 'utf8')) as { title: string; description?: string };
        return `<li><strong>${escapeHtml(s.title)}</strong><br>${escapeHtml(s.description ?? '')}</li>`;
      });
    reply.type('text/html; charset=utf-8');
    return `<!doctype html><html lang="en"><meta charset="utf-8"><title>Barrier evaluator</title>
<h1>Barrier evaluator</h1><p>Demo scenarios (invented place and pest):</p><ul>${items.join('')}</ul>
<p>Model output supports decisions; measures rest with the local regulator and licensed practice.</p></html>`;
  });
  return app;
}
