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
      fields: (Object.values(FIELDS) as FieldSpec[]).map((f) => ({
        label: f.label,
        unit: f.unit || '—',
        allowed: describeRange(f),
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

  app.get('/api', async (_req, reply) => {
    const doc = app.swagger() as unknown as OpenApiDoc;
    const routes = Object.entries(doc.paths).flatMap(([path, methods]) =>
      Object.entries(methods).map(([method, op]) => ({
        method: method.toUpperCase(),
        path,
        summary: op.summary ?? '',
        description: op.description ?? '',
        tag: op.tags?.[0] ?? '',
      })),
    );
    return reply.page('api', { title: 'JSON API', routes });
  });
}
