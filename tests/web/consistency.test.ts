/**
 * One number per question, shown the same everywhere. For each demo scenario the result page, the compare
 * page, the PDF briefing's text, the CLI summary and the result JSON must agree on: the recommended minimum
 * width (web, CLI, PDF cover), the spread rate beyond each clearing (one computation: the barrier analysis's
 * `speeds.optionKmPerYear`; a held front shows "none", never a negative rate), the Allee threshold (one
 * format), the transport risk beside each verdict, and that a held option never lists a breeding arrival
 * at a site beyond it. The expected texts are written here from the JSON with the test's own formatting, so
 * a formatter that drifts fails. Also: one horizon limit (field guide, form, Check and Save and run) and the
 * number of delay-curve widths the form promises against the runs.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTestApp, formBody, FORM_HEADERS, QUICK_REF, type TestApp } from '../helpers/build-app.ts';
import { demoResult, DEMO_NAMES, type DemoResult } from '../helpers/demo-results.ts';
import { readPdfText, squash } from '../helpers/pdf.ts';
import { openStore } from '../../server/web/store.ts';
import { renderBriefing } from '../../server/report/briefing.ts';
import { textSummary } from '../../server/report/text-summary.ts';
import { scenarioToForm } from '../../server/web/form-state.ts';
import { DEFAULT_LIMITS } from '../../server/web/limits.ts';
import type { ResultDocument } from '../../server/analysis/result.ts';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { readFileSync } from 'node:fs';

/** Page text without tags and entities, whitespace collapsed (what a reader sees). */
function visible(html: string): string {
  return html
    .replace(/<svg[\s\S]*?<\/svg>/g, ' ')
    .replace(/<(script|style)[\s\S]*?<\/\1>/g, ' ')
    .replace(/<[^>]+>/g, ' ')
    .replace(/&#x27;/g, "'")
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, '&')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&#x3D;/g, '=')
    .replace(/[ \t\r\n]+/g, ' ');
}

/** The test's own number formats (thin space thousands, true minus), independent of server/report/format.ts. */
const thousands = (x: number) => Math.round(x).toString().replace(/\B(?=(\d{3})+(?!\d))/g, '\u202f');
const squashAll = (s: string) => squash(s).replace(/\u202f/g, '');

function expectedSpread(o: ResultDocument['options'][number]): string {
  if (o.pinned || o.verdict.kind === 'holds' || o.verdict.kind === 'marginal') return 'none: the front is held at the clearing';
  if (o.crossingYears.option === null) return 'none within the horizon: the front has not crossed';
  const v = o.speeds.optionKmPerYear;
  if (v === null) return 'not measured';
  if (v <= 0) return 'none: the front is not advancing';
  return `${v.toFixed(Math.abs(v) < 0.1 ? 3 : 2)} km/yr`;
}

let t: TestApp;
const demos = new Map<string, { d: DemoResult; id: string; page: string; compare: string; pdf: string; pdfCover: string; cli: string }>();

beforeAll(async () => {
  t = await buildTestApp();
  const store = openStore(t.dataDir);
  for (const name of DEMO_NAMES) {
    const d = demoResult(name);
    const saved = store.saveResult({ scenarioRef: `demo-${name}`, scenario: d.scenario, document: d.doc });
    const page = visible((await t.app.inject(`/results/${saved.id}`)).body);
    const compare = visible((await t.app.inject(`/results/${saved.id}/compare`)).body);
    const pages = await readPdfText(await renderBriefing(d.doc, { scenario: d.scenario, rawInput: d.raw, creationDate: new Date('2031-05-04T09:30:00Z') }));
    demos.set(name, { d, id: saved.id, page, compare, pdf: pages.map((p) => p.text).join(' '), pdfCover: pages[0].text, cli: textSummary(d.doc) });
  }
  store.close();
}, 600_000);
afterAll(async () => t?.close());

describe.each(DEMO_NAMES.map((n) => [n]))('demo %s: web, compare, PDF, CLI and JSON agree', (name) => {
  const get = () => demos.get(name)!;

  it('one recommended minimum width on the results page, the CLI summary and the PDF cover', () => {
    const { d, page, cli, pdfCover } = get();
    const rec = d.doc.recommendedWidth!;
    expect(rec, 'the result document carries the recommendation').toBeDefined();
    if (rec.widthM === null) {
      for (const text of [page, cli, pdfCover]) expect(text).toContain('No recommended width');
      return;
    }
    const sentence = `Recommended minimum width: ${thousands(rec.widthM)} m.`;
    expect(page).toContain(sentence);
    expect(cli).toContain(sentence);
    expect(squashAll(pdfCover)).toContain(squashAll(sentence));
    // Exactly one recommended width per scenario on each: every "Recommended minimum width" names the same number.
    for (const text of [page, cli]) {
      const all = [...text.matchAll(/Recommended minimum width: ([\d\u202f]+) m/g)].map((m) => m[1]);
      expect(new Set(all).size, `${all}`).toBe(1);
    }
    // The phase-plane value is explained where it differs, never shown bare beside the recommendation.
    if (rec.phasePlaneAssumesIntactHosts && rec.phasePlaneM !== null) expect(page).toContain('keeps the host trees at their present stocking');
  });

  it('the spread rate beyond each clearing is one number on the results page, compare page, CLI and PDF', () => {
    const { d, page, compare, cli, pdf } = get();
    for (const o of d.doc.options) {
      const want = expectedSpread(o);
      expect(page).toContain(want);
      expect(compare).toContain(want);
      expect(cli).toContain(`Spread rate beyond the clearing: ${want}`);
      expect(squashAll(pdf)).toContain(squashAll(`Spread rate beyond the clearing: ${want}`));
    }
    // No negative fitted rate and no "km none" for a front that does not move.
    for (const text of [page, compare]) {
      expect(text).not.toMatch(/−\d[\d.]* km\/yr/);
      expect(text).not.toContain('km none');
    }
  });

  it('the Allee threshold is one format on the web page, the CLI summary and the PDF', () => {
    const { d, page, cli, pdf } = get();
    const a = d.doc.model.alleeThreshold;
    const want = a === null ? 'none (no Allee effect)' : `${(100 * a).toFixed(1)} % of capacity`;
    expect(page).toContain(want);
    expect(cli).toContain(want);
    expect(squashAll(pdf)).toContain(squashAll(want));
  });

  it('the transport risk stands beside every verdict (banner, side-by-side table, PDF cover, CLI) and the headline says when transport decides', () => {
    const { d, page, compare, cli, pdfCover } = get();
    const b = d.doc.bypass;
    if (!b) {
      expect(page).not.toContain('People carrying the pest:');
      return;
    }
    for (const o of b.options) {
      const p = o.ensemble?.p ?? o.probability;
      const pct = `${Math.round(100 * p)} %`;
      expect(page).toContain(`People carrying the pest: ${pct} chance`);
      expect(compare).toContain(`${pct} within ${d.doc.horizonYears} yr`);
      expect(cli).toContain(`people carrying the pest past it: ${pct} within ${d.doc.horizonYears} yr`);
      expect(squashAll(pdfCover)).toContain(squashAll(`People carrying the pest: ${pct} chance`));
      if (o.transportDecides) {
        for (const text of [page, compare, cli, pdfCover]) expect(squashAll(text)).toContain(squashAll('Transport, not the width, decides'));
        expect(page).not.toMatch(/<article class="verdict tone-good"/);
      }
    }
  });

  it('a held option never lists a breeding arrival at a site beyond it; a fringe is called a fringe', () => {
    const { d, page, cli } = get();
    d.doc.options.forEach((o, k) => {
      o.sites.forEach((s, i) => {
        const runYear = o.run.arrivals[i].arrivalYears;
        if (!s.beyondBarrier) return;
        if (s.kind === 'holds' || s.kind === 'marginal') {
          if (runYear !== null) {
            expect(page, `${o.name} / ${s.name}`).toContain(`a thin non-breeding fringe is detectable there from year ${runYear.toFixed(1)}`);
            expect(page).not.toContain(`breeding population arrives year ${runYear.toFixed(1)}`);
            expect(cli).not.toContain(`breeding population arrives year ${runYear.toFixed(1)}`);
          }
        } else if (runYear !== null && (o.crossingYears.option === null || runYear < o.crossingYears.option)) {
          expect(page, `${o.name} / ${s.name}`).toContain(`only a thin non-breeding fringe, from year ${runYear.toFixed(1)}`);
        }
      });
      void k;
    });
  });

  it('width–delay cells say what they mean (no bare dash) and the curve has the five widths the form promises', async () => {
    const { d, id } = get();
    const html = (await t.app.inject(`/results/${id}`)).body;
    // No table cell anywhere on the page is a bare dash (one symbol with two meanings).
    const cells = [...html.matchAll(/<td[^>]*>([\s\S]*?)<\/td>/g)].map((m) => m[1].trim());
    expect(cells.length).toBeGreaterThan(10);
    expect(cells.filter((c) => /^[—–-]?$/.test(c))).toEqual([]);
    expect(html).toContain('Years gained at');
    if (!d.scenario.barrier?.curveWidthsM) for (const o of d.doc.options) expect(o.widthDelay).toHaveLength(5);
  });
});

describe('one limit and one promise, the same everywhere', () => {
  it('the form help promises five delay-curve widths (what the runs use)', async () => {
    const html = (await t.app.inject('/scenarios/new')).body;
    expect(html).toContain('Leave empty for five widths');
    expect(html).not.toContain('six widths');
  });

  it('the horizon limit of this server is the one shown in the field guide, the form, and applied by Check and by Save and run', async () => {
    const max = DEFAULT_LIMITS.maxHorizonYears;
    expect(visible((await t.app.inject('/fields')).body)).toContain(`> 0 and ≤ ${max} yr on this server`);
    expect(visible((await t.app.inject(`/scenarios/${QUICK_REF}/edit`)).body)).toContain(`> 0 and ≤ ${max} yr on this server`);
    const quick = parseScenarioText(readFileSync(new URL('./fixtures/scenarios/quick-check.json', import.meta.url), 'utf8'));
    const fields = { ...scenarioToForm({ ...quick, horizonYears: max + 100 }) };
    const check = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/edit`, headers: FORM_HEADERS, payload: formBody({ ...fields, _action: 'check' }) });
    const run = await t.app.inject({ method: 'POST', url: `/scenarios/${QUICK_REF}/edit/run`, headers: FORM_HEADERS, payload: formBody({ ...fields, _action: 'save' }) });
    expect(check.statusCode).toBe(400);
    expect(check.body).toContain(`${max}`);
    expect(run.statusCode).toBe(400);
  });
});
