/**
 * Scenario pages: the list (demos and saved), overview, the form with the layout builder, the JSON
 * editor, upload, download, duplicate and delete. Every form posts and redirects; without JavaScript
 * the row buttons (add, remove, move) post the form and the page comes back with the change made.
 */
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import { parseScenario, parseScenarioText, type Scenario } from '../../model/scenario.ts';
import { InputError, ScenarioError, valueAt, type Problem } from '../../model/errors.ts';
import { applyRowAction, formStateFromBody, formToScenario, parseRowAction, ROW_GROUPS, rowIndices, scenarioToForm, type FormNote, type FormState } from '../form-state.ts';
import { inputUnit } from '../form-read.ts';
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

/** Most numbers listed as "read as" after a save. */
const MAX_READ_BACK = 8;

/** The notes of numbers read other than as typed, as one sentence after a notice. */
function readBackText(notes: readonly FormNote[]): string {
  if (!notes.length) return '';
  return ` Read as: ${notes.slice(0, MAX_READ_BACK).map((n) => `${n.path}: ${n.message}`).join('; ')}${notes.length > MAX_READ_BACK ? '; …' : ''}.`;
}

/**
 * The saved values of the inputs listed in `read` (input names, space-separated), so the page shows back how
 * a number typed with grouping, a decimal comma or a unit was read. Only the saved scenario's own values are
 * printed; the query merely names which inputs.
 */
function readBackValues(scenario: Scenario, read: string | undefined): string {
  if (typeof read !== 'string' || read === '') return '';
  const items: string[] = [];
  for (const name of read.split(' ').slice(0, MAX_READ_BACK)) {
    if (!/^[A-Za-z][\w.[\]~]{0,119}$/.test(name)) continue;
    const path = name.replace('~', '.').split(/[.[\]]+/).filter(Boolean).map((k) => (/^\d+$/.test(k) ? Number(k) : k));
    const v = valueAt(scenario, path);
    const unit = inputUnit(name) ? ` ${inputUnit(name)}` : '';
    if (typeof v === 'number') items.push(`${name}: ${v}${unit}`);
    else if (Array.isArray(v) && v.every((x) => typeof x === 'number')) items.push(`${name}: ${v.join(', ')}${unit}`);
  }
  return items.length ? ` Numbers read from what you typed: ${items.join('; ')}.` : '';
}

/** Largest scenario file accepted by upload [bytes]. */
export const UPLOAD_LIMIT_BYTES = 1_000_000;

/** What the page groups share: the scenario of a reference (or a 404) and the list page. */
interface PageKit {
  entryOr404(ref: string): CatalogueEntry;
  listPage(reply: FastifyReply, extra?: { uploadProblems?: Problem[]; notice?: string }, status?: number): unknown;
}

export default async function scenarioPages(app: FastifyInstance, deps: WebDeps) {
  const { store, catalogue } = deps;


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

  const kit: PageKit = { entryOr404, listPage };
  formPages(app, deps, kit);
  overviewPages(app, deps, kit);
  jsonEditorPages(app, deps, kit);
  fileActionPages(app, deps, kit);
}

/** The scenario form: new and edit, save and "save and run". */
function formPages(app: FastifyInstance, deps: WebDeps, kit: PageKit): void {
  const { entryOr404 } = kit;
  app.get('/scenarios/new', async (_req, reply) => renderForm(deps, reply, {}, scenarioToForm(newScenarioTemplate()), [], 200));
  app.post('/scenarios/new', { config: deps.formPost }, async (req, reply) => handleForm(deps, req, reply, {}, false));
  app.post('/scenarios/new/run', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => handleForm(deps, req, reply, {}, true));

  app.get<RefParams>('/scenarios/:ref/edit', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    return renderForm(deps, reply, { entry }, scenarioToForm(entry.scenario), [], 200, {
      notice: entry.readOnly ? 'This is a demo scenario: saving creates your own copy and leaves the demo unchanged.' : '',
    });
  });
  app.post<RefParams>('/scenarios/:ref/edit', { config: deps.formPost }, async (req, reply) => handleForm(deps, req, reply, { entry: entryOr404(req.params.ref) }, false));
  app.post<RefParams>('/scenarios/:ref/edit/run', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) =>
    handleForm(deps, req, reply, { entry: entryOr404(req.params.ref) }, true),
  );
}

/** The scenario a form edits (none for a new one). */
interface FormTarget {
  entry?: CatalogueEntry;
}

function formUrls(t: FormTarget) {
  const base = t.entry ? `/scenarios/${encodeURIComponent(t.entry.ref)}/edit` : '/scenarios/new';
  return { action: base, runAction: `${base}/run`, cancel: t.entry ? `/scenarios/${encodeURIComponent(t.entry.ref)}` : '/scenarios' };
}

function renderForm(deps: WebDeps, reply: FastifyReply, t: FormTarget, state: FormState, problems: Problem[], status: number, extra: { notice?: string; focus?: string } = {}) {
  const view = formView(state, problems, { maxHorizonYears: deps.limits.maxHorizonYears });
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
}

/** Handles a form post: a row button, a check, a save, or save-and-run. */
async function handleForm(deps: WebDeps, req: FastifyRequest, reply: FastifyReply, t: FormTarget, run: boolean) {
  const { store, jobs, limits } = deps;
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
    return renderForm(deps, reply, t, next, [], 200, { focus });
  }
  const { input, problems: formProblems, notes } = formToScenario(state);
  let scenario: Scenario | undefined;
  const problems = [...formProblems];
  try {
    scenario = parseScenario(input);
  } catch (e) {
    if (!(e instanceof ScenarioError)) throw e;
    // A number the form refused (ambiguous "1,200", a foreign unit) is reported once, in the form's words.
    const refused = new Set(formProblems.map((p) => p.path.replace(/~.*$/, '')));
    problems.push(...e.problems.filter((p) => !refused.has(p.path) && ![...refused].some((r) => p.path.startsWith(`${r}.`))));
  }
  if (problems.length || !scenario) return renderForm(deps, reply, t, state, problems, 400);
  // Check answers what Save and run would: the schema and this server's limits (one limit everywhere).
  if (run || actionText === 'check') {
    try {
      checkLimits(scenario, limits);
    } catch (e) {
      if (e instanceof InputError) return renderForm(deps, reply, t, state, e.problems, 400);
      throw e;
    }
    // A nearly full disk is refused before the run, not after it (507 naming DATA_DIR).
    store.checkSpace();
  }
  if (actionText === 'check' && !run) return renderForm(deps, reply, t, state, [], 200, { notice: `No problems found. The scenario has not been saved yet.${readBackText(notes)}` });
  const id = t.entry && !t.entry.readOnly ? savedId(t.entry.ref) : undefined;
  const ref = id !== undefined && store.updateScenario(id, scenario) ? String(id) : String(store.createScenario(scenario).id);
  if (run) {
    const job = jobs.submit({ scenario, scenarioRef: ref });
    return reply.redirect(`/runs/${job.id}`, 303);
  }
  // Numbers read other than as typed ("1 200 m" as 1200) are shown back on the scenario page.
  const read = notes.length ? `&read=${encodeURIComponent([...new Set(notes.map((n) => n.path))].slice(0, MAX_READ_BACK).join(' '))}` : '';
  return reply.redirect(`/scenarios/${ref}?saved=1${read}`, 303);
}

/** A scenario's overview, its run button and its JSON download. */
function overviewPages(app: FastifyInstance, deps: WebDeps, kit: PageKit): void {
  const { store, jobs, limits } = deps;
  const { entryOr404 } = kit;
  app.get<RefParams>('/scenarios/:ref', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const q = req.query as Record<string, string>;
    return reply.page('scenario', {
      title: entry.title,
      s: scenarioView(entry),
      notice: q.saved ? `Saved.${readBackValues(entry.scenario, q.read)}` : '',
      results: listWithVerdicts(store, store.listResults({ scenarioRef: entry.ref, limit: 20 })).map(resultListItem),
      limits,
    });
  });

  app.post<RefParams>('/scenarios/:ref/run', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    checkLimits(entry.scenario, limits);
    store.checkSpace();
    const job = jobs.submit({ scenario: entry.scenario, scenarioRef: entry.ref });
    return reply.redirect(`/runs/${job.id}`, 303);
  });

  app.get<RefParams>('/scenarios/:ref/scenario.json', async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const name = entry.kind === 'demo' ? entry.file! : `scenario-${entry.ref}.json`;
    return download(reply, 'application/json; charset=utf-8', name, `${JSON.stringify(entry.scenario, null, 2)}\n`);
  });

}

/** The JSON editor of a saved scenario. */
function jsonEditorPages(app: FastifyInstance, deps: WebDeps, kit: PageKit): void {
  const { store } = deps;
  const { entryOr404 } = kit;
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
  app.post<RefParams>('/scenarios/:ref/json', { config: deps.formPost }, async (req, reply) => {
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

}

/** Upload, duplicate and delete. */
function fileActionPages(app: FastifyInstance, deps: WebDeps, kit: PageKit): void {
  const { store } = deps;
  const { entryOr404, listPage } = kit;
  app.post('/scenarios/upload', { config: deps.formPost }, async (req, reply) => {
    if (!req.isMultipart()) {
      return listPage(reply, { uploadProblems: [{ path: 'file', value: undefined, message: 'choose a scenario file (.json) to upload' }] }, 400);
    }
    // A truncated or malformed upload (cut off mid-file, no boundary, a damaged part header) is the sender's
    // fault: 400 with what to do, never a 500.
    const damaged = (e: unknown) => {
      req.log.info({ err: e }, 'damaged upload');
      return listPage(
        reply,
        { uploadProblems: [{ path: 'file', value: undefined, message: `the upload arrived incomplete or damaged (${(e as Error).message}); choose the file and upload it again` }] },
        400,
      );
    };
    let file: Awaited<ReturnType<typeof req.file>>;
    try {
      file = await req.file({ limits: { fileSize: UPLOAD_LIMIT_BYTES, files: 1 } });
    } catch (e) {
      return damaged(e);
    }
    if (!file) return listPage(reply, { uploadProblems: [{ path: 'file', value: undefined, message: 'choose a scenario file (.json) to upload' }] }, 400);
    const filename = file.filename;
    const tooLarge = () => listPage(reply, { uploadProblems: [{ path: 'file', value: filename, message: `is larger than ${UPLOAD_LIMIT_BYTES / 1e6} MB, the most this server accepts` }] }, 413);
    let buffer: Buffer;
    try {
      buffer = await file.toBuffer();
    } catch (e) {
      // The multipart reader throws once the file passes the size limit.
      if ((e as { code?: string }).code === 'FST_REQ_FILE_TOO_LARGE') return tooLarge();
      return damaged(e);
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

  app.post<RefParams>('/scenarios/:ref/duplicate', { config: deps.formPost }, async (req, reply) => {
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
  app.post<RefParams>('/scenarios/:ref/delete', { config: deps.formPost }, async (req, reply) => {
    const entry = entryOr404(req.params.ref);
    const id = savedId(entry.ref);
    if (entry.readOnly || id === undefined) throw conflict('Demo scenarios cannot be deleted.');
    store.deleteScenario(id);
    return reply.redirect('/scenarios?deleted=1', 303);
  });
}
