/**
 * Scenario pages: the list (demos and saved), overview, the form with the layout builder, the JSON
 * editor, upload, download, duplicate and delete. Every form posts and redirects; without JavaScript
 * the row buttons (add, remove, move) post the form and the page comes back with the change made.
 */
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { parseScenario, parseScenarioText, type Scenario } from '../../model/scenario.ts';
import { InputError, ScenarioError, type Problem } from '../../model/errors.ts';
import { applyRowAction, formStateFromBody, formToScenario, parseRowAction, ROW_GROUPS, rowIndices, scenarioToForm, type FormState } from '../form-state.ts';
import { formView, inputId, newScenarioTemplate } from '../view-models/scenario-form.ts';
import { scenarioListItem, scenarioView } from '../view-models/scenario-view.ts';
import { resultListItem } from '../view-models/result-view.ts';
import { listWithVerdicts } from './result-pages.ts';
import { problemItems } from '../view-models/problems.ts';
import { checkLimits } from '../limits.ts';
import { savedId, type CatalogueEntry } from '../catalogue.ts';
import { conflict, notFound } from '../plugins/errors.ts';
import type { WebDeps } from '../deps.ts';
import { download } from './result-pages.ts';

type RefParams = { Params: { ref: string } };

/** Largest scenario file accepted by upload [bytes]. */
export const UPLOAD_LIMIT_BYTES = 1_000_000;

export default async function scenarioPages(app: FastifyInstance, deps: WebDeps) {
  const { store, catalogue, jobs, limits } = deps;

  const entryOr404 = (ref: string): CatalogueEntry => {
    const e = catalogue.get(ref);
    if (!e) throw notFound(`Scenario "${ref}"`);
    return e;
  };

  const listPage = (reply: FastifyReply, extra: { uploadProblems?: Problem[]; notice?: string } = {}, status = 200) => {
    const all = catalogue.list().map(scenarioListItem);
    return reply.page(
      'scenarios',
      {
        title: 'Scenarios',
        demos: all.filter((s) => s.demo).map((s) => ({ ...s, description: catalogue.get(s.ref)?.description ?? '' })),
        saved: all.filter((s) => !s.demo),
        results: store.listResults({ limit: 10 }).map(resultListItem),
        uploadProblems: problemItems(extra.uploadProblems ?? []),
        notice: extra.notice ?? '',
        // After a failed upload the problems sit at the top; the script moves the focus (and the view) there.
        scripts: extra.uploadProblems?.length ? ['/assets/focus-problems.js'] : [],
      },
      status,
    );
  };

  app.get('/', async (_req, reply) => listPage(reply));
  app.get('/scenarios', async (req, reply) => {
    const q = req.query as Record<string, string>;
    return listPage(reply, { notice: q.deleted ? 'The scenario was deleted.' : '' });
  });

  // ---- the form -------------------------------------------------------------------------------
  interface FormTarget {
    entry?: CatalogueEntry;
  }
  const formUrls = (t: FormTarget) => {
    const base = t.entry ? `/scenarios/${encodeURIComponent(t.entry.ref)}/edit` : '/scenarios/new';
    return { action: base, runAction: `${base}/run`, cancel: t.entry ? `/scenarios/${encodeURIComponent(t.entry.ref)}` : '/scenarios' };
  };
  const renderForm = (reply: FastifyReply, t: FormTarget, state: FormState, problems: Problem[], status: number, extra: { notice?: string; focus?: string } = {}) => {
    const view = formView(state, problems, { maxHorizonYears: limits.maxHorizonYears });
    return reply.page(
      'scenario-form',
      {
        title: problems.length ? `Problems to correct — ${t.entry?.title ?? 'New scenario'}` : t.entry ? `Edit: ${t.entry.title}` : 'New scenario',
        heading: t.entry ? `Edit scenario` : 'New scenario',
        scenarioTitle: t.entry?.title ?? '',
        readOnly: t.entry?.readOnly ?? false,
        urls: formUrls(t),
        notice: extra.notice ?? '',
        focusId: extra.focus ? inputId(extra.focus) : '',
        form: view,
        scripts: ['/assets/scenario-form.js'],
      },
      status,
    );
  };

  /** Handles a form post: a row button, a check, a save, or save-and-run. */
  const handleForm = async (req: FastifyRequest, reply: FastifyReply, t: FormTarget, run: boolean) => {
    const body = (req.body ?? {}) as Record<string, unknown>;
    const state = formStateFromBody(body);
    const actionText = typeof body._action === 'string' ? body._action : Array.isArray(body._action) ? String(body._action.at(-1)) : '';
    const rowAction = parseRowAction(actionText);
    if (rowAction && !run) {
      const next = applyRowAction(state, rowAction);
      const group = ROW_GROUPS[rowAction.group];
      const rows = rowIndices(next, group.prefix);
      const at = rowAction.kind === 'add' ? rows.length - 1 : rowAction.kind === 'up' ? rowAction.index - 1 : rowAction.kind === 'down' ? rowAction.index + 1 : -1;
      const focus = at >= 0 && at < rows.length ? `${group.prefix}[${at}].${group.columns[rowAction.group === 'segments' ? 2 : 0].path}` : undefined;
      return renderForm(reply, t, next, [], 200, { focus });
    }
    const { input, problems: formProblems } = formToScenario(state);
    let scenario: Scenario | undefined;
    const problems = [...formProblems];
    try {
      scenario = parseScenario(input);
    } catch (e) {
      if (!(e instanceof ScenarioError)) throw e;
      problems.push(...e.problems);
    }
    if (problems.length || !scenario) return renderForm(reply, t, state, problems, 400);
    // Check answers what Save and run would: the schema and this server's limits (one limit everywhere).
    if (run || actionText === 'check') {
      try {
        checkLimits(scenario, limits);
      } catch (e) {
        if (e instanceof InputError) return renderForm(reply, t, state, e.problems, 400);
        throw e;
      }
    }
    if (actionText === 'check' && !run) return renderForm(reply, t, state, [], 200, { notice: 'No problems found. The scenario has not been saved yet.' });
    const id = t.entry && !t.entry.readOnly ? savedId(t.entry.ref) : undefined;
    const ref = id !== undefined && store.updateScenario(id, scenario) ? String(id) : String(store.createScenario(scenario).id);
    if (run) {
      const job = jobs.submit({ scenario, scenarioRef: ref });
      return reply.redirect(`/runs/${job.id}`, 303);
    }
    return reply.redirect(`/scenarios/${ref}?saved=1`, 303);
  };

  app.get('/scenarios/new', async (_req, reply) => renderForm(reply, {}, scenarioToForm(newScenarioTemplate()), [], 200));
  app.post('/scenarios/new', async (req, reply) => handleForm(req, reply, {}, false));
  app.post('/scenarios/new/run', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => handleForm(req, reply, {}, true));

  app.get<RefParams>('/scenarios/:ref/edit', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    return renderForm(reply, { entry }, scenarioToForm(entry.scenario), [], 200, {
      notice: entry.readOnly ? 'This is a demo scenario: saving creates your own copy and leaves the demo unchanged.' : '',
    });
  });
  app.post<RefParams>('/scenarios/:ref/edit', async (req, reply) => handleForm(req, reply, { entry: entryOr404(req.params.ref) }, false));
  app.post<RefParams>('/scenarios/:ref/edit/run', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) =>
    handleForm(req, reply, { entry: entryOr404(req.params.ref) }, true),
  );

  // ---- overview, run, download ----------------------------------------------------------------
  app.get<RefParams>('/scenarios/:ref', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const q = req.query as Record<string, string>;
    return reply.page('scenario', {
      title: entry.title,
      s: scenarioView(entry),
      notice: q.saved ? 'Saved.' : '',
      results: listWithVerdicts(store, store.listResults({ scenarioRef: entry.ref, limit: 20 })).map(resultListItem),
      limits,
    });
  });

  app.post<RefParams>('/scenarios/:ref/run', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    checkLimits(entry.scenario, limits);
    const job = jobs.submit({ scenario: entry.scenario, scenarioRef: entry.ref });
    return reply.redirect(`/runs/${job.id}`, 303);
  });

  app.get<RefParams>('/scenarios/:ref/scenario.json', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const name = entry.kind === 'demo' ? entry.file! : `scenario-${entry.ref}.json`;
    return download(reply, 'application/json; charset=utf-8', name, `${JSON.stringify(entry.scenario, null, 2)}\n`);
  });

  // ---- JSON editor ----------------------------------------------------------------------------
  const jsonPage = (reply: FastifyReply, entry: CatalogueEntry, text: string, problems: Problem[], status: number, notice = '') =>
    reply.page(
      'scenario-json',
      {
        title: `JSON: ${entry.title}`,
        s: scenarioView(entry),
        text,
        problems: problemItems(problems),
        notice,
        readOnly: entry.readOnly,
      },
      status,
    );
  app.get<RefParams>('/scenarios/:ref/json', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    return jsonPage(reply, entry, JSON.stringify(entry.scenario, null, 2), [], 200);
  });
  app.post<RefParams>('/scenarios/:ref/json', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const body = (req.body ?? {}) as Record<string, unknown>;
    const text = typeof body.text === 'string' ? body.text : '';
    let scenario: Scenario;
    try {
      scenario = parseScenarioText(text);
    } catch (e) {
      if (e instanceof ScenarioError) return jsonPage(reply, entry, text, e.problems, 400);
      throw e;
    }
    if (body._action === 'check') return jsonPage(reply, entry, text, [], 200, 'No problems found. The scenario has not been saved yet.');
    const id = entry.readOnly ? undefined : savedId(entry.ref);
    const ref = id !== undefined && store.updateScenario(id, scenario) ? String(id) : String(store.createScenario(scenario).id);
    return reply.redirect(`/scenarios/${ref}?saved=1`, 303);
  });

  // ---- upload, duplicate, delete --------------------------------------------------------------
  app.post('/scenarios/upload', async (req, reply) => {
    if (!req.isMultipart()) {
      return listPage(reply, { uploadProblems: [{ path: 'file', value: undefined, message: 'choose a scenario file (.json) to upload' }] }, 400);
    }
    const file = await req.file({ limits: { fileSize: UPLOAD_LIMIT_BYTES, files: 1 } });
    if (!file) return listPage(reply, { uploadProblems: [{ path: 'file', value: undefined, message: 'choose a scenario file (.json) to upload' }] }, 400);
    const tooLarge = () => listPage(reply, { uploadProblems: [{ path: 'file', value: file.filename, message: `is larger than ${UPLOAD_LIMIT_BYTES / 1e6} MB, the most this server accepts` }] }, 413);
    let buffer: Buffer;
    try {
      buffer = await file.toBuffer();
    } catch (e) {
      // The multipart reader throws once the file passes the size limit.
      if ((e as { code?: string }).code === 'FST_REQ_FILE_TOO_LARGE') return tooLarge();
      throw e;
    }
    if (file.file.truncated) return tooLarge();
    let scenario: Scenario;
    try {
      scenario = parseScenarioText(buffer.toString('utf8'));
    } catch (e) {
      if (e instanceof ScenarioError) return listPage(reply, { uploadProblems: e.problems }, 400);
      throw e;
    }
    const saved = store.createScenario(scenario);
    return reply.redirect(`/scenarios/${saved.id}?saved=1`, 303);
  });

  app.post<RefParams>('/scenarios/:ref/duplicate', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const title = `Copy of ${entry.scenario.title}`.slice(0, 300);
    const saved = store.createScenario({ ...entry.scenario, title });
    return reply.redirect(`/scenarios/${saved.id}/edit`, 303);
  });

  app.get<RefParams>('/scenarios/:ref/delete', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    if (entry.readOnly) throw conflict('Demo scenarios cannot be deleted.');
    return reply.page('confirm-delete', {
      title: `Delete ${entry.title}?`,
      what: 'scenario',
      name: entry.title,
      detail: 'Past results computed from it are kept (each keeps its own copy of the scenario).',
      action: `/scenarios/${encodeURIComponent(entry.ref)}/delete`,
      back: `/scenarios/${encodeURIComponent(entry.ref)}`,
    });
  });
  app.post<RefParams>('/scenarios/:ref/delete', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const id = savedId(entry.ref);
    if (entry.readOnly || id === undefined) throw conflict('Demo scenarios cannot be deleted.');
    store.deleteScenario(id);
    return reply.redirect('/scenarios?deleted=1', 303);
  });
}
