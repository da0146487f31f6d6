import { describe, expect, it, beforeAll } from 'vitest';
import { mkdirSync, writeFileSync } from 'node:fs';
import { renderBriefing, PAGE, footerLines, runDateText, type BriefingLayout } from '../../server/report/briefing.ts';
import { VERDICT_PLAIN } from '../../server/report/decision.ts';
import { bottomLine, baselineLine, criticalWidthText, optionRows, parameterRows, questionText, readUncertainty, splitCautions, treesOf, treesText } from '../../server/report/briefing-text.ts';
import { CAUTIONS, MODEL_LIMITS } from '../../server/analysis/evaluate/cautions.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { FIELDS } from '../../server/model/fields.ts';
import { integer, years } from '../../server/report/format.ts';
import { makeResultFixture, FIXTURE_KINDS } from '../helpers/result-fixture.ts';
import { havePdftoppm, inkShare, rasterise, readPdfText, squash, type PdfPage } from '../helpers/pdf.ts';

const FIXED = new Date('2031-05-04T10:00:00Z');
const DPI = 50;

async function render(spec: Parameters<typeof makeResultFixture>[0] & { save?: string }, withScenario = true) {
  const f = makeResultFixture(spec);
  let layout: BriefingLayout | null = null;
  const buf = await renderBriefing(f.doc, {
    scenario: withScenario ? f.scenario : undefined,
    rawInput: withScenario ? f.input : undefined,
    creationDate: FIXED,
    onLayout: (l) => (layout = l),
  });
  const pages = await readPdfText(buf);
  if (spec?.save) {
    // Kept for inspection (CI artefacts); test-output/ is not tracked.
    mkdirSync('test-output', { recursive: true });
    writeFileSync(`test-output/${spec.save}.pdf`, buf);
  }
  return { ...f, buf, pages, layout: layout as unknown as BriefingLayout, all: squash(pages.map((p) => p.text).join(' ')) };
}

/** True when the sentence appears in the extracted text, ignoring where lines were wrapped. */
const has = (all: string, s: string) => all.includes(squash(s));

function expectOnEveryPageFooter(pages: PdfPage[], doc: { scenarioFingerprint: string }) {
  pages.forEach((p, i) => {
    const t = squash(p.text);
    expect(t, `page ${i + 1}`).toContain(squash(`page ${i + 1} of ${pages.length}`));
    expect(t, `page ${i + 1}`).toContain(doc.scenarioFingerprint);
  });
}

describe('briefing for a full result (3 options, 2 sites, uncertainty)', () => {
  let r: Awaited<ReturnType<typeof render>>;
  beforeAll(async () => {
    r = await render({ nOptions: 3, nSites: 2, uncertainty: true, save: 'briefing-fixture' });
  });

  it('is a PDF whose page count matches its own footers, with tool version, run date and fingerprint on every page', () => {
    expect(r.buf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(r.pages.length).toBe(r.layout.pages);
    expectOnEveryPageFooter(r.pages, r.doc);
    for (const p of r.pages) expect(squash(p.text)).toContain(squash(footerLines(r.doc, 1, 1)[0].replace(' · page 1 of 1', '')));
    expect(runDateText(r.doc.runAt)).toBe('2031-05-04 09:30 UTC');
  });

  it('has every section, in order', () => {
    const titles = r.layout.sections.map((s) => s.title);
    expect(titles).toEqual([
      'Cover', 'The transect and the options', 'How the front moves', 'How wide is wide enough', 'Where and when the pest is present',
      'Thinning patterns instead of one clearing', 'Options compared', 'Uncertainty', 'Parameters and where they come from', 'Assumptions and limits', 'Cautions',
    ]);
    const pagesOf = r.layout.sections.map((s) => s.page);
    expect([...pagesOf].sort((a, b) => a - b)).toEqual(pagesOf);
    for (const s of r.layout.sections) expect(squash(r.pages[s.page - 1].text)).toContain(squash(s.title === 'Cover' ? r.doc.title : s.title));
  });

  it('cover: the title, the question, the baseline line and one verdict sentence plus trees removed per option', () => {
    const cover = squash(r.pages[0].text);
    for (const s of [r.doc.title, questionText(r.doc), baselineLine(r.doc)]) expect(cover).toContain(squash(s));
    r.doc.options.forEach((o) => {
      expect(cover).toContain(squash(o.verdict.sentence));
      expect(bottomLine(r.doc, o)).toBe(o.verdict.sentence);
      expect(cover).toContain(squash(`Trees removed: ${treesText(treesOf(o))}.`));
    });
    // Trees removed = stems/ha × cut length × barrier length × 100 ha/km² (fixture: 420/ha, 0.8 km, 6 km → 201 600).
    expect(r.doc.options[0].trees.stemsRemoved).toBeCloseTo(420 * 0.8 * 6 * 100, 6);
    expect(cover).toContain(squash(integer(201600)));
    expect(cover).toContain(squash('Before acting on this briefing'));
  });

  it('a phase-plane width computed with hosts held intact is labelled so when the pest kills its hosts', () => {
    const base = makeResultFixture({}).doc.options[0];
    const cw = base.criticalWidth;
    const killing = { ...base, criticalWidth: { ...cw, phasePlaneAssumesIntactHosts: true } };
    const intact = { ...base, criticalWidth: { ...cw, phasePlaneAssumesIntactHosts: false } };
    expect(criticalWidthText(killing)).toMatch(/quick estimate with hosts held at present stocking 401 m/);
    expect(criticalWidthText(intact)).toMatch(/\(quick estimate 401 m\)/);
  });

  it('options table: width, trees, cost, verdict and critical width of each option; arrival and delay per site', () => {
    const s = r.layout.sections.find((x) => x.title === 'Options compared')!;
    const t = squash(r.pages.slice(s.page - 1, s.page + 1).map((p) => p.text).join(' '));
    for (const row of optionRows(r.doc)) for (const cell of [row.name, row.width, row.trees, row.cost, row.verdict, row.critical]) expect(t, cell).toContain(squash(cell));
    expect(optionRows(r.doc).map((x) => x.verdict)).toEqual(FIXTURE_KINDS.slice(0, 3).map((k) => VERDICT_PLAIN[k]));
    // Arrivals: baseline years and each option's year with its change against the baseline.
    for (const a of r.doc.baseline.arrivals) expect(t).toContain(squash(`${a.name} (km`));
    for (const o of r.doc.options) {
      for (const site of o.sites) {
        if (site.optionArrivalYears !== null) expect(t).toContain(squash(years(site.optionArrivalYears)));
        if (site.delayYears !== null && Math.abs(site.delayYears) >= 0.05) expect(t).toContain(squash(`${site.delayYears > 0 ? '+' : '−'}${Math.abs(site.delayYears).toFixed(1)} yr`));
      }
    }
  });

  it('reads the uncertainty section of the ensemble analysis, and refuses a layout it does not know', () => {
    const u = readUncertainty(r.doc.uncertainty)!;
    expect(u.options.map((o) => o.holds)).toEqual(['93 % ± 1.8 %', '41 % ± 1.8 %', '5 % ± 1.8 %']);
    expect(u.options[0].holds90).toBe('520 m');
    expect(readUncertainty({ something: 'else' })).toBeNull();
    expect(readUncertainty(undefined)).toBeNull();
  });

  it('uncertainty section: probabilities with their standard error and widths for 90/95 %', () => {
    expect(r.all).toContain(squash('93 % ± 1.8 %'));
    expect(r.all).toContain(squash('520 m'));
    expect(r.all).toContain(squash('580 m'));
    expect(r.all).toContain(squash('Enough draws'));
    expect(r.all).not.toContain(squash('Parameters were taken as exact'));
  });

  it('parameters table with units and sources; the illustrative profile is marked', () => {
    expect(r.all).toContain(squash('illustrative (invented profile, not field data)'));
    expect(r.all).toContain(squash('km²/yr'));
    expect(r.all).toContain(squash('uniform 0.5–1.5 (midpoint 1 used)'));
    expect(r.all).toContain(squash(`default — ${FIELDS.detectionLevel.source}`));
  });

  it('every limit and caution of the result document appears, including the regulator and felling cautions', () => {
    for (const c of r.doc.cautions) expect(has(r.all, c), c).toBe(true);
    expect(r.all).toMatch(/regulator/);
    expect(r.all).toMatch(/hazardous/);
  });

  it('prints the special glyphs as real, selectable text (km², ±, –, ≥, λ, −)', () => {
    for (const g of ['km²', '±', '–', '≥', 'λ(s)', '−']) expect(r.all, g).toContain(g);
  });

  it('is byte-for-byte reproducible with a fixed creation date', async () => {
    const again = await renderBriefing(r.doc, { scenario: r.scenario, rawInput: r.input, creationDate: FIXED });
    expect(Buffer.compare(again, r.buf)).toBe(0);
  });

  it('every page has ink in its content area (pdftoppm raster)', (ctx) => {
    if (!havePdftoppm()) {
      console.warn('SKIPPED: pdftoppm (poppler-utils) not found; page rasters of the briefing were not checked');
      ctx.skip();
    }
    const pages = rasterise(r.buf, DPI);
    expect(pages.length).toBe(r.pages.length);
    pages.forEach((p, i) => expect(inkShare(p, DPI, { x0: PAGE.left, y0: PAGE.top, x1: PAGE.right, y1: PAGE.bottom }), `page ${i + 1}`).toBeGreaterThan(0.01));
  });
});

describe('briefing of a result without the later analyses (only runs), without the scenario', () => {
  let r: Awaited<ReturnType<typeof render>>;
  beforeAll(async () => {
    r = await render({ nOptions: 2, nSites: 2, analysis: false, mosaics: false }, false);
  });

  it('says plainly what is missing instead of failing', () => {
    expect(r.all).toContain(squash('No verdict in this result (the barrier analysis did not run).'));
    expect(r.all).toContain(squash('Width–delay curves and the critical width are not in this result'));
    expect(r.all).toContain(squash('Parameters were taken as exact'));
    expect(r.all).toContain(squash('The scenario was not supplied with this result'));
    expect(r.all).toContain(squash('trees removed: not computed'));
    expect(r.layout.sections.map((s) => s.title)).not.toContain('Thinning patterns instead of one clearing');
  });

  it('still states arrivals with and without each option from the runs', () => {
    for (const o of r.doc.options) expect(r.all).toContain(squash(bottomLine(r.doc, o)));
    expectOnEveryPageFooter(r.pages, r.doc);
    for (const c of CAUTIONS) expect(has(r.all, c)).toBe(true);
  });
});

describe('briefing stress: 8 options, 12 sites, a 200-character title', () => {
  const title = `${'Ossenvale district long-range clearing review '.repeat(4)}`.padEnd(200, 'x').slice(0, 200);
  let r: Awaited<ReturnType<typeof render>>;
  beforeAll(async () => {
    expect(title.length).toBe(200);
    r = await render({ nOptions: 8, nSites: 12, title, uncertainty: true, save: 'briefing-stress' });
  });

  it('keeps the whole title and all options and sites', () => {
    expect(squash(r.pages[0].text)).toContain(squash(title));
    for (const o of r.doc.options) expect(r.all).toContain(squash(o.name));
    for (const a of r.doc.baseline.arrivals) expect(r.all).toContain(squash(a.name));
  });

  it('has the expected page count (checked by eye once: every section starts where shown, no near-empty pages)', () => {
    // Cover 2 pages (8 bottom lines), transect 1, fronts and host 1, width–delay 4 (two per page), space–time
    // maps 2 (9 maps), mosaics 2, options and arrivals 1½, uncertainty ½ + ½, parameters 1 + limits, cautions 1.
    expect(r.pages.length).toBe(18);
    expect(r.layout.pages).toBe(18);
    expect(r.layout.sections.map((s) => s.page)).toEqual([1, 3, 4, 5, 9, 12, 14, 15, 16, 17, 18]);
    expectOnEveryPageFooter(r.pages, r.doc);
  });

  it('all text lies inside the page content box (footer below it)', () => {
    const footerTop = PAGE.bottom + 5;
    const bad: string[] = [];
    r.pages.forEach((p, i) => {
      for (const it of p.items) {
        if (!it.str.trim()) continue;
        const inX = it.x >= PAGE.left - 0.5 && it.x + it.width <= PAGE.right + 0.5;
        const inBody = it.yTop - it.height >= PAGE.top - 12 && it.yTop <= PAGE.bottom + 2;
        const inFooter = it.yTop > footerTop && it.yTop < PAGE.height - 20;
        if (!inX || !(inBody || inFooter)) bad.push(`page ${i + 1}: "${it.str.slice(0, 40)}" at x ${it.x.toFixed(1)}–${(it.x + it.width).toFixed(1)}, y ${it.yTop.toFixed(1)}`);
      }
    });
    expect(bad).toEqual([]);
  });

  it('nothing is drawn in the outer 30 pt of any page (raster check catches graphics too)', (ctx) => {
    if (!havePdftoppm()) {
      console.warn('SKIPPED: pdftoppm (poppler-utils) not found; the page-margin raster check did not run');
      ctx.skip();
    }
    const pages = rasterise(r.buf, DPI);
    expect(pages.length).toBe(18);
    const m = 30;
    pages.forEach((p, i) => {
      const w = PAGE.width;
      const h = PAGE.height;
      const bands = [
        { x0: 0, y0: 0, x1: w, y1: m },
        { x0: 0, y0: h - m, x1: w, y1: h },
        { x0: 0, y0: 0, x1: m, y1: h },
        { x0: w - m, y0: 0, x1: w, y1: h },
      ];
      for (const b of bands) expect(inkShare(p, DPI, b), `page ${i + 1} margin ${JSON.stringify(b)}`).toBe(0);
      expect(inkShare(p, DPI, { x0: PAGE.left, y0: PAGE.top, x1: PAGE.right, y1: PAGE.bottom }), `page ${i + 1} is not blank`).toBeGreaterThan(0.005);
    });
  });
});

describe('parameter sources', () => {
  it('tells entered values from defaults when the raw input is given, and says "illustrative" for an invented profile', () => {
    const f = makeResultFixture({ illustrative: false });
    const rows = parameterRows(f.scenario, f.input);
    const row = (label: string) => rows.find((x) => x.label === label)!;
    expect(row(FIELDS.diffusionHost.label).source).toMatch(/^entered/);
    expect(row(FIELDS.detectionLevel.label).source).toBe(`default — ${FIELDS.detectionLevel.source}`);
    expect(row(FIELDS.infestedDensity.label).source).toBe(`default — ${FIELDS.infestedDensity.source}`);
    expect(row(FIELDS.diffusionHost.label).unit).toBe('km²/yr');
    const illus = parameterRows(makeResultFixture({ illustrative: true }).scenario, f.input);
    expect(illus.find((x) => x.label === FIELDS.diffusionHost.label)!.source).toMatch(/^illustrative/);
    // Without the raw input a value equal to the default may have been either.
    const noRaw = parameterRows(f.scenario);
    expect(noRaw.find((x) => x.label === FIELDS.detectionLevel.label)!.source).toMatch(/^entered, or the default/);
  });

  it('lists a mate-finding profile with its own fields', () => {
    const input = makeResultFixture().input as Record<string, unknown> & { pest: Record<string, unknown> };
    input.pest.growth = { form: 'mate-finding', birthRate: 2, deathRate: 1, mating: 'saturating', mateScale: 0.1 };
    const rows = parameterRows(parseScenario(input), input);
    for (const f of ['birthRate', 'deathRate', 'crowding', 'mateScale'] as const) expect(rows.some((x) => x.label === FIELDS[f].label)).toBe(true);
    expect(rows.find((x) => x.label === FIELDS.crowding.label)!.source).toMatch(/^illustrative|^default/);
  });

  it('lists the transport and uncertainty blocks with their sources', () => {
    const input = makeResultFixture({ illustrative: false }).input as Record<string, unknown>;
    input.transport = { ratePerKm2Year: 0.004, kernel: { shape: 'exponential', meanKm: 20 }, establishmentProbability: 0.2 };
    input.uncertainty = { draws: 50, seed: 9 };
    const rows = parameterRows(parseScenario(input), input);
    const row = (label: string) => rows.find((x) => x.label === label);
    expect(row(FIELDS.transportRate.label)?.source).toMatch(/^entered/);
    expect(row(FIELDS.forwardShare.label)?.source).toMatch(/^default/);
    expect(row(FIELDS.ensembleDraws.label)?.value).toBe('50');
    expect(row(FIELDS.targetStandardError.label)?.source).toMatch(/^default/);
  });

  it('splits the result cautions into model limits and practical cautions, losing none', () => {
    const { doc } = makeResultFixture();
    const s = splitCautions(doc);
    expect(s.limits).toEqual([...MODEL_LIMITS]);
    expect(s.cautions).toEqual([...CAUTIONS]);
  });
});

describe('names typed by users', () => {
  it('are printed literally in the PDF (no markup interpretation), in charts and text', async () => {
    const hostile = `<script>alert("x")</script> & 'Ossen'`;
    const r = await render({ nOptions: 1, nSites: 1, optionName: () => hostile, siteName: () => `${hostile} site` });
    expect(r.all).toContain(squash(hostile));
    const front = r.layout.sections.find((s) => s.title === 'How the front moves')!;
    expect(squash(r.pages[front.page - 1].text)).toContain(squash(hostile.slice(0, 20)));
  });
});
