/**
 * The PDF briefing of a landscape evaluation: cover with the question, the bottom line per band option
 * (verdict, the way the pest gets past, trees removed and cost) and the cautions; the maps (host cover with
 * the bands; arrival time without a band and with each band, side by side); the options and arrivals table;
 * what was read from the map; limits and cautions. A reproducibility footer on every page (tool, run date,
 * page, fingerprint of the scenario with its map files). Shares the transect briefing's page box, fonts and
 * flowing layout (server/report/briefing.ts, server/report/pdf/).
 */
import { openBriefingPdf } from '../pdf/document.ts';
import type { LandscapeDocument } from '../../analysis/landscape-scenario.ts';
import { PAGE, runDateText, type BriefingLayout } from '../briefing.ts';
import { FONT } from '../pdf/fonts.ts';
import { Flow, type Column } from '../pdf/flow.ts';
import { drawChart } from '../pdf/chart.ts';
import { years } from '../format.ts';
import { ensembleLines, transportLine, treesCostText } from './summary.ts';
import type { IdMap } from '../maps/index.ts';

export interface LandscapeBriefingOptions {
  /** PDF creation date (tests pass a fixed one); now by default. */
  creationDate?: Date;
  onLayout?: (info: BriefingLayout) => void;
}

const FOOTER_Y = PAGE.height - 50;

/** Footer text of page i of n. */
export function landscapeFooterLines(doc: LandscapeDocument, i: number, n: number): [string, string] {
  return [
    `${doc.tool.name} ${doc.tool.version} · run ${runDateText(doc.runAt)} · page ${i} of ${n}`,
    `scenario fingerprint (SHA-256 of the canonical scenario and its map files): ${doc.scenarioFingerprint}`,
  ];
}

const WAY: Record<string, string> = { through: 'through the band', around: 'around its ends', none: 'not past it within the horizon' };

/**
 * Renders the landscape briefing.
 * @param maps - from `mapsForLandscape` (host map first, then the baseline, then one per option)
 */
export async function renderLandscapeBriefing(doc: LandscapeDocument, maps: IdMap[], opts: LandscapeBriefingOptions = {}): Promise<Buffer> {
  const { pdf, flow, bytes: done } = openBriefingPdf(PAGE, {
    title: doc.title,
    subject: 'Briefing: will a band cut through the forest stop the pest, or will it get through or around?',
    scenarioFingerprint: doc.scenarioFingerprint,
    creationDate: opts.creationDate,
  });

  cover(flow, doc);
  mapsSection(flow, maps);
  tableSection(flow, doc);
  ensembleSection(flow, doc);
  mapNotesSection(flow, doc);
  flow.newPage();
  flow.heading('Limits and cautions');
  flow.bullets(doc.cautions, { size: 9 });

  const range = pdf.bufferedPageRange();
  for (let i = 0; i < range.count; i++) {
    pdf.switchToPage(range.start + i);
    const [a, b] = landscapeFooterLines(doc, i + 1, range.count);
    const saved = pdf.page.margins.bottom;
    pdf.page.margins.bottom = 0;
    pdf.moveTo(PAGE.left, FOOTER_Y - 5).lineTo(PAGE.right, FOOTER_Y - 5).lineWidth(0.4).strokeColor('#999999').stroke();
    pdf.font(FONT.regular).fontSize(7).fillColor('#333333').text(a, PAGE.left, FOOTER_Y, { width: PAGE.right - PAGE.left, lineBreak: false });
    pdf.font(FONT.mono).fontSize(5.5).fillColor('#555555').text(b, PAGE.left, FOOTER_Y + 10, { width: PAGE.right - PAGE.left, lineBreak: false });
    pdf.page.margins.bottom = saved;
  }
  opts.onLayout?.({ pages: range.count, sections: flow.sections });
  pdf.end();
  return done;
}

/** The bottom line of one option in one sentence pair. */
export function optionBottomLine(o: LandscapeDocument['options'][number]): string {
  return `${o.verdict.sentence} Way past: ${WAY[o.wayPast] ?? o.wayPast}. ${o.wayPastSentence}`;
}

function cover(flow: Flow, doc: LandscapeDocument): void {
  flow.text('BRIEFING FOR A DECISION MEETING · LANDSCAPE MAP', { font: FONT.bold, size: 8.5, color: '#555555', after: 6 });
  flow.sections.push({ title: 'Cover', page: 1 });
  flow.text(doc.title, { font: FONT.bold, size: 18, after: 8 });
  const meta = [
    doc.region ? `Area: ${doc.region}` : null,
    `Pest: ${doc.pest.name}${doc.pest.illustrative ? ' — ILLUSTRATIVE profile: invented numbers, not a real species' : ''}`,
    doc.pest.fitted ? `Parameters: ${doc.pest.fitted}.` : null,
    `Map: ${doc.map.nx} × ${doc.map.ny} cells of ${doc.map.cellM} m in ${doc.map.crs.name} (${doc.map.crs.code}).`,
    `Run on ${runDateText(doc.runAt)} with ${doc.tool.name} ${doc.tool.version}; horizon ${doc.horizonYears} years.`,
  ].filter((x): x is string => x !== null);
  for (const m of meta) flow.text(m, { size: 9.5, color: '#222222', after: 2 });
  if (doc.description) flow.text(doc.description, { size: 8.5, color: '#444444', after: 4 });
  flow.heading('The question', 2, 40);
  flow.text(
    `Will a band cut through the forest on this map stop the pest, or will it get through the band or around its ends — and what does each band buy at the protected sites within ${doc.horizonYears} years, for how many trees?`,
    { after: 6 },
  );
  flow.heading('Bottom line', 2, 60);
  const base = doc.baseline.arrivals.map((a) => `${a.site} ${a.detectedYears !== null ? `in year ${years(a.detectedYears)} at the detection level${a.breedingYears !== null ? ` (breeding population from year ${years(a.breedingYears)})` : ''}` : `not within ${doc.horizonYears} years`}`).join('; ');
  flow.text(`Without any band the pest reaches: ${base || 'no protected sites given'}.`, { after: 6 });
  for (const o of doc.options) {
    const head = `${o.key}. ${o.name}`;
    const line = optionBottomLine(o);
    const trees = `${treesCostText(o)}.`;
    const carried = transportLine(doc, o);
    flow.ensure(flow.measure(head, { font: FONT.bold }) + flow.measure(line) + flow.measure(trees, { size: 8.5 }) + (carried ? flow.measure(carried, { size: 8.5 }) : 0) + 8);
    flow.text(head, { font: FONT.bold, after: 1 });
    flow.text(line, { indent: 14, after: 1 });
    flow.text(trees, { indent: 14, size: 8.5, color: '#333333', after: carried ? 1 : 6 });
    if (carried) flow.text(carried, { indent: 14, size: 8.5, color: '#333333', after: 6 });
  }
  const ens = ensembleLines(doc);
  if (ens) {
    const keys = doc.ensemble!.options.map((o) => o.key);
    flow.text(`How sure, over ${doc.ensemble!.draws} draws of the uncertain parameters (details under “How sure”): the chance that each site is reached within ${doc.horizonYears} years.`, { size: 9, after: 1 });
    for (const r of ens.rows) flow.text(`${r.site}: ${r.baseline} without a band; ${r.options.map((p, i) => `${p} with ${keys[i]}`).join(', ')}.`, { indent: 14, size: 8.5, after: 1 });
    flow.space(4);
  }
  const box = doc.cautions.filter((c) => /regulat|licensed|hazardous|field survey/i.test(c)).join(' ');
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

/** The host map across the page, then the arrival maps two per row (side by side). */
function mapsSection(flow: Flow, maps: IdMap[]): void {
  if (!maps.length) return;
  flow.newPage();
  flow.heading('The map and the bands');
  flow.chart(maps[0]);
  const arrival = maps.slice(1);
  if (!arrival.length) return;
  flow.newPage();
  flow.heading('Where and when the pest arrives: without a band and with each band');
  flow.text(arrival[0].hint, { font: FONT.italic, size: 8, after: 6 });
  const gap = 12;
  const w = (flow.width - gap) / 2;
  for (let i = 0; i < arrival.length; i += 2) {
    const pair = arrival.slice(i, i + 2);
    const h = Math.max(...pair.map((m) => (w * m.height) / m.width));
    flow.ensure(h + 8);
    const y = flow.y;
    pair.forEach((m, k) => {
      try {
        drawChart(flow.doc, m, PAGE.left + k * (w + gap), y, w);
      } catch (e) {
        flow.doc.font(FONT.italic).fontSize(8).text(`(map could not be drawn: ${(e as Error).message})`, PAGE.left + k * (w + gap), y, { width: w });
      }
    });
    flow.doc.x = PAGE.left;
    flow.doc.y = y + h + 8;
  }
}

function tableSection(flow: Flow, doc: LandscapeDocument): void {
  flow.newPage();
  flow.heading('Options and arrivals');
  const cols: Column[] = [
    { header: 'Option', width: 110 },
    { header: 'Verdict', width: 110 },
    { header: 'Way past', width: 55 },
    { header: 'Protected site', width: 80 },
    { header: 'Arrival without → with band (yr)', width: 75, align: 'right' },
    { header: 'Delay (yr)', width: 40, align: 'right' },
    { header: 'Trees removed', width: 50, align: 'right' },
  ];
  const rows: string[][] = [];
  for (const o of doc.options) {
    const arrivals = o.arrivals.length ? o.arrivals : [{ site: '—', baselineYears: null, optionYears: null, delayYears: null }];
    arrivals.forEach((a, k) => {
      rows.push([
        k === 0 ? `${o.key}. ${o.name}` : '',
        k === 0 ? o.verdict.sentence : '',
        k === 0 ? o.wayPast : '',
        a.site,
        `${years(a.baselineYears, 'not reached')} → ${years(a.optionYears, 'not reached')}`,
        years(a.delayYears),
        k === 0 ? String(o.treesRemoved.toLocaleString('en-GB').replace(/,/g, '\u202f')) : '',
      ]);
    });
  }
  flow.table(cols, rows);
  flow.text(
    'Arrival = first year a breeding population stands at the site (the detection level for pests without an Allee effect). "Way past" is read from the band cells the front occupied: through the band, around its ends, or none within the horizon. "Holds" is stated only with evidence (a verified steady state of the map equations); otherwise an option that is not crossed is reported as "not crossed within the horizon".',
    { size: 8.5, color: '#333333' },
  );
  const cs = doc.options.filter((o) => o.crossSectionCriticalWidthM);
  if (cs.length) {
    flow.heading('Band cross-sections (1-D)', 3, 30);
    flow.bullets(cs.map((o) => `${o.key}. ${o.name}: along the band's normal (a transect through the band) the critical width lies between ${Math.round(o.crossSectionCriticalWidthM![0])} and ${Math.round(o.crossSectionCriticalWidthM![1])} m. This is a one-dimensional result: it ignores the band's ends.`), { size: 8.5 });
  }
}

/** The ensemble's chances of arrival, when the scenario asked for draws (wording from summary.ts). */
function ensembleSection(flow: Flow, doc: LandscapeDocument): void {
  const ens = ensembleLines(doc);
  if (!ens) return;
  flow.heading('How sure: chance of arrival over the uncertain parameters', 3, 60);
  flow.text(ens.intro, { size: 8.5, color: '#333333' });
  const options = doc.ensemble!.options;
  const w = Math.min(80, Math.max(45, Math.floor(360 / Math.max(1, options.length))));
  const cols: Column[] = [
    { header: 'Protected site', width: 110 },
    { header: 'Without a band', width: 60, align: 'right' },
    ...options.map((o) => ({ header: `With ${o.key}`, width: w, align: 'right' as const })),
  ];
  flow.table(cols, ens.rows.map((r) => [r.site, r.baseline, ...r.options]));
  flow.bullets(ens.wayPast, { size: 8.5 });
}

function mapNotesSection(flow: Flow, doc: LandscapeDocument): void {
  flow.heading('What was read from the map', 2, 40);
  flow.bullets(
    [
      ...doc.notes,
      `Cells outside the habitat (water, built-up, no data) are ${doc.map.outside === 'impassable' ? 'impassable: insects do not enter them' : 'lethal: insects entering them die'}; map edges reflect.`,
      `Map files (SHA-256): ${Object.entries(doc.mapFiles).map(([n, h]) => `${n} ${h.slice(0, 16)}…`).join('; ')}.`,
    ],
    { size: 8.5 },
  );
}
