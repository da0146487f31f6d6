/**
 * Reference pages: the field guide (every input with unit, allowed and typical range, help, default and
 * its source), the cautions and model limits, and a readable list of the JSON API.
 */
import type { FastifyInstance } from 'fastify';
import { FIELDS, describeRange, type FieldSpec } from '../../model/fields.ts';
import { CAUTIONS, MODEL_LIMITS } from '../../analysis/evaluate/cautions.ts';
import type { WebDeps } from '../deps.ts';

interface OpenApiDoc {
  paths: Record<string, Record<string, { summary?: string; description?: string; tags?: string[] }>>;
}

export default async function referencePages(app: FastifyInstance, deps: WebDeps) {
  app.get('/fields', async (_req, reply) =>
    reply.page('fields', {
      title: 'Field guide',
      fields: (Object.entries(FIELDS) as [string, FieldSpec][]).map(([key, f]) => ({
        label: f.label,
        unit: f.unit || 'none (a share or a count)',
        // The horizon this server runs, the same limit Check and Save and run apply.
        allowed: key === 'horizonYears' ? `> 0 and ≤ ${deps.limits.maxHorizonYears} yr on this server (the file format allows up to ${f.max})` : describeRange(f),
        typical: f.typical,
        defaultText: f.defaultValue !== undefined ? `${f.defaultValue}${f.unit ? ` ${f.unit}` : ''}` : 'required',
        help: f.help,
        source: f.source,
        uncertain: f.uncertain === true,
      })),
      limits: deps.limits,
      modelLimits: MODEL_LIMITS,
      cautions: CAUTIONS,
    }),
  );

  app.get('/api', async (req, reply) => {
    const doc = app.swagger() as unknown as OpenApiDoc;
    const routes = Object.entries(doc.paths).flatMap(([path, methods]) =>
      Object.entries(methods).map(([method, op]) => ({
        method: method.toUpperCase(),
        path,
        summary: codeParts(op.summary ?? ''),
        description: codeParts(op.description ?? ''),
        tag: op.tags?.[0] ?? '',
      })),
    );
    // The examples use the address this page was reached at, not a fixed port.
    const host = /^[A-Za-z0-9.:[\]-]+$/.test(req.headers.host ?? '') ? req.headers.host : `127.0.0.1:${app.server.address() && typeof app.server.address() === 'object' ? (app.server.address() as { port: number }).port : 3000}`;
    return reply.page('api', { title: 'JSON API', routes, origin: `${req.protocol}://${host}` });
  });
}

/** Splits text with `code` spans into parts for the template (no raw backticks on the page). */
export function codeParts(text: string): { text: string; code: boolean }[] {
  return text
    .split('`')
    .map((t, i) => ({ text: t, code: i % 2 === 1 }))
    .filter((p) => p.text.length > 0);
}
