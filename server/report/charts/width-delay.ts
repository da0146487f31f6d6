/**
 * Width–delay curve of one option: years of delay at the sites beyond the clearing against clearing width,
 * with the critical-width bracket (widths that let the front through vs widths verified to hold) shaded,
 * the phase-plane estimate and the option's own width marked. Widths where the front was verified pinned
 * are shown in a "holds" strip above the plot, since their delay is unbounded.
 */
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import type { OptionResult } from '../../analysis/result.ts';
import { num } from '../format.ts';
import { el, isNum, line, rect, svgRoot, text } from './svg.ts';
import { marker, siteStyle, strokeAttrs, type SeriesStyle } from './styles.ts';
import { BOTTOM_AXIS_SPACE, DEFAULT_WIDTH, axisBottom, axisLeft, bottom, leftAxisSpace, legend, padExtent, right, type Box, type Chart, type ChartSize, type LegendEntry } from './frame.ts';

export type WidthDelayInput = Pick<OptionResult, 'name' | 'widthM' | 'widthDelay'> & Partial<Pick<OptionResult, 'criticalWidth' | 'sites'>>;

export interface WidthDelayOptions extends ChartSize {
  /** Letter key of the option, for the title. */
  key?: string;
  /** Site names in scenario order (used when the option carries no site verdicts). */
  siteNames?: string[];
  /** Most sites drawn as separate lines. */
  maxSites?: number;
}

const HOLDS_STRIP = 18;

/**
 * The chart, or null when the option carries no width–delay rows (the barrier analysis did not run).
 */
export function widthDelayChart(option: WidthDelayInput, o: WidthDelayOptions = {}): Chart | null {
  const rows = (option.widthDelay ?? []).filter((r) => isNum(r.widthM)).sort((a, b) => a.widthM - b.widthM);
  if (!rows.length) return null;
  const width = o.width ?? DEFAULT_WIDTH;
  const plotHeight = o.plotHeight ?? 200;
  const cw = option.criticalWidth;
  const { lines, useCrossing } = delayLines(option, rows, o);
  const ys = lines.flatMap((l) => l.pts.map((p) => p[1]).filter(isNum));
  const yExt = ys.length ? padExtent(Math.min(0, ...ys), Math.max(...ys), 0.06) : ([0, 1] as [number, number]);
  const xMaxCandidates = [...rows.map((r) => r.widthM), option.widthM, ...(cw?.bracketM ?? []), ...(isNum(cw?.phasePlaneM) ? [cw.phasePlaneM] : [])].filter(isNum);
  const xScale = scaleLinear().domain([0, Math.max(...xMaxCandidates) * 1.05]).nice(6);
  const yScale = scaleLinear().domain(yExt);
  const left = leftAxisSpace(yScale);
  const showHolds = cw?.applicable !== false || rows.some((r) => r.pinned);
  const box: Box = { left, top: 14 + (showHolds ? HOLDS_STRIP : 0), width: width - left - 16, height: plotHeight };
  xScale.range([box.left, right(box)]);
  yScale.range([bottom(box), box.top]);

  const lg = legend(widthDelayLegend(lines, cw, rows), 8, bottom(box) + BOTTOM_AXIS_SPACE + 6, width - 16);
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + lg.height + 8;

  let body = axisBottom(xScale, box, { label: 'clearing width (m)', grid: true });
  body += axisLeft(yScale, box, { label: useCrossing ? 'crossing time (yr)' : 'delay (years)', grid: true });
  body += widthMarks(option, rows, box, xScale, showHolds);
  lines.forEach((l) => {
    const d = d3line<[number, number | null]>()
      .defined((p) => isNum(p[0]) && isNum(p[1]))
      .x((p) => xScale(p[0]))
      .y((p) => yScale(p[1] as number))
      .digits(2)(l.pts);
    if (d) body += el('path', { d, ...strokeAttrs(l.style) });
    for (const p of l.pts) if (isNum(p[1])) body += marker(l.style, xScale(p[0]), yScale(p[1]), 26);
  });
  body += lg.svg;
  const title = `How the delay grows with width${o.key ? ` — option ${o.key}` : ''}`;
  const per100 = cw?.delayPer100mYears;
  const hint = cw?.applicable !== false
    ? 'Widths right of the shaded bracket hold the front; a width inside the bracket cannot be called either way.'
    : isNum(per100)
      ? `No width stops the front for good here; each extra 100 m buys about ${num(per100, 2)} years at the first site beyond the clearing.`
      : 'No width stops the front for good here: read the delay your width buys.';
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}

type Row = NonNullable<WidthDelayInput['widthDelay']>[number];
type CriticalWidth = WidthDelayInput['criticalWidth'];

interface Line {
  label: string;
  style: SeriesStyle;
  pts: [number, number | null][];
}

/**
 * One delay line per site beyond the barrier (when known) with at least one finite delay; with none, the
 * crossing time of the clearing's far edge instead.
 */
function delayLines(option: WidthDelayInput, rows: Row[], o: WidthDelayOptions): { lines: Line[]; useCrossing: boolean } {
  const nSites = Math.max(0, ...rows.map((r) => r.delayYearsBySite.length));
  const names = option.sites?.map((s) => s.name) ?? o.siteNames ?? [];
  let siteIdx = Array.from({ length: nSites }, (_, i) => i).filter((i) => rows.some((r) => isNum(r.delayYearsBySite[i])));
  if (option.sites?.length) siteIdx = siteIdx.filter((i) => option.sites?.[i]?.beyondBarrier !== false);
  siteIdx = siteIdx.slice(0, o.maxSites ?? 4);
  const useCrossing = siteIdx.length === 0;
  const lines: Line[] = useCrossing
    ? [{ label: 'year the front passes the far edge of the clearing', style: siteStyle(0), pts: rows.map((r) => [r.widthM, r.crossingYears]) }]
    : siteIdx.map((i, k) => ({ label: `delay at ${names[i] ?? `site ${i + 1}`}`, style: siteStyle(k), pts: rows.map((r) => [r.widthM, r.delayYearsBySite[i]]) }));
  return { lines, useCrossing };
}

function widthDelayLegend(lines: Line[], cw: CriticalWidth, rows: Row[]): LegendEntry[] {
  const entries: LegendEntry[] = lines.map((l) => ({ label: l.label, style: l.style }));
  if (cw?.bracketM) entries.push({ label: 'critical width lies in the shaded bracket', swatch: rect(0, 0, 24, 10, { fill: '#cfcfcf', stroke: '#555555', 'stroke-width': 0.6 }) });
  if (isNum(cw?.phasePlaneM)) entries.push({ label: 'phase-plane estimate', swatch: line(12, 0, 12, 10, { stroke: '#000000', 'stroke-dasharray': '3 2', 'stroke-width': 1.3 }) });
  entries.push({ label: 'this option’s width', swatch: line(12, 0, 12, 10, { stroke: '#000000', 'stroke-width': 2 }) });
  if (rows.some((r) => r.pinned)) entries.push({ label: 'front stops at this width (holds; checked)', swatch: el('path', { d: 'M7,10L17,10L12,1Z', fill: '#000000' }) });
  return entries;
}

/** The critical-width bracket, the phase-plane estimate, the option's own width and the "holds" strip. */
function widthMarks(option: WidthDelayInput, rows: Row[], box: Box, xScale: ScaleLinear<number, number>, showHolds: boolean): string {
  const cw = option.criticalWidth;
  let body = '';
  if (cw?.bracketM && cw.bracketM.every(isNum)) {
    const [a, b] = cw.bracketM;
    const xa = xScale(a);
    const w = Math.max(2, xScale(b) - xa);
    body += rect(xa, box.top - (showHolds ? HOLDS_STRIP : 0), w, box.height + (showHolds ? HOLDS_STRIP : 0), { fill: '#cfcfcf', 'fill-opacity': 0.8, stroke: '#555555', 'stroke-width': 0.6 });
  }
  if (isNum(cw?.phasePlaneM)) {
    const x = xScale(cw.phasePlaneM);
    body += line(x, box.top - (showHolds ? HOLDS_STRIP : 0), x, bottom(box), { stroke: '#000000', 'stroke-dasharray': '3 2', 'stroke-width': 1.3 });
  }
  const ox = xScale(option.widthM);
  body += line(ox, box.top - (showHolds ? HOLDS_STRIP : 0), ox, bottom(box), { stroke: '#000000', 'stroke-width': 2 });
  body += text(Math.min(ox + 4, right(box) - 4), box.top + 3, `${num(option.widthM)} m`, { size: 9, valign: 'top', anchor: ox + 50 > right(box) ? 'end' : 'start', bold: true });
  // "Holds" strip above the plot (only where holding is possible or was seen).
  if (showHolds) {
    body += line(box.left, box.top - 2, right(box), box.top - 2, { stroke: '#bbbbbb', 'stroke-width': 0.6 });
    body += text(box.left + 3, box.top - HOLDS_STRIP / 2 - 1, 'holds:', { size: 9, valign: 'middle', fill: '#333333' });
  }
  for (const r of rows.filter((r) => r.pinned)) {
    const x = xScale(r.widthM);
    const y = box.top - HOLDS_STRIP / 2 - 1;
    body += el('path', { d: `M${x - 5},${y + 5}L${x + 5},${y + 5}L${x},${y - 5}Z`, fill: '#000000' });
  }
  return body;
}
