/**
 * The transect drawn as a strip: habitats along it, the current infestation, the protected sites, one row
 * per barrier option, an axis in km and a scale bar. Habitats differ in lightness and pattern and are named
 * inside the strip where there is room, so the strip reads in greyscale.
 */
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import type { Habitat } from '../../model/scenario.ts';
import type { PieceSummary } from '../../analysis/result.ts';
import { num } from '../format.ts';
import { el, isNum, line, rect, svgRoot, text } from './svg.ts';
import { fitText, textWidth } from './text-metrics.ts';
import { optionKey } from './styles.ts';
import { DEFAULT_WIDTH, axisBottom, bottom, legend, siteNumber, wrapTokens, type Box, type Chart, type ChartSize, type LegendEntry } from './frame.ts';
import { infestationOf, optionInterval, transectExtent, type Interval, type SitePart } from './parts.ts';

export interface TransectInput {
  baseline: { layout: PieceSummary[]; arrivals?: SitePart[]; series?: { leftFrontKm: (number | null)[]; rightFrontKm: (number | null)[] } };
  options: { name: string; fromKm: number; widthM: number; cover?: 'clearing' | 'non-host-forest' }[];
  infestation?: Interval;
  /** Protected sites; the baseline's arrival list by default. */
  sites?: SitePart[];
}

const STRIP_H = 26;
const SITE_ROW = 12;
const OPTION_ROW = 14;
const HOST_LIGHT = '#e4eedd';
const HOST_DARK = '#5d8a4c';
const INFESTED = '#b2182b';
const HOST_RAMP = scaleLinear<string>().domain([0, 1]).range([HOST_LIGHT, HOST_DARK]);

/** Fill for host forest at a stocking 0–1: darker = more host. */
export function hostFill(stocking: number): string {
  return HOST_RAMP(Math.max(0, Math.min(1, stocking)));
}

const PATTERNS =
  '<pattern id="bx-hatch-nonhost" patternUnits="userSpaceOnUse" width="6" height="6">' +
  '<rect x="0" y="0" width="6" height="6" fill="#d6d6d6"/><path d="M0,6L6,0" stroke="#555555" stroke-width="0.8"/></pattern>' +
  '<pattern id="bx-hatch-infested" patternUnits="userSpaceOnUse" width="5" height="5">' +
  '<rect x="0" y="0" width="5" height="5" fill="#f4c7c3"/><path d="M0,0L5,5" stroke="' + INFESTED + '" stroke-width="1.2"/></pattern>';

function habitatFill(h: Habitat, stocking: number): string {
  return h === 'host-forest' ? hostFill(stocking) : h === 'non-host-forest' ? 'url(#bx-hatch-nonhost)' : '#ffffff';
}

const HABITAT_WORDS: Record<Habitat, string> = { 'host-forest': 'host forest', clearing: 'open', 'non-host-forest': 'non-host' };

/** A scale-bar length: 1, 2 or 5 × 10^k km, about a fifth of the span. */
export function scaleBarKm(spanKm: number): number {
  const target = spanKm / 5;
  const p = Math.pow(10, Math.floor(Math.log10(target)));
  const m = target / p;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * p;
}

export function transectStrip(input: TransectInput, size: ChartSize = {}): Chart {
  const width = size.width ?? DEFAULT_WIDTH;
  const layout = input.baseline.layout;
  const [x0, x1] = transectExtent(layout);
  const xs = scaleLinear().domain([x0, x1]);
  const margin = 14;
  const plotW = width - 2 * margin;
  xs.range([margin, margin + plotW]);
  const infestation = input.baseline.series ? infestationOf({ infestation: input.infestation, baseline: { series: { ...input.baseline.series, timesYears: [], totalInsects: [] } } }) : (input.infestation ?? null);
  const sites = (input.sites ?? input.baseline.arrivals ?? []).filter((s) => isNum(s.atKm));
  const siteKey = sites.map((s, i) => `${siteNumber(i)}\u00a0${s.name}\u00a0(km\u00a0${num(s.atKm, 4)})`);

  // Site labels: greedy rows so no two labels overlap. Names are used when they fit on one row; otherwise
  // the site numbers (as in the tables) with a key below the chart, so leader lines never cross labels.
  const across = { xs, left: margin, right: margin + plotW };
  let { placed, rowEnds } = placeSiteLabels(sites, across, (s) => fitText(s.name, 160, 9));
  const numbered = rowEnds.length > 1;
  if (numbered) ({ placed, rowEnds } = placeSiteLabels(sites, across, (_, i) => siteNumber(i)));
  const siteRows = rowEnds.length;
  const stripTop = 6 + siteRows * SITE_ROW + (siteRows ? 8 : 0) + 12;
  const box: Box = { left: margin, top: stripTop, width: plotW, height: STRIP_H };
  const optionsTop = bottom(box) + 6;
  const optionsH = input.options.length * OPTION_ROW;
  const axisBox: Box = { left: margin, top: box.top, width: plotW, height: optionsTop + optionsH - box.top };

  let body = siteMarks(placed, stripTop, numbered);
  body += habitatPieces(layout, xs, box);
  if (infestation) {
    const xa = xs(infestation.fromKm);
    const w = Math.max(2, xs(infestation.toKm) - xa);
    body += rect(xa, box.top - 9, w, 7, { fill: 'url(#bx-hatch-infested)', stroke: INFESTED, 'stroke-width': 0.8 });
  }
  body += optionRows(input.options, across, optionsTop);
  body += axisBottom(xs, axisBox, { label: 'position along the transect (km)' });
  const sbY = bottom(axisBox) + 46;
  const bar = scaleBar(xs, x0, x1, margin, sbY);
  body += bar.svg;
  const lgX = margin + bar.widthPx + 40;
  const lg = legend(stripLegend(numbered), lgX, sbY - 4, width - lgX - margin, 9);
  let height = Math.max(sbY + 22, sbY - 4 + lg.height) + 6;
  if (numbered) {
    const lines = wrapTokens(siteKey, plotW, 9);
    body += text(margin, height + 2, 'Protected sites:', { size: 9, bold: true, valign: 'top' });
    lines.forEach((l, k) => (body += text(margin, height + 14 + 12 * k, l, { size: 9, valign: 'top' })));
    height += 14 + 12 * lines.length + 6;
  }
  body += lg.svg;
  const title = 'The transect, the current infestation, the sites and the options';
  const hint = 'The infestation spreads along this line; each lower row shows where an option would cut its clearing.';
  return { svg: svgRoot(width, height, title, hint, body, PATTERNS), title, hint, width, height };
}

/** The km scale and the plot's left and right edges [px]. */
interface Across {
  xs: ScaleLinear<number, number>;
  left: number;
  right: number;
}

type PlacedLabel = { s: SitePart; i: number; px: number; label: string; lx: number; row: number };

/** Site labels in greedy rows, left to right, so no two overlap; the row ends tell how many rows. */
function placeSiteLabels(sites: SitePart[], { xs, left, right }: Across, labelOf: (s: SitePart, i: number) => string): { placed: PlacedLabel[]; rowEnds: number[] } {
  const rowEnds: number[] = [];
  const placed = sites
    .map((s, i) => ({ s, i, px: xs(s.atKm) }))
    .sort((a, b) => a.px - b.px)
    .map((p) => {
      const label = labelOf(p.s, p.i);
      const w = textWidth(label, 9);
      const lx = Math.min(Math.max(p.px - w / 2, left), right - w);
      let row = rowEnds.findIndex((end) => lx > end + 6);
      if (row < 0) {
        row = rowEnds.length;
        rowEnds.push(0);
      }
      rowEnds[row] = lx + w;
      return { ...p, label, lx, row };
    });
  return { placed, rowEnds };
}

/** Each site's label in its row, a leader line down to the strip and a mark on it. */
function siteMarks(placed: PlacedLabel[], stripTop: number, numbered: boolean): string {
  let body = '';
  for (const p of placed) {
    const ly = 6 + p.row * SITE_ROW;
    body += text(p.lx, ly, p.label, { size: 9, valign: 'top', bold: numbered });
    body += line(p.px, ly + 11, p.px, stripTop - 2, { stroke: '#444444', 'stroke-width': 0.7 });
    body += el('path', { d: `M${p.px - 4},${stripTop - 9}L${p.px + 4},${stripTop - 9}L${p.px},${stripTop - 1}Z`, fill: '#000000' });
  }
  return body;
}

/** Habitat pieces (at least 1.5 px so a narrow existing gap stays visible), named where there is room. */
function habitatPieces(layout: PieceSummary[], xs: ScaleLinear<number, number>, box: Box): string {
  let body = '';
  for (const p of layout) {
    const xa = xs(p.fromKm);
    const w = Math.max(1.5, xs(p.toKm) - xa);
    body += rect(xa, box.top, w, STRIP_H, { fill: habitatFill(p.habitat, p.stocking), stroke: '#333333', 'stroke-width': 0.6 });
    const word = HABITAT_WORDS[p.habitat];
    if (textWidth(word, 9) + 6 < w) body += text(xa + w / 2, box.top + STRIP_H / 2, word, { anchor: 'middle', valign: 'middle', size: 9 });
  }
  return body;
}

/** Options: one row each, mark at the clearing, label beside it (on the side with more room). */
function optionRows(options: TransectInput['options'], { xs, left, right }: Across, optionsTop: number): string {
  let body = '';
  options.forEach((o, k) => {
    const c = optionInterval(o);
    const y = optionsTop + k * OPTION_ROW;
    const xa = xs(c.fromKm);
    const w = Math.max(3, xs(c.toKm) - xa);
    body += line(left, y + OPTION_ROW / 2, right, y + OPTION_ROW / 2, { stroke: '#eeeeee', 'stroke-width': 0.6 });
    body += rect(xa, y + 2, w, OPTION_ROW - 4, { fill: o.cover === 'non-host-forest' ? 'url(#bx-hatch-nonhost)' : '#ffffff', stroke: '#000000', 'stroke-width': 1.2 });
    const label = `${optionKey(k)}  ${o.name} — ${num(o.widthM)} m ${o.cover === 'non-host-forest' ? 'non-host forest' : 'clearing'} from km ${num(c.fromKm, 4)}`;
    const roomRight = right - (xa + w) - 6;
    const roomLeft = xa - left - 6;
    const onRight = roomRight >= roomLeft;
    const shown = fitText(label, Math.max(roomRight, roomLeft), 9);
    body += text(onRight ? xa + w + 5 : xa - 5, y + OPTION_ROW / 2, shown, { size: 9, valign: 'middle', anchor: onRight ? 'start' : 'end' });
  });
  return body;
}

/** Scale bar below the axis title: alternating black and white halves, labelled in km. */
function scaleBar(xs: ScaleLinear<number, number>, x0: number, x1: number, left: number, sbY: number): { svg: string; widthPx: number } {
  const sb = scaleBarKm(x1 - x0);
  const sbW = xs(x0 + sb) - xs(x0);
  let body = rect(left, sbY, sbW / 2, 5, { fill: '#000000', stroke: '#000000', 'stroke-width': 0.8 });
  body += rect(left + sbW / 2, sbY, sbW / 2, 5, { fill: '#ffffff', stroke: '#000000', 'stroke-width': 0.8 });
  body += text(left, sbY + 8, '0', { size: 9, valign: 'top', anchor: 'middle' });
  body += text(left + sbW, sbY + 8, `${num(sb)} km`, { size: 9, valign: 'top', anchor: 'middle' });
  return { svg: body, widthPx: sbW };
}

function stripLegend(numbered: boolean): LegendEntry[] {
  return [
    { label: 'host forest (darker = more host)', swatch: rect(0, 0, 12, 10, { fill: hostFill(0.4), stroke: '#333333', 'stroke-width': 0.6 }) + rect(12, 0, 12, 10, { fill: hostFill(1), stroke: '#333333', 'stroke-width': 0.6 }) },
    { label: 'open ground (clearing)', swatch: rect(0, 0, 24, 10, { fill: '#ffffff', stroke: '#333333', 'stroke-width': 0.6 }) },
    { label: 'non-host forest', swatch: rect(0, 0, 24, 10, { fill: 'url(#bx-hatch-nonhost)', stroke: '#333333', 'stroke-width': 0.6 }) },
    { label: 'infested now', swatch: rect(0, 2, 24, 7, { fill: 'url(#bx-hatch-infested)', stroke: INFESTED, 'stroke-width': 0.8 }) },
    { label: 'barrier option (one row each)', swatch: rect(6, 1, 12, 9, { fill: '#ffffff', stroke: '#000000', 'stroke-width': 1.2 }) },
    { label: numbered ? 'protected site (number: key below)' : 'protected site', swatch: el('path', { d: 'M8,1L16,1L12,9Z', fill: '#000000' }) },
  ];
}
