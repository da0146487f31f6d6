/**
 * Result pages: past results, one result (verdicts, tables, charts, cautions), options side by side,
 * downloads (result JSON, series CSV, the exact scenario), delete.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { notFound } from '../plugins/errors.ts';
import { comparePageView, resultListItem, resultPageView } from '../view-models/result-view.ts';
import { seriesCsv } from '../view-models/csv.ts';
import type { WebDeps } from '../deps.ts';

type IdParams = { Params: { id: string } };

/** Download name stem of a result: the first part of its id (ids are random, so this is unique enough). */
const stem = (id: string) => `result-${id.slice(0, 8)}`;
/** Download name of a result's PDF briefing. */
export const briefingName = (id: string) => `briefing-${id.slice(0, 8)}.pdf`;

/** Sends a body as a file download of the given type and name. */
export const download = (reply: FastifyReply, type: string, filename: string, body: string | Buffer) =>
  reply.type(type).header('content-disposition', `attachment; filename="${filename}"`).send(body);

export default async function resultPages(app: FastifyInstance, deps: WebDeps) {
  const { store } = deps;
  const resultOr404 = (id: string) => {
    const r = /^[0-9a-f-]{36}$/.test(id) ? store.getResult(id) : undefined;
    if (!r) throw notFound('This result');
    return r;
  };

  app.get('/results', async (req, reply) => {
    const q = req.query as Record<string, string>;
    return reply.page('results', {
      title: 'Past results',
      results: store.listResults({ limit: 500 }).map(resultListItem),
      notice: q.deleted ? 'The result was deleted.' : '',
    });
  });

  app.get<IdParams>('/results/:id', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return reply.page('result', { r: resultPageView(stored, { briefingUrl: `/results/${stored.id}/briefing.pdf` }), title: `Results: ${stored.title}` });
  });

  app.get<IdParams>('/results/:id/compare', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return reply.page('compare', { r: comparePageView(stored), title: `Options side by side: ${stored.title}` });
  });

  app.get<IdParams>('/results/:id/result.json', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return download(reply, 'application/json; charset=utf-8', `${stem(stored.id)}.json`, `${JSON.stringify(stored.document, null, 1)}\n`);
  });

  app.get<IdParams>('/results/:id/series.csv', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return download(reply, 'text/csv; charset=utf-8', `${stem(stored.id)}-series.csv`, seriesCsv(stored.document));
  });

  app.get<IdParams>('/results/:id/scenario.json', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return download(reply, 'application/json; charset=utf-8', `${stem(stored.id)}-scenario.json`, `${JSON.stringify(stored.scenario, null, 2)}\n`);
  });

  app.get<IdParams>('/results/:id/briefing.pdf', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => {
    const stored = resultOr404(req.params.id);
    const pdf = await deps.briefings.render(stored.document, stored.scenario);
    return download(reply, 'application/pdf', briefingName(stored.id), pdf);
  });

  app.get<IdParams>('/results/:id/delete', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return reply.page('confirm-delete', {
      title: `Delete this result?`,
      what: 'result',
      name: `${stored.title} (${stored.createdAt})`,
      detail: 'The scenario it came from is not affected.',
      action: `/results/${stored.id}/delete`,
      back: `/results/${stored.id}`,
    });
  });
  app.post<IdParams>('/results/:id/delete', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    store.deleteResult(stored.id);
    return reply.redirect('/results?deleted=1', 303);
  });
}
