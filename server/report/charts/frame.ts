/**
 * Building blocks every chart shares: the plot box, axes with labelled units, legends, label placement.
 * A new chart (e.g. uncertainty or sensitivity) is written from these; see README.md in this folder.
 */
import type { ScaleLinear } from 'd3-scale';
import { el, f, line, rect, text } from './svg.ts';
import { fitText, textWidth } from './text-metrics.ts';
import { marker, strokeAttrs, type SeriesStyle } from './styles.ts';

/** What every chart function returns: the SVG, a title and a one-line reading hint. */
export interface Chart {
  /** Standalone SVG (width, height and viewBox set; text escaped). Used as-is by web pages and the PDF. */
  svg: string;
  title: string;
  /** One line telling the reader what to look at. */
  hint: string;
  /** Size of the SVG in its own units (px). */
  width: number;
  height: number;
}

/** Plot area inside a chart [px]. */
export interface Box {
  left: number;
  top: number;
  width: number;
  height: number;
}

/** Size options accepted by every chart. */
export interface ChartSize {
  /** Total width [px]; default 640. */
  width?: number;
  /** Height of the plot area [px] (the chart adds axes and legend around it). */
  plotHeight?: number;
}

export const DEFAULT_WIDTH = 640;
export const TICK_SIZE = 10;
export const LABEL_SIZE = 11;
export const GRID = '#e3e3e3';
export const AXIS = '#333333';
/** Tick labels: fixed notation, precision from the tick step, no thousands comma (d3-format "~f"). */
export const TICK_SPECIFIER = '~f';

export function right(b: Box): number {
  return b.left + b.width;
}
export function bottom(b: Box): number {
  return b.top + b.height;
}

export interface AxisOptions {
  /** Axis title with its unit, e.g. "time (yr)". Required: every axis says what it measures. */
  label: string;
  ticks?: number;
  /** Draw light grid lines across the plot. */
  grid?: boolean;
  /** Custom tick label format. */
  format?: (v: number) => string;
}

/** Bottom axis: line, ticks, tick labels, optional grid and the axis title below. */
export function axisBottom(scale: ScaleLinear<number, number>, box: Box, o: AxisOptions): string {
  const y = bottom(box);
  const values = scale.ticks(o.ticks ?? 6);
  const fmt = o.format ?? scale.tickFormat(o.ticks ?? 6, TICK_SPECIFIER);
  let s = '';
  for (const v of values) {
    const x = scale(v);
    if (o.grid) s += line(x, box.top, x, y, { stroke: GRID, 'stroke-width': 0.8 });
    s += line(x, y, x, y + 4, { stroke: AXIS, 'stroke-width': 1 });
    s += text(x, y + 6, fmt(v), { anchor: 'middle', size: TICK_SIZE, valign: 'top', fill: AXIS });
  }
  s += line(box.left, y, right(box), y, { stroke: AXIS, 'stroke-width': 1 });
  s += text(box.left + box.width / 2, y + 30, fitText(o.label, box.width, LABEL_SIZE), { anchor: 'middle', size: LABEL_SIZE });
  return s;
}

/** Left axis: line, ticks, tick labels, optional grid and the rotated axis title. */
export function axisLeft(scale: ScaleLinear<number, number>, box: Box, o: AxisOptions): string {
  const x = box.left;
  const values = scale.ticks(o.ticks ?? 5);
  const fmt = o.format ?? scale.tickFormat(o.ticks ?? 5, TICK_SPECIFIER);
  let s = '';
  let widest = 0;
  for (const v of values) {
    const y = scale(v);
    const label = fmt(v);
    widest = Math.max(widest, textWidth(label, TICK_SIZE));
    if (o.grid) s += line(x, y, right(box), y, { stroke: GRID, 'stroke-width': 0.8 });
    s += line(x - 4, y, x, y, { stroke: AXIS, 'stroke-width': 1 });
    s += text(x - 6, y, label, { anchor: 'end', size: TICK_SIZE, valign: 'middle', fill: AXIS });
  }
  s += line(x, box.top, x, bottom(box), { stroke: AXIS, 'stroke-width': 1 });
  const lx = Math.max(LABEL_SIZE, x - widest - 14);
  s += text(lx, box.top + box.height / 2, fitText(o.label, box.height, LABEL_SIZE), { anchor: 'middle', size: LABEL_SIZE, rotate: -90 });
  return s;
}

/** Space the left axis needs for tick labels and its title [px]. */
export function leftAxisSpace(scale: ScaleLinear<number, number>, ticks = 5, format?: (v: number) => string): number {
  const fmt = format ?? scale.tickFormat(ticks, TICK_SPECIFIER);
  const widest = Math.max(0, ...scale.ticks(ticks).map((v) => textWidth(fmt(v), TICK_SIZE)));
  return widest + 14 + LABEL_SIZE + 6;
}

/** Space below the plot for the bottom axis and its title [px]. */
export const BOTTOM_AXIS_SPACE = 40;

export interface LegendEntry {
  label: string;
  /** Line style sample (line + marker + key). */
  style?: SeriesStyle;
  /** Custom 24×10 swatch drawn with its top-left corner at (0, 0). */
  swatch?: string;
}

const LEGEND_ROW = 15;
const SWATCH_W = 28;

/**
 * Legend laid out in equal columns that fit `width`; labels that would not fit are shortened with an
 * ellipsis (full names appear in the tables). Returns the SVG and its height.
 */
export function legend(entries: LegendEntry[], x: number, y: number, width: number, size = 10): { svg: string; height: number } {
  if (!entries.length) return { svg: '', height: 0 };
  const keyW = (e: LegendEntry) => (e.style?.key ? textWidth(`${e.style.key} `, size, true) : 0);
  const natural = Math.max(...entries.map((e) => SWATCH_W + 6 + keyW(e) + textWidth(e.label, size))) + 14;
  const cols = Math.max(1, Math.min(entries.length, Math.floor(width / Math.min(natural, width))));
  const colW = width / cols;
  let s = '';
  entries.forEach((e, i) => {
    const cx = x + (i % cols) * colW;
    const cy = y + Math.floor(i / cols) * LEGEND_ROW;
    const mid = cy + LEGEND_ROW / 2;
    if (e.style) {
      s += line(cx, mid, cx + SWATCH_W, mid, strokeAttrs(e.style));
      s += marker(e.style, cx + SWATCH_W / 2, mid, 30, e.style.fill);
    } else if (e.swatch) {
      s += el('g', { transform: `translate(${f(cx + 2)},${f(mid - 5)})` }, e.swatch);
    }
    let tx = cx + SWATCH_W + 6;
    if (e.style?.key) {
      s += text(tx, mid, e.style.key, { size, bold: true, valign: 'middle' });
      tx += keyW(e);
    }
    s += text(tx, mid, fitText(e.label, colW - (tx - cx) - 8, size), { size, valign: 'middle' });
  });
  return { svg: s, height: Math.ceil(entries.length / cols) * LEGEND_ROW };
}

/** Height a legend of `n` entries will take (same rule as `legend`). */
export function legendHeight(entries: LegendEntry[], width: number, size = 10): number {
  return legend(entries, 0, 0, width, size).height;
}

/**
 * Moves label positions (px, along one axis) apart so neighbours are at least `gap` apart, keeping their
 * order and staying within [lo, hi] where possible. Returns new positions in the input order and whether
 * all labels fit.
 */
export function spreadLabels(positions: number[], gap: number, lo: number, hi: number): { at: number[]; fits: boolean } {
  const order = positions.map((p, i) => ({ p: Math.min(hi, Math.max(lo, p)), i })).sort((a, b) => a.p - b.p);
  for (let k = 1; k < order.length; k++) order[k].p = Math.max(order[k].p, order[k - 1].p + gap);
  if (order.length && order[order.length - 1].p > hi) {
    order[order.length - 1].p = hi;
    for (let k = order.length - 2; k >= 0; k--) order[k].p = Math.min(order[k].p, order[k + 1].p - gap);
  }
  const fits = order.length === 0 || order[0].p >= lo - 1e-9;
  const at = new Array<number>(positions.length);
  for (const o of order) at[o.i] = o.p;
  return { at, fits };
}

/**
 * Greedy line filling of whole tokens (each token is kept on one line; a token wider than the line is
 * shortened with an ellipsis). Tokens on a line are joined with `sep`.
 */
export function wrapTokens(tokens: string[], maxWidth: number, size: number, sep = ' · '): string[] {
  const lines: string[] = [];
  let cur = '';
  for (const raw of tokens) {
    const t = fitText(raw, maxWidth, size);
    const next = cur ? `${cur}${sep}${t}` : t;
    if (cur && textWidth(next, size) > maxWidth) {
      lines.push(cur);
      cur = t;
    } else cur = next;
  }
  if (cur) lines.push(cur);
  return lines;
}

/** Site numbers are 1-based positions in the scenario's site list, the same in every chart and table. */
export function siteNumber(i: number): string {
  return String(i + 1);
}

/** Text with a white backing so it stays legible over lines and grid. */
export function haloText(x: number, y: number, s: string, size: number, fill = '#333333'): string {
  const w = textWidth(s, size);
  return rect(x - 1.5, y - 0.6 * size, w + 3, 1.2 * size, { fill: '#ffffff', 'fill-opacity': 0.85 }) + text(x, y, s, { size, valign: 'middle', fill });
}

/** A small "no data" panel, used when a chart is asked for with nothing to draw. */
export function emptyPanel(box: Box, message: string): string {
  return (
    rect(box.left, box.top, box.width, box.height, { fill: '#fafafa', stroke: GRID }) +
    text(box.left + box.width / 2, box.top + box.height / 2, fitText(message, box.width - 20, LABEL_SIZE), { anchor: 'middle', valign: 'middle', size: LABEL_SIZE, fill: '#555555' })
  );
}

/** Pads a numeric extent by a fraction on both sides (and widens a zero-width extent). */
export function padExtent(lo: number, hi: number, frac = 0.03): [number, number] {
  if (!(hi > lo)) return [lo - 1, hi + 1];
  const d = (hi - lo) * frac;
  return [lo - d, hi + d];
}
