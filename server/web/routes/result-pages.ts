/**
 * Result pages: past results, one result (verdicts, tables, charts, cautions), options side by side,
 * downloads (result JSON, series CSV, the exact scenario), delete.
 */
import type { FastifyInstance, FastifyReply } from 'fastify';
import { notFound } from '../plugins/errors.ts';
import { resultListItem, resultPageView, resultTables, type ResultListEntry } from '../view-models/result-view.ts';
import { comparePageView } from '../view-models/compare-view.ts';
import { compareResultsView } from '../view-models/compare-results.ts';
import { seriesCsv, tableCsv } from '../view-models/csv.ts';
import { optionKey } from '../../report/charts/index.ts';
import { VERDICT_PLAIN } from '../../report/decision.ts';
import { integer } from '../../report/format.ts';
import type { Store, StoredResult, StoredResultSummary } from '../store.ts';
import type { WebDeps } from '../deps.ts';
import { briefingNow } from '../briefings.ts';

type IdParams = { Params: { id: string } };

/** Result summaries with each option's verdict and the scenario fingerprint, so identical titles can be told apart. */
export function listWithVerdicts(store: Store, list: StoredResultSummary[]): ResultListEntry[] {
  const digests = store.resultDigests(list.map((r) => r.id));
  return list.map((r) => {
    const d = digests.get(r.id);
    return {
      ...r,
      fingerprint: d?.fingerprint,
      verdicts: (d?.options ?? []).map((o, k) => {
        const label = o.kind ? (VERDICT_PLAIN[o.kind as keyof typeof VERDICT_PLAIN] ?? o.kind) : 'no verdict';
        return `${optionKey(k)} ${Number.isFinite(o.widthM) ? `${integer(o.widthM)} m` : o.name}: ${label.toLowerCase()}${o.transportDecides ? ' — transport decides' : ''}`;
      }),
    };
  });
}

/** Download name stem of a result: the first part of its id (ids are random, so this is unique enough). */
const stem = (id: string) => `result-${id.slice(0, 8)}`;
/** Download name of a result's PDF briefing. */
export const briefingName = (id: string) => `briefing-${id.slice(0, 8)}.pdf`;

/** Sends a body as a file download of the given type and name. */
export const download = (reply: FastifyReply, type: string, filename: string, body: string | Buffer) =>
  reply.type(type).header('content-disposition', `attachment; filename="${filename}"`).send(body);

export default async function resultPages(app: FastifyInstance, deps: WebDeps) {
  const resultOr404 = (id: string) => {
    const r = /^[0-9a-f-]{36}$/.test(id) ? deps.store.getResult(id) : undefined;
    if (!r) throw notFound('This result');
    return r;
  };
  pageRoutes(app, deps, resultOr404);
  downloadRoutes(app, deps, resultOr404);
  deleteRoutes(app, deps, resultOr404);
}

type ResultOr404 = (id: string) => StoredResult;

/** The pages: past results, one result, its options side by side, two results side by side. */
function pageRoutes(app: FastifyInstance, deps: WebDeps, resultOr404: ResultOr404) {
  const { store } = deps;
  app.get('/results', async (req, reply) => {
    const q = req.query as Record<string, string>;
    return reply.page('results', {
      title: 'Past results',
      results: listWithVerdicts(store, store.listResults({ limit: 500 })).map(resultListItem),
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

  app.get<{ Querystring: { a?: string; b?: string; pick?: string | string[] } }>('/compare-results', async (req, reply) => {
    const q = req.query;
    const picks = [q.a, q.b, ...(Array.isArray(q.pick) ? q.pick : q.pick ? [q.pick] : [])].filter((x): x is string => typeof x === 'string' && x.length > 0);
    if (!picks.length) return reply.redirect('/results', 303);
    const a = resultOr404(picks[0]);
    if (picks.length < 2) {
      const others = listWithVerdicts(store, store.listResults({ limit: 200 }).filter((r) => r.id !== a.id)).map(resultListItem);
      const first = resultListItem({ ...a, verdicts: [] });
      return reply.page('compare-results', { title: 'Compare two results', first, others });
    }
    const b = resultOr404(picks[1]);
    return reply.page('compare-results', { title: `Two results side by side`, c: compareResultsView(a, b), cautions: a.document.cautions });
  });
}

/** A result's downloads: the document, the series and each table as CSV, the exact scenario, the briefing. */
function downloadRoutes(app: FastifyInstance, deps: WebDeps, resultOr404: ResultOr404) {
  app.get<IdParams>('/results/:id/result.json', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return download(reply, 'application/json; charset=utf-8', `${stem(stored.id)}.json`, `${JSON.stringify(stored.document, null, 1)}\n`);
  });

  app.get<IdParams>('/results/:id/series.csv', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return download(reply, 'text/csv; charset=utf-8', `${stem(stored.id)}-series.csv`, seriesCsv(stored.document));
  });

  app.get<{ Params: { id: string; table: string } }>('/results/:id/tables/:table', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    const name = req.params.table.replace(/\.csv$/, '');
    const table = resultTables(stored).get(name);
    if (!table) throw notFound('This table');
    return download(reply, 'text/csv; charset=utf-8', `${stem(stored.id)}-${name}.csv`, tableCsv(table));
  });

  app.get<IdParams>('/results/:id/scenario.json', async (req, reply) => {
    const stored = resultOr404(req.params.id);
    return download(reply, 'application/json; charset=utf-8', `${stem(stored.id)}-scenario.json`, `${JSON.stringify(stored.scenario, null, 2)}\n`);
  });

  app.get<IdParams>('/results/:id/briefing.pdf', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => {
    const stored = resultOr404(req.params.id);
    const pdf = await briefingNow(deps.briefings, stored.id);
    return download(reply, 'application/pdf', briefingName(stored.id), pdf);
  });
}

/** Deleting a result: the confirmation page and the post. */
function deleteRoutes(app: FastifyInstance, deps: WebDeps, resultOr404: ResultOr404) {
  const { store } = deps;
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
