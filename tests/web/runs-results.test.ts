/**
 * Running evaluations from the pages (worker thread, progress page, server-sent events, cancel, limits)
 * and the result pages and downloads. Uses the small fixture scenario so each run takes well under a
 * second of computing.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, waitForJob, type TestApp } from '../helpers/build-app.ts';
import { scenarioToForm } from '../../server/web/form-state.ts';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import type { ResultDocument } from '../../server/analysis/result.ts';
import { TOOL } from '../../server/version.ts';
import { readPdfText } from '../helpers/pdf.ts';

const quickText = readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8');
const quick = () => parseScenarioText(quickText);

let t: TestApp;
let resultUrl = '';
beforeAll(async () => {
  t = await buildTestApp({ limits: { maxHorizonYears: 50, maxOptions: 2, maxCells: 5000 } });
});
afterAll(async () => {
  await t.close();
});

/** Follows a run page until it hands over to the result page; returns the result URL. */
async function followRun(runUrl: string): Promise<string> {
  const id = runUrl.split('/')[2];
  const job = await waitForJob(t.app, id);
  expect(job.status).toBe('done');
  const r = await t.app.inject(runUrl);
  expect(r.statusCode).toBe(303);
  return r.headers.location as string;
}

describe('running from the pages', () => {
  it('Run answers 303 to a progress page, which hands over to the result page when done', async () => {
    const r = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/run` });
    expect(r.statusCode).toBe(303);
    const runUrl = r.headers.location as string;
    expect(runUrl).toMatch(/^\/runs\/[0-9a-f-]{36}$/);
    const page = await t.app.inject(runUrl);
    // Either still running (progress page) or already done (redirect).
    if (page.statusCode === 200) {
      expect(page.body).toContain('data-events="/runs/');
      expect(page.body).toContain('<noscript><meta http-equiv="refresh" content="2"></noscript>');
      expect(page.body).toContain('<script src="/assets/run-progress.js" defer>');
    } else expect(page.statusCode).toBe(303);
    resultUrl = await followRun(runUrl);
    expect(resultUrl).toMatch(/^\/results\/[0-9a-f-]{36}$/);
  });

  it('the event stream ends with the final state and the result link', async () => {
    const r = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/run` });
    const runUrl = r.headers.location as string;
    const events = await t.app.inject({ method: 'GET', url: `${runUrl}/events`, headers: { accept: 'text/event-stream' } });
    expect(events.statusCode).toBe(200);
    expect(events.headers['content-type']).toMatch(/text\/event-stream/);
    const blocks = events.body.trim().split(/\n\n+/);
    const last = blocks[blocks.length - 1];
    expect(last).toMatch(/^id: \d+\nevent: end\ndata: /);
    const data = JSON.parse(last.split('data: ')[1]);
    expect(data).toMatchObject({ status: 'done', finished: true, fraction: 1 });
    expect(data.resultUrl).toMatch(/^\/results\//);
    // Progress events (if the run was slow enough to send any) come first, with fractions in [0, 1].
    for (const b of blocks.slice(0, -1)) {
      expect(b).toContain('event: progress');
      const f = JSON.parse(b.split('data: ')[1]).fraction;
      expect(f >= 0 && f <= 1).toBe(true);
    }
  });

  it('Save and run from the form saves the edited scenario and runs it', async () => {
    const fields = { ...scenarioToForm(quick()), 'barrier.options[0].widthM': '450', _action: 'save' };
    const r = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/edit/run`, headers: FORM_HEADERS, payload: formBody(fields) });
    expect(r.statusCode).toBe(303);
    const url = await followRun(r.headers.location as string);
    const doc = (await t.app.inject(`${url}/result.json`)).json() as ResultDocument;
    expect(doc.options[0].widthM).toBe(450);
  });

  it('a scenario over the server limits is refused with the field and the limit', async () => {
    const fields = { ...scenarioToForm(quick()), horizonYears: '80', _action: 'save' };
    const r = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/edit/run`, headers: FORM_HEADERS, payload: formBody(fields) });
    expect(r.statusCode).toBe(400);
    expect(r.body).toContain('at most 50 yr');
    expect(r.body).toContain('value="80"');
    const cells = { ...scenarioToForm(quick()), 'numerics.cellM': '1', _action: 'save' };
    const c = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/edit/run`, headers: FORM_HEADERS, payload: formBody(cells) });
    expect(c.statusCode).toBe(400);
    expect(c.body).toMatch(/gives \d+ cells; this server allows at most 5000/);
  });

  it('unknown runs are 404 pages', async () => {
    expect((await t.app.inject('/runs/00000000-0000-0000-0000-000000000000')).statusCode).toBe(404);
    expect((await t.app.inject({ method: 'POST', url: '/runs/nope/cancel' })).statusCode).toBe(404);
  });
});

describe('the result page', () => {
  it('shows a verdict banner per option, arrivals, trees, critical width and the cautions', async () => {
    const r = await t.app.inject(resultUrl);
    expect(r.statusCode).toBe(200);
    const html = r.body;
    expect(html).toMatch(/<article class="verdict tone-\w+">/);
    expect(html).toContain('A: Cut at km 2');
    expect(html).toContain('What reaches each protected site');
    expect(html).toContain('Wendle hut (km 4.00)');
    expect(html).toContain('Trees removed and cost');
    expect(html).toContain('How wide must the clearing be?');
    expect(html).toContain('How this was computed');
    expect(html).toContain('Limits and cautions');
    expect(html).toContain('local regulator');
    expect(html).toContain(`with ${TOOL.name} ${TOOL.version}`);
    // Charts from the shared chart module, inline, each with its title and reading hint.
    for (const id of ['transect', 'front-position', 'host-profile', 'space-time-baseline', 'space-time-A']) {
      const at = html.indexOf(`data-chart="${id}"`);
      expect(at, id).toBeGreaterThan(-1);
      expect(html.slice(at, at + 2000), id).toMatch(
        /<span class="hint">[^<]+<\/span><\/figcaption>\s*<div class="chart-scroll"[^>]*aria-label="[^"]+"[^>]*><div class="chart-inner" style="min-width: \d+px"><svg xmlns/,
      );
    }
    expect(html).not.toContain('Chart not available');
  });

  it('the width–delay table says "not within the horizon" for a crossing after it, not a bare dash', async () => {
    const doc = (await t.app.inject(`${resultUrl}/result.json`)).json() as ResultDocument;
    const rows = doc.options[0].widthDelay;
    expect(rows.length).toBeGreaterThan(0);
    const html = (await t.app.inject(resultUrl)).body;
    for (const r of rows) {
      const cell = r.pinned ? 'never: held' : r.crossingYears === null ? `not within ${doc.horizonYears} yr` : `year ${r.crossingYears.toFixed(1)}`;
      expect(html, `${r.widthM} m`).toMatch(new RegExp(`<th[^>]*>${r.widthM} m</th>\\s*<td[^>]*>(yes \\(checked\\)|no)</td>\\s*<td[^>]*>${cell.replace(/[()]/g, '\\$&')}</td>`));
    }
  });

  it('shows the same arrival year as an independent evaluation of the same scenario', async () => {
    const stored = (await t.app.inject(`${resultUrl}/result.json`)).json() as ResultDocument;
    const direct = evaluateScenario(quick());
    expect(stored.baseline.arrivals).toEqual(direct.baseline.arrivals);
    const year = stored.baseline.arrivals[0].arrivalYears!;
    expect((await t.app.inject(resultUrl)).body).toContain(`year ${year.toFixed(1)}`);
  });

  it('compare page: options side by side in one table and one chart', async () => {
    const r = await t.app.inject(`${resultUrl}/compare`);
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('Options side by side');
    expect(r.body).toContain('<th scope="col">No clearing</th><th scope="col">A: Cut at km 2</th>');
    expect(r.body).toContain('At Wendle hut');
    expect(r.body.match(/<figure class="chart"/g)).toHaveLength(1);
    expect(r.body).toContain('data-chart="front-position"');
    expect(r.body.match(/<svg xmlns/g)).toHaveLength(1);
    expect(r.body).toContain('Limits and cautions');
  });

  it('downloads: result JSON, series CSV and the exact scenario', async () => {
    const json = await t.app.inject(`${resultUrl}/result.json`);
    expect(json.headers['content-disposition']).toMatch(/^attachment; filename="result-[0-9a-f]{8}\.json"$/);
    const doc = json.json() as ResultDocument;
    expect(doc.tool).toEqual(TOOL);
    expect(doc.cautions.length).toBeGreaterThan(3);
    const csv = await t.app.inject(`${resultUrl}/series.csv`);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    const lines = csv.body.trim().split('\r\n');
    expect(lines[0]).toBe('layout,time_years,right_front_km,left_front_km,total_insects_km,front_towards_clearing_is');
    const rows = lines.slice(1);
    expect(rows.length).toBe(doc.baseline.series.timesYears.length + doc.options[0].run.series.timesYears.length);
    expect(rows[0]).toBe(`"baseline",0,${doc.baseline.series.rightFrontKm[0]},${doc.baseline.series.leftFrontKm[0]},${doc.baseline.series.totalInsects[0]},`);
    expect(rows.at(-1)).toMatch(/,"(breeding front|thin non-breeding fringe only)"$/);
    expect(rows.at(-1)).toMatch(/^"Cut at km 2",6,/);
    const scenario = await t.app.inject(`${resultUrl}/scenario.json`);
    expect(parseScenarioText(scenario.body)).toEqual(quick());
  });

  it('the PDF briefing button gives the briefing of this result (drawn in a worker thread)', async () => {
    const page = await t.app.inject(resultUrl);
    expect(page.body).toContain(`href="${resultUrl}/briefing.pdf"`);
    const r = await t.app.inject(`${resultUrl}/briefing.pdf`);
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toBe('application/pdf');
    expect(r.headers['content-disposition']).toMatch(/^attachment; filename="briefing-[0-9a-f]{8}\.pdf"$/);
    const pages = await readPdfText(r.rawPayload);
    const text = pages.map((p) => p.text).join(' ');
    expect(text).toContain('Ossenvale test strip');
    expect(text).toMatch(/regulator/);
    expect((await t.app.inject(`/api/results/${resultUrl.split('/')[2]}/briefing.pdf`)).headers['content-type']).toBe('application/pdf');
    expect((await t.app.inject('/results/00000000-0000-0000-0000-000000000000/briefing.pdf')).statusCode).toBe(404);
  });

  it('lists past results, and deletes one after confirmation', async () => {
    const list = await t.app.inject('/results');
    expect(list.body).toContain(resultUrl);
    expect((await t.app.inject(`${resultUrl}/delete`)).body).toContain('This cannot be undone');
    const del = await t.app.inject({ method: 'POST', url: `${resultUrl}/delete` });
    expect(del.statusCode).toBe(303);
    expect((await t.app.inject(resultUrl)).statusCode).toBe(404);
    expect((await t.app.inject('/results/not-a-result')).statusCode).toBe(404);
  });
});

/** Runs a scenario through the API on `app`, expects it to finish, and returns the result id and document. */
async function evaluateViaApi(app: TestApp['app'], raw: unknown): Promise<{ resultId: string; doc: ResultDocument }> {
  const r = await app.inject({ method: 'POST', url: '/api/evaluations', payload: { scenario: raw } });
  const job = await waitForJob(app, r.json().id);
  expect(job.status).toBe('done');
  const resultId = job.resultId as string;
  return { resultId, doc: (await app.inject(`/api/results/${resultId}`)).json().document as ResultDocument };
}

describe('ensemble and transport', () => {
  it('an evaluation with an uncertainty and a transport block shows both sections with the regulator note', async () => {
    const raw = JSON.parse(quickText);
    raw.pest.diffusionOpen = { dist: 'uniform', min: 0.1, max: 0.5 };
    raw.uncertainty = { draws: 8, criticalWidth: false };
    raw.transport = { ratePerKm2Year: 0.01, kernel: { shape: 'exponential', meanKm: 5 }, establishmentProbability: 0.2 };
    const { resultId, doc } = await evaluateViaApi(t.app, raw);
    const html = (await t.app.inject(`/results/${resultId}`)).body;
    expect(html).toContain('Uncertainty: many runs over the ranges given');
    expect(html).toContain(`${doc.uncertainty!.completed} of 8 combinations of the uncertain values (draws spread evenly over the ranges: Latin hypercube, seed 1)`);
    const holds = doc.uncertainty!.options[0].holdsWithinHorizon;
    expect(html).toContain(`${(100 * holds.p).toFixed(1)} % ± ${(100 * holds.standardError).toFixed(1)}`);
    expect(html).toContain('People carrying the pest past the clearing');
    expect(html).toContain(doc.bypass!.regulatorNote.replace(/'/g, '&#x27;'));
  });

  it('a web evaluation runs the draws on its own pool of threads, with the numbers of a single-thread run', async () => {
    const raw = JSON.parse(quickText);
    raw.pest.diffusionOpen = { dist: 'uniform', min: 0.1, max: 0.5 };
    raw.pest.edgePreferenceOpen = { dist: 'uniform', min: 0.5, max: 0.9 };
    raw.uncertainty = { draws: 12, seed: 5, criticalWidth: false };
    const two = await buildTestApp({ ensembleThreads: 2 });
    try {
      const { doc: web } = await evaluateViaApi(two.app, raw);
      expect(web.uncertainty!.threads).toBe(2);
      // Reference: the same scenario evaluated on this thread (runEnsemble, one draw after the other).
      const single = evaluateScenario(parseScenarioText(JSON.stringify(raw)));
      expect(single.uncertainty!.threads).toBe(1);
      expect(web.uncertainty!.options).toEqual(single.uncertainty!.options);
      expect(web.uncertainty!.completed).toBe(12);
    } finally {
      await two.close();
    }
  });
});

describe('strip patterns', () => {
  it('a scenario with mosaics shows their table and charts', async () => {
    const raw = JSON.parse(quickText);
    raw.mosaics = [{ name: 'Narrow strips', forestM: 300, gapM: 100, measure: false }];
    const { resultId, doc } = await evaluateViaApi(t.app, raw);
    const html = (await t.app.inject(`/results/${resultId}`)).body;
    expect(html).toContain('Strip patterns (thinning mosaics)');
    expect(html).toContain('Narrow strips: 300 m forest / 100 m open clearing');
    expect(html).toContain(doc.mosaics![0].sentence);
    expect(html).toContain('data-chart="mosaic-speed"');
  });
});

describe('stored documents from older versions', () => {
  it('a result without the barrier-analysis fields still renders, saying what is missing', async () => {
    const doc = evaluateScenario(quick());
    const bare = { ...doc, options: doc.options.map((o) => ({ name: o.name, fromKm: o.fromKm, widthM: o.widthM, cover: o.cover, run: o.run })) } as unknown as ResultDocument;
    const deps = t.app as unknown as { inject: typeof t.app.inject };
    const { openStore } = await import('../../server/web/store.ts');
    const store = openStore(t.dataDir);
    const saved = store.saveResult({ scenarioRef: null, scenario: quick(), document: bare });
    store.close();
    const page = await deps.inject(`/results/${saved.id}`);
    expect(page.statusCode).toBe(200);
    expect(page.body).toContain('No verdict (analysis not run)');
    expect(page.body).toContain('not computed by this version');
    expect((await deps.inject(`/results/${saved.id}/compare`)).statusCode).toBe(200);
  });
});
