/**
 * The PDF briefing for decision meetings: cover with the question and the bottom line per option, the
 * transect, charts (vector), options and arrivals tables, uncertainty, parameters with their sources,
 * assumptions and limits, cautions; a reproducibility footer on every page. Drawn with pdfkit; all text in
 * the embedded DejaVu fonts (selectable, with km², ±, –, ≥, λ, Δ).
 */
import { openBriefingPdf } from './pdf/document.ts';
import type { ResultDocument } from '../analysis/result.ts';
import type { Scenario } from '../model/scenario.ts';
import { TOOL } from '../version.ts';
import { num } from './format.ts';
import { dispersionCurveChart, frontPositionChart, hostProfileChart, mosaicSpeedChart, spaceTimeChart, transectStrip, widthDelayChart } from './charts/index.ts';
import { optionKey } from './charts/styles.ts';
import {
  arrivalCell,
  baselineLine,
  bottomLine,
  hasVerdict,
  modelFactLines,
  numericsLines,
  optionHeading,
  optionRows,
  parameterRows,
  questionText,
  readBypass,
  readUncertainty,
  segmentRows,
  splitCautions,
  treesOf,
  treesText,
  uncertainPaths,
} from './briefing-text.ts';
import { FONT } from './pdf/fonts.ts';
import { headline, recommendationWords, siteEvent, spreadBeyondText, transportNote, verdictWords } from './decision.ts';
import { Flow, type Column, type PageBox } from './pdf/flow.ts';

export interface BriefingOptions {
  /** The validated scenario: parameters table, transect table, trees removed when the result lacks them. */
  scenario?: Scenario;
  /** The input exactly as the user gave it (file or form), to tell entered values from defaults. */
  rawInput?: unknown;
  /** PDF creation date (tests pass a fixed one for reproducible files); now by default. */
  creationDate?: Date;
  /** Called with the page each section starts on and the page count (tests, tables of contents). */
  onLayout?: (info: BriefingLayout) => void;
}

export interface BriefingLayout {
  pages: number;
  sections: { title: string; page: number }[];
}

/** A4 in points, and the content box: 50 pt margins, footer below `bottom`. */
export const PAGE: PageBox = { width: 595.28, height: 841.89, left: 50, right: 545.28, top: 50, bottom: 841.89 - 72 };
const FOOTER_Y = 841.89 - 50;

/** "2031-05-04 09:30 UTC" from an ISO date-time; the input unchanged when it does not parse. */
export function runDateText(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

/** Footer text of page `i` (1-based) of `n`. */
export function footerLines(doc: ResultDocument, i: number, n: number): [string, string] {
  return [
    `${doc.tool?.name ?? TOOL.name} ${doc.tool?.version ?? TOOL.version} · run ${runDateText(doc.runAt)} · page ${i} of ${n}`,
    `scenario fingerprint (SHA-256 of the canonical scenario): ${doc.scenarioFingerprint}`,
  ];
}

/**
 * Renders the briefing for a result document.
 * @param doc - the result of `evaluateScenario`; parts filled by later analyses (verdicts, mosaics,
 *   uncertainty) are optional and their sections say so when missing
 * @returns the PDF file
 */
export async function renderBriefing(doc: ResultDocument, opts: BriefingOptions = {}): Promise<Buffer> {
  const { pdf, flow, bytes: done } = openBriefingPdf(PAGE, {
    title: doc.title,
    subject: 'Briefing: will a host-free clearing stop the pest?',
    scenarioFingerprint: doc.scenarioFingerprint,
    creationDate: opts.creationDate,
  });

  cover(flow, doc, opts);
  transectSection(flow, doc, opts);
  chartsSection(flow, doc);
  tablesSection(flow, doc, opts);
  uncertaintySection(flow, doc, opts);
  parametersSection(flow, doc, opts);
  limitsSection(flow, doc);
  cautionsSection(flow, doc);

  const range = pdf.bufferedPageRange();
  for (let i = 0; i < range.count; i++) {
    pdf.switchToPage(range.start + i);
    drawFooter(pdf, doc, i + 1, range.count);
  }
  opts.onLayout?.({ pages: range.count, sections: flow.sections });
  pdf.end();
  return done;
}

function drawFooter(pdf: PDFKit.PDFDocument, doc: ResultDocument, i: number, n: number): void {
  const [a, b] = footerLines(doc, i, n);
  // The footer sits below the content box; lift the bottom margin so pdfkit does not start a new page.
  const saved = pdf.page.margins.bottom;
  pdf.page.margins.bottom = 0;
  pdf.moveTo(PAGE.left, FOOTER_Y - 5).lineTo(PAGE.right, FOOTER_Y - 5).lineWidth(0.4).strokeColor('#999999').stroke();
  pdf.font(FONT.regular).fontSize(7).fillColor('#333333').text(a, PAGE.left, FOOTER_Y, { width: PAGE.right - PAGE.left, lineBreak: false });
  pdf.font(FONT.mono).fontSize(6).fillColor('#555555').text(b, PAGE.left, FOOTER_Y + 10, { width: PAGE.right - PAGE.left, lineBreak: false });
  pdf.page.margins.bottom = saved;
}

function cover(flow: Flow, doc: ResultDocument, opts: BriefingOptions): void {
  flow.text('BRIEFING FOR A DECISION MEETING', { font: FONT.bold, size: 8.5, color: '#555555', after: 6 });
  flow.sections.push({ title: 'Cover', page: 1 });
  flow.text(doc.title, { font: FONT.bold, size: 18, after: 8 });
  const meta = [
    doc.region ? `Area: ${doc.region}` : null,
    `Pest: ${doc.pest.name}${doc.pest.illustrative ? ' — ILLUSTRATIVE profile: invented numbers, not a real species' : ''}`,
    `Run on ${runDateText(doc.runAt)} with ${doc.tool?.name ?? TOOL.name} ${doc.tool?.version ?? TOOL.version}; horizon ${num(doc.horizonYears, 4)} years.`,
  ].filter((x): x is string => x !== null);
  for (const m of meta) flow.text(m, { size: 9.5, color: '#222222', after: 2 });
  if (doc.description) flow.text(doc.description, { size: 8.5, color: '#444444', after: 4 });
  flow.heading('The question', 2, 40);
  flow.text(questionText(doc), { after: 6 });
  flow.heading('Bottom line', 2, 60);
  const decides = doc.options.some((_, k) => transportNote(doc, k)?.decides);
  flow.text(headline(doc), { font: FONT.bold, after: 4, color: decides ? '#7a3b00' : '#000000' });
  const rec = recommendationWords(doc);
  if (doc.options.length) {
    flow.text(rec.short, { font: FONT.bold, after: 1 });
    if (rec.basis) flow.text(rec.basis, { size: 8.5, color: '#333333', after: 1 });
    if (rec.phasePlane) flow.text(rec.phasePlane, { size: 8.5, color: '#333333', after: 4 });
  }
  flow.text(baselineLine(doc), { after: 6 });
  doc.options.forEach((o, k) => {
    const head = optionHeading(o, k);
    const words = hasVerdict(o) ? verdictWords(doc, k) : null;
    const line = `${words?.transport?.decides ? `${words.label}. ` : ''}${bottomLine(doc, o)}`;
    const transport = words?.transport ? `People carrying the pest: ${words.transport.sentence}` : '';
    const trees = `Trees removed: ${treesText(treesOf(o, opts.scenario))}.`;
    flow.ensure(flow.measure(head, { font: FONT.bold }) + flow.measure(line) + (transport ? flow.measure(transport, { size: 8.5 }) : 0) + flow.measure(trees, { size: 8.5 }) + 8);
    flow.text(head, { font: FONT.bold, after: 1 });
    flow.text(line, { indent: 14, after: 1 });
    if (transport) flow.text(transport, { indent: 14, size: 8.5, font: FONT.bold, color: '#7a3b00', after: 1 });
    flow.text(trees, { indent: 14, size: 8.5, color: '#333333', after: 6 });
  });
  if (doc.options.some((o) => hasVerdict(o) && o.verdict.kind === 'speeds-up')) {
    flow.text('Note: at least one option is expected to SPEED the pest up. Check that option before any cutting.', { font: FONT.bold, after: 6 });
  }
  const { cautions } = splitCautions(doc);
  const box = cautions.slice(0, 3).join(' ');
  const h = flow.measure(box, { size: 8.5 }, flow.width - 16) + 26;
  flow.space(4);
  flow.ensure(h);
  const y = flow.y;
  flow.doc.rect(PAGE.left, y, flow.width, h).lineWidth(0.8).strokeColor('#000000').stroke();
  flow.doc.font(FONT.bold).fontSize(9).fillColor('#000000').text('Before acting on this briefing', PAGE.left + 8, y + 6, { width: flow.width - 16 });
  flow.doc.font(FONT.regular).fontSize(8.5).text(box, PAGE.left + 8, y + 19, { width: flow.width - 16, lineGap: 1 });
  flow.doc.x = PAGE.left;
  flow.doc.y = y + h + 6;
}

function transectSection(flow: Flow, doc: ResultDocument, opts: BriefingOptions): void {
  flow.newPage();
  flow.heading('The transect and the options');
  flow.text(
    'The model follows the pest along one line through the forest (the transect). Positions are in km from its start. ' +
      'Each option replaces the host trees over its width with open ground (or non-host forest).',
    { after: 6 },
  );
  flow.chart(transectStrip(doc));
  if (opts.scenario) {
    const rows = segmentRows(opts.scenario);
    const cols: Column[] = [
      { header: 'Stretch', width: 150 },
      { header: 'Habitat', width: 90 },
      { header: 'From–to (km)', width: 90 },
      { header: 'Host stocking (0–1)', width: 80, align: 'right' },
      { header: 'Host stems per ha', width: 85, align: 'right' },
    ];
    flow.heading('Stretches of the transect', 3, 40);
    const MAX_SEGMENTS = 60;
    flow.table(cols, rows.slice(0, MAX_SEGMENTS).map((r) => [r.name, r.habitat, r.span, r.stocking, r.stems]));
    if (rows.length > MAX_SEGMENTS) flow.text(`… and ${rows.length - MAX_SEGMENTS} further stretches (see the scenario file).`, { size: 8.5 });
  }
}

function chartsSection(flow: Flow, doc: ResultDocument): void {
  flow.newPage();
  flow.heading('How the front moves');
  flow.chart(frontPositionChart(doc));
  flow.chart(hostProfileChart(doc));
  const wd = doc.options.map((o, k) => ({ k, c: widthDelayChart(o, { key: optionKey(k), siteNames: doc.baseline.arrivals.map((a) => a.name) }) }));
  flow.heading('How wide is wide enough', 1, 120);
  if (wd.some((x) => x.c)) {
    for (const { c } of wd) if (c) flow.chart(c);
  } else {
    flow.text(
      doc.options.length
        ? 'Width–delay curves and the critical width are not in this result (the barrier analysis did not run).'
        : 'No clearing options were given.',
      { font: FONT.italic },
    );
  }
  flow.heading('Where and when the pest is present', 1, 200);
  const sites = doc.baseline.arrivals;
  flow.chart(spaceTimeChart(doc.baseline, { detectionLevel: doc.detectionLevel, runLabel: 'baseline (no clearing)', sites, plotHeight: 150 }));
  doc.options.forEach((o, k) =>
    flow.chart(spaceTimeChart(o.run, { detectionLevel: doc.detectionLevel, runLabel: `${optionKey(k)}: ${o.name}`, clearing: { fromKm: o.fromKm, widthM: o.widthM, key: optionKey(k) }, sites, plotHeight: 150 })),
  );
  const ms = mosaicSpeedChart(doc.mosaics);
  if (ms && doc.mosaics) {
    flow.heading('Thinning patterns instead of one clearing');
    flow.bullets(doc.mosaics.map((m) => m.sentence));
    flow.chart(ms);
    for (const m of doc.mosaics) {
      const c = dispersionCurveChart(m);
      if (c) flow.chart(c);
    }
  }
}

function tablesSection(flow: Flow, doc: ResultDocument, opts: BriefingOptions): void {
  if (!doc.options.length) return;
  flow.newPage();
  flow.heading('Options compared');
  const rows = optionRows(doc, opts.scenario);
  const transport = Boolean(doc.bypass);
  const cols: Column[] = [
    { header: '', width: 18 },
    { header: 'Option', width: transport ? 90 : 110 },
    { header: 'Width (m)', width: 44, align: 'right' },
    { header: 'Trees removed', width: 52, align: 'right' },
    { header: 'Cost', width: transport ? 62 : 70, align: 'right' },
    { header: 'Verdict', width: transport ? 78 : 90 },
    ...(transport ? [{ header: 'People carrying the pest past it', width: 66 }] : []),
    { header: 'Front stops from', width: transport ? 85 : 111 },
  ];
  flow.table(
    cols,
    rows.map((r, k) => {
      const t = transportNote(doc, k);
      const verdict = hasVerdict(doc.options[k]) ? verdictWords(doc, k).label : r.verdict;
      return [r.key, r.name, r.width, r.trees, r.cost, verdict, ...(transport ? [t ? `${t.short}${t.decides ? ': decides' : ''}` : 'not computed'] : []), r.critical];
    }),
  );
  for (const [k, o] of doc.options.entries()) {
    if (!hasVerdict(o)) continue;
    flow.text(`${optionKey(k)}: ${o.verdict.sentence}${o.verdict.why ? ` ${o.verdict.why}` : ''} Spread rate beyond the clearing: ${spreadBeyondText(o)}.`, { size: 8.5, after: 3 });
  }
  if (doc.baseline.arrivals.length) {
    flow.heading('Arrival at the protected sites', 2, 60);
    flow.text(
      `Year a breeding population reaches each site, without a clearing and with each option; the second line is the change against no clearing (+ = later, − = earlier). ` +
        `“held” = the front is held at the clearing, no breeding population beyond it; “fringe” = only a thin non-breeding fringe of insects reaches the detection level there (year given). “not reached” = not within ${num(doc.horizonYears, 4)} years (projected year in brackets).`,
      { size: 8.5 },
    );
    // Site name, then baseline and one column per option; split into several tables if the columns do not fit.
    const valueW = 44;
    const siteW = 95;
    const perTable = Math.max(1, Math.floor((flow.width - siteW) / valueW) - 1);
    for (let start = 0; start < doc.options.length || start === 0; start += perTable) {
      const group = doc.options.slice(start, start + perTable);
      const cols2: Column[] = [
        { header: 'Site', width: siteW },
        { header: 'no clearing', width: valueW, align: 'right' },
        ...group.map((_, j) => ({ header: `option ${optionKey(start + j)}`, width: valueW, align: 'right' as const })),
      ];
      const rows2 = doc.baseline.arrivals.map((a, i) => [
        `${i + 1}  ${a.name} (km ${num(a.atKm, 4)})`,
        arrivalCell(doc.baseline, i, null),
        ...group.map((o, j) => (hasVerdict(o) ? siteEvent(doc, start + j, i).short : arrivalCell(o.run, i, doc.baseline, o))),
      ]);
      flow.table(cols2, rows2, { size: 7.5 });
      if (start + perTable >= doc.options.length) break;
    }
  }
}

function uncertaintySection(flow: Flow, doc: ResultDocument, opts: BriefingOptions): void {
  flow.heading('Uncertainty', 1, 80);
  const u = readUncertainty(doc.uncertainty);
  if (!u) {
    const uncertain = opts.scenario ? uncertainPaths(opts.scenario) : [];
    flow.text(
      doc.uncertainty
        ? 'The result holds an uncertainty section in a layout this version of the briefing cannot print; see the result document.'
        : 'Parameters were taken as exact: every run used one value per parameter' +
            (uncertain.length ? ` (the central value of each range given: ${uncertain.join(', ')})` : '') +
            '. No probabilities are given. Because results are sensitive to poorly known parameters, edge behaviour especially, run the uncertainty analysis before relying on a width.',
    );
  } else {
    flow.text(`Ensemble of ${u.completed} of ${u.draws} draws over the uncertain parameters (${u.status}). Probabilities carry their Monte Carlo standard error (±).`);
    if (u.parameters.length) {
      flow.table(
        [
          { header: 'Uncertain parameter', width: 200 },
          { header: 'Range used', width: 220 },
          { header: 'Unit', width: 75 },
        ],
        u.parameters.map((p) => [p.label, p.distribution, p.unit]),
      );
    }
    if (u.options.length) {
      const transport = u.options.some((o) => o.holdsWithTransport !== null);
      flow.table(
        [
          { header: 'Option', width: transport ? 115 : 140 },
          { header: 'P(holds within horizon)', width: transport ? 70 : 85, align: 'right' },
          ...(transport ? [{ header: 'P(holds, people moving wood included)', width: 80, align: 'right' as const }] : []),
          { header: 'Width for 90 %', width: transport ? 60 : 70, align: 'right' },
          { header: 'Width for 95 %', width: transport ? 60 : 70, align: 'right' },
          { header: 'Front crosses', width: transport ? 110 : 130 },
        ],
        u.options.map((o) => {
          const k = doc.options.findIndex((x) => x.name === o.name);
          const name = k >= 0 ? `${optionKey(k)}  ${o.name}` : o.name;
          return transport ? [name, o.holds, o.holdsWithTransport ?? '—', o.holds90, o.holds95, o.crossing] : [name, o.holds, o.holds90, o.holds95, o.crossing];
        }),
      );
      flow.bullets(u.options.flatMap((o) => o.sentences), { size: 8.5 });
    }
    if (u.convergence) flow.text(u.convergence, { size: 8.5 });
  }
  const b = readBypass(doc.bypass);
  if (b && (b.sentences.length || b.note)) {
    flow.heading('Spread by people moving wood', 2, 50);
    flow.bullets(b.sentences, { size: 8.5 });
    if (b.note) flow.text(b.note, { size: 8.5 });
  }
}

function parametersSection(flow: Flow, doc: ResultDocument, opts: BriefingOptions): void {
  flow.newPage();
  flow.heading('Parameters and where they come from');
  if (!opts.scenario) {
    flow.text('The scenario was not supplied with this result, so the parameters cannot be listed; the scenario fingerprint in the footer identifies it.', { font: FONT.italic });
    return;
  }
  flow.text(
    doc.pest.illustrative
      ? 'The pest profile is ILLUSTRATIVE: its numbers are invented for a demonstration and must not be used for a real decision.'
      : '“entered” = given in the scenario; “default” = filled in by the tool, with the source of the default.',
    { size: 8.5 },
  );
  const rows = parameterRows(opts.scenario, opts.rawInput, doc.baseline.numerics);
  flow.table(
    [
      { header: 'Parameter', width: 145 },
      { header: 'Value', width: 105 },
      { header: 'Unit', width: 55 },
      { header: 'Where the value comes from', width: 190 },
    ],
    rows.map((r) => [r.label, r.value, r.unit, r.source]),
    { group: (k) => rows[k].group },
  );
}

function limitsSection(flow: Flow, doc: ResultDocument): void {
  flow.heading('Assumptions and limits', 1, 120);
  const { limits } = splitCautions(doc);
  flow.bullets([...limits, ...modelFactLines(doc)]);
  flow.heading('How the numbers were computed', 2, 40);
  flow.bullets(numericsLines(doc), { size: 8.5 });
}

function cautionsSection(flow: Flow, doc: ResultDocument): void {
  flow.heading('Cautions', 1, 120);
  const { cautions } = splitCautions(doc);
  flow.bullets(cautions);
}
