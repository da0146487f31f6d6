/**
 * Line styles for baseline and options. Each option differs from the others in four ways at once —
 * colour, dash pattern, marker shape and a letter key printed beside the line — so a chart stays readable
 * when printed in greyscale or read by someone who does not tell the colours apart.
 */
import { symbol, symbolCircle, symbolCross, symbolDiamond, symbolSquare, symbolStar, symbolTriangle, symbolWye, type SymbolType } from 'd3-shape';
import { schemeDark2 } from 'd3-scale-chromatic';
import { el, f } from './svg.ts';

export interface SeriesStyle {
  /** Letter key printed on charts and in tables ('' for the baseline). */
  key: string;
  stroke: string;
  /** stroke-dasharray ('' = solid). */
  dash: string;
  width: number;
  /** Marker shape drawn along the line (null = none). */
  marker: { type: SymbolType; rotate: number } | null;
  /** Marker fill (white by default, so markers stay visible on top of lines). */
  fill?: string;
}

/** The baseline (no clearing): solid, thick, black, no marker. */
export const BASELINE_STYLE: SeriesStyle = { key: '', stroke: '#000000', dash: '', width: 2.4, marker: null };

/** Dash patterns chosen to stay distinct when printed small (px at chart scale). */
const DASHES = ['7 3', '2 2.5', '10 3 2 3', '14 4', '4 2 1 2', '1 3.5', '10 2 2 2 2 2', '5 5'];
const MARKERS: { type: SymbolType; rotate: number }[] = [
  { type: symbolCircle, rotate: 0 },
  { type: symbolSquare, rotate: 0 },
  { type: symbolTriangle, rotate: 0 },
  { type: symbolDiamond, rotate: 0 },
  { type: symbolCross, rotate: 0 },
  { type: symbolStar, rotate: 0 },
  { type: symbolWye, rotate: 0 },
  { type: symbolTriangle, rotate: 180 },
];

/** Most options a scenario may have (scenario schema) and therefore the number of distinct styles. */
export const MAX_STYLED_OPTIONS = 8;

/** Letter key of option k (0-based): A, B, …; beyond Z, A1, B1, … (never needed with ≤ 8 options). */
export function optionKey(k: number): string {
  const letter = String.fromCharCode(65 + (k % 26));
  return k < 26 ? letter : `${letter}${Math.floor(k / 26)}`;
}

/** Style of option k (0-based). Styles repeat after 8 but keys stay unique. */
export function optionStyle(k: number): SeriesStyle {
  const i = k % MAX_STYLED_OPTIONS;
  return { key: optionKey(k), stroke: schemeDark2[i], dash: DASHES[i], width: 1.8, marker: MARKERS[i] };
}

/** Secondary styles for several sites or quantities within one chart (greys, dashes, markers). */
export function siteStyle(k: number): SeriesStyle {
  const greys = ['#000000', '#444444', '#666666', '#888888'];
  return { key: '', stroke: greys[k % greys.length], dash: k === 0 ? '' : DASHES[(k - 1) % DASHES.length], width: 1.6, marker: MARKERS[k % MARKERS.length] };
}

/** A marker of the style at (x, y): white fill so it stays visible on top of lines. */
export function marker(style: SeriesStyle, x: number, y: number, area = 40, fill = style.fill ?? '#ffffff'): string {
  if (!style.marker) return '';
  const d = symbol(style.marker.type, area).digits(2)() ?? '';
  const rot = style.marker.rotate ? ` rotate(${style.marker.rotate})` : '';
  return el('path', { d, transform: `translate(${f(x)},${f(y)})${rot}`, fill, stroke: style.stroke, 'stroke-width': 1.3 });
}

/** Stroke attributes of a style for a path or line. */
export function strokeAttrs(style: SeriesStyle): Record<string, string | number> {
  const a: Record<string, string | number> = { fill: 'none', stroke: style.stroke, 'stroke-width': style.width, 'stroke-linejoin': 'round' };
  if (style.dash) a['stroke-dasharray'] = style.dash;
  return a;
}
