/**
 * Front position against time: the baseline (no clearing) and each option, with the clearings as shaded
 * bands and the protected sites as dotted lines. A front that stops at a band is held there; a line that
 * runs parallel to the baseline but later is a delay; one that runs ahead of it is a speed-up.
 */
import { scaleLinear, type ScaleLinear } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import type { RunResult } from '../../analysis/result.ts';
import { el, isNum, line, rect, svgRoot, text } from './svg.ts';
import { fitText, textWidth } from './text-metrics.ts';
import { BASELINE_STYLE, marker, optionStyle, strokeAttrs, type SeriesStyle } from './styles.ts';
import {
  BOTTOM_AXIS_SPACE,
  DEFAULT_WIDTH,
  axisBottom,
  axisLeft,
  bottom,
  leftAxisSpace,
  legend,
  right,
  spreadLabels,
  haloText,
  siteNumber,
  type Box,
  type Chart,
  type ChartSize,
  type LegendEntry,
} from './frame.ts';
import { infestationOf, optionInterval, sideOf, transectExtent, type Interval, type OptionPart, type SitePart } from './parts.ts';

export interface FrontChartInput {
  baseline: Pick<RunResult, 'series' | 'layout' | 'arrivals'>;
  options: OptionPart[];
  horizonYears: number;
  infestation?: Interval;
  /** Protected sites; the baseline's arrival list by default. */
  sites?: SitePart[];
}

interface Series {
  label: string;
  style: SeriesStyle;
  endLabel: string;
  times: number[];
  values: (number | null)[];
  /** Per point: only the thin non-breeding fringe is there (beyond a clearing the breeding front has not crossed). */
  fringe?: boolean[];
  /** Where the breeding front is held meanwhile: at the clearing (its far edge, where the fringe starts) [km]. */
  heldAtKm?: number;
}

/**
 * Points of an option's front that lie beyond its clearing while the breeding front has not crossed it (held,
 * or before the crossing year): what the detection level sees there is the thin fringe, not the pest arriving.
 */
export function fringeMask(o: OptionPart, times: number[], values: (number | null)[], side: 'right' | 'left'): boolean[] {
  const c = optionInterval(o);
  const held = o.pinned === true || o.verdict?.kind === 'holds' || o.verdict?.kind === 'marginal';
  const crossing = o.crossingYears ? o.crossingYears.option : undefined;
  if (!held && crossing === undefined) return times.map(() => false);
  return times.map((t, i) => {
    const v = values[i];
    if (v === null || !isNum(v)) return false;
    const beyond = side === 'right' ? v > c.toKm : v < c.fromKm;
    return beyond && (held || crossing === null || t < (crossing as number));
  });
}

/** Markers per line, spread along the time axis and offset per series so they do not sit on each other. */
const MARKERS_PER_LINE = 4;

export function frontPositionChart(input: FrontChartInput, size: ChartSize = {}): Chart {
  const width = size.width ?? DEFAULT_WIDTH;
  const plotHeight = size.plotHeight ?? 260;
  const series = frontSeries(input);
  const anyFringe = series.some((s) => s.fringe?.some(Boolean));

  const [x0, x1] = transectExtent(input.baseline.layout);
  const tMax = Math.max(input.horizonYears, ...series.flatMap((s) => s.times.filter(isNum)));
  const xScale = scaleLinear().domain([0, tMax]).nice(8);
  const yScale = scaleLinear().domain([x0, x1]);
  const endLabelW = Math.max(...series.map((s) => textWidth(s.endLabel, 10, true))) + 14;
  const legendEntries: LegendEntry[] = series.map((s) => ({ label: s.label, style: s.style }));
  legendEntries.push({ label: 'clearing of an option (letter at the right)', swatch: rect(0, 0, 24, 10, { fill: '#d0d0d0', stroke: '#777777', 'stroke-width': 0.6 }) });
  const sites = (input.sites ?? input.baseline.arrivals).map((s, i) => ({ ...s, i })).filter((s) => isNum(s.atKm) && s.atKm >= x0 && s.atKm <= x1);
  if (anyFringe) legendEntries.push({ label: 'faint: only a thin non-breeding fringe beyond a clearing that holds the breeding front (not an arrival)', swatch: line(0, 5, 24, 5, { stroke: '#777777', 'stroke-width': 1, 'stroke-opacity': 0.5, 'stroke-dasharray': '2 2' }) });
  if (sites.length) legendEntries.push({ label: 'protected site (name or number as in the tables)', swatch: line(0, 5, 24, 5, { stroke: '#555555', 'stroke-dasharray': '1.5 2.5', 'stroke-width': 1.2 }) });

  const box0: Box = { left: 0, top: 12, width: 0, height: plotHeight };
  const left = leftAxisSpace(yScale.range([bottom(box0), box0.top]));
  const box: Box = { left, top: 12, width: width - left - endLabelW, height: plotHeight };
  xScale.range([box.left, right(box)]);
  yScale.range([bottom(box), box.top]);
  const lg = legend(legendEntries, 8, bottom(box) + BOTTOM_AXIS_SPACE + 6, width - 16);
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + lg.height + 8;

  // Axes and grid first so bands, site lines and fronts are drawn over them.
  let body = axisBottom(xScale, box, { label: 'time since the current infestation (yr)', grid: true });
  body += axisLeft(yScale, box, { label: 'front position along the transect (km)', grid: true });
  body += clearingBands(input.options, box, yScale);
  body += siteLines(sites, box, yScale);
  const fronts = frontLines(series, xScale, yScale, tMax);
  body += fronts.svg;
  body += endLabels(fronts.ends, box);
  body += lg.svg;

  const title = 'Front position over time';
  const hint = 'A line that levels off at a shaded band is held by that clearing; later than the baseline means a delay, earlier a speed-up.';
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}

type Scale = ScaleLinear<number, number>;

/** The baseline's front on each side the options face (both when there are none), then each option's front. */
function frontSeries(input: FrontChartInput): Series[] {
  const infestation = infestationOf(input);
  const sides = new Set(input.options.map((o) => sideOf(o, infestation)));
  if (!sides.size) ['right', 'left'].forEach((s) => sides.add(s as 'right' | 'left'));
  const front = (s: Pick<RunResult, 'series'>['series'], side: 'right' | 'left') => (side === 'right' ? s.rightFrontKm : s.leftFrontKm);

  const series: Series[] = [];
  for (const side of ['right', 'left'] as const) {
    if (!sides.has(side)) continue;
    series.push({
      label: sides.size > 1 ? `baseline, no clearing (${side} front)` : 'baseline, no clearing',
      style: BASELINE_STYLE,
      endLabel: 'baseline',
      times: input.baseline.series.timesYears,
      values: front(input.baseline.series, side),
    });
  }
  input.options.forEach((o, k) => {
    const st = optionStyle(k);
    const side = sideOf(o, infestation);
    const values = front(o.run.series, side);
    series.push({
      label: `${o.name} (${Math.round(o.widthM)} m)`,
      style: st,
      endLabel: st.key,
      times: o.run.series.timesYears,
      values,
      fringe: fringeMask(o, o.run.series.timesYears, values, side),
      heldAtKm: side === 'right' ? optionInterval(o).toKm : optionInterval(o).fromKm,
    });
  });
  return series;
}

/** Clearings as horizontal bands (minimum 2 px so a narrow cut stays visible), with their letter. */
function clearingBands(options: OptionPart[], box: Box, yScale: Scale): string {
  let body = '';
  const bandLetters: { y: number; key: string }[] = [];
  options.forEach((o, k) => {
    const c = optionInterval(o);
    const ya = yScale(c.toKm);
    const yb = yScale(c.fromKm);
    const h = Math.max(2, yb - ya);
    const yc = (ya + yb) / 2;
    body += rect(box.left, yc - h / 2, box.width, h, { fill: '#d0d0d0', 'fill-opacity': 0.75, stroke: '#777777', 'stroke-width': 0.6 });
    bandLetters.push({ y: yc, key: optionStyle(k).key });
  });
  const bl = spreadLabels(bandLetters.map((b) => b.y), 11, box.top + 6, bottom(box) - 6);
  bandLetters.forEach((b, i) => (body += text(right(box) - 4, bl.at[i], b.key, { anchor: 'end', size: 9, bold: true, valign: 'middle', fill: '#444444' })));
  return body;
}

/**
 * Protected sites: dotted lines with their names at the left; when names would have to move away from their
 * lines (many sites close together), the site numbers of the transect strip and the tables are used instead.
 */
function siteLines(sites: (SitePart & { i: number })[], box: Box, yScale: Scale): string {
  let body = '';
  const siteYs = sites.map((s) => yScale(s.atKm));
  for (const y of siteYs) body += line(box.left, y, right(box), y, { stroke: '#555555', 'stroke-dasharray': '1.5 2.5', 'stroke-width': 1.1 });
  const named = spreadLabels(siteYs.map((y) => y - 6), 11, box.top + 6, bottom(box) - 4);
  const moved = Math.max(0, ...named.at.map((y, i) => Math.abs(y - (siteYs[i] - 6))));
  if (named.fits && moved <= 4) {
    sites.forEach((s, i) => (body += haloText(box.left + 4, named.at[i], fitText(s.name, box.width * 0.45, 9), 9)));
  } else {
    const numbered = spreadLabels(siteYs, 10, box.top + 5, bottom(box) - 5);
    sites.forEach((s, i) => (body += haloText(box.left + 4, numbered.at[i], siteNumber(s.i), 9)));
  }
  return body;
}

type LineEnd = { y: number; x: number; s: Series };

/** Lines: baseline first (underneath), options on top. Missing values (no front) leave gaps. */
function frontLines(series: Series[], xScale: Scale, yScale: Scale, tMax: number): { svg: string; ends: LineEnd[] } {
  let body = '';
  const ends: LineEnd[] = [];
  series.forEach((s, k) => {
    const fr = s.fringe ?? [];
    const raw: [number, number][] = s.times.map((t, i) => [t, s.values[i] ?? NaN]);
    // Where only the fringe is beyond the clearing, the breeding front is held at the clearing: the line in the
    // option's style stays at the clearing, and the fringe is drawn faint and thin beyond it.
    const pts: [number, number][] = raw.map((p, i) => (fr[i] && s.heldAtKm !== undefined ? [p[0], s.heldAtKm] : p));
    const path = d3line<[number, number]>()
      .defined((p) => isNum(p[0]) && isNum(p[1]))
      .x((p) => xScale(p[0]))
      .y((p) => yScale(p[1]))
      .digits(2)(pts);
    if (path) body += el('path', { d: path, ...strokeAttrs(s.style) });
    if (fr.some(Boolean)) {
      const faint = (i: number) => fr[i] || (i + 1 < fr.length && fr[i + 1]);
      const fpath = d3line<[number, number]>()
        .defined((p, i) => isNum(p[0]) && isNum(p[1]) && faint(i))
        .x((p) => xScale(p[0]))
        .y((p) => yScale(p[1]))
        .digits(2)(raw);
      if (fpath) body += el('path', { d: fpath, fill: 'none', stroke: s.style.stroke, 'stroke-width': 1, 'stroke-opacity': 0.5, 'stroke-dasharray': '2 2' });
    }
    const defined = pts.map((p, i) => (isNum(p[0]) && isNum(p[1]) ? i : -1)).filter((i) => i >= 0);
    if (!defined.length) return;
    if (s.style.marker) {
      for (let j = 0; j < MARKERS_PER_LINE; j++) {
        const target = tMax * (0.1 + (0.8 * j) / MARKERS_PER_LINE + 0.025 * (k % 8));
        const i = defined.reduce((best, i2) => (Math.abs(pts[i2][0] - target) < Math.abs(pts[best][0] - target) ? i2 : best), defined[0]);
        body += marker(s.style, xScale(pts[i][0]), yScale(pts[i][1]));
      }
    }
    const last = defined[defined.length - 1];
    ends.push({ x: xScale(pts[last][0]), y: yScale(pts[last][1]), s });
  });
  return { svg: body, ends };
}

/** Each line's key at the right of the plot, spread apart, with a leader line when moved off its end. */
function endLabels(ends: LineEnd[], box: Box): string {
  let body = '';
  const el2 = spreadLabels(ends.map((e) => e.y), 11, box.top, bottom(box));
  ends.forEach((e, i) => {
    const lx = right(box) + 6;
    const ly = el2.at[i];
    if (Math.abs(ly - e.y) > 1 || e.x < right(box) - 1) body += line(e.x, e.y, lx - 2, ly, { stroke: '#999999', 'stroke-width': 0.6 });
    body += text(lx, ly, e.s.endLabel, { size: 10, bold: true, valign: 'middle', fill: e.s.style.stroke });
  });
  return body;
}
