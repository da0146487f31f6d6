/**
 * Periodic thinning patterns (mosaics): the spread speed each pattern allows compared with intact forest,
 * and the dispersion curve behind the exact speed (c* = min λ(s)/s, the slope of the tangent from the origin).
 */
import { scaleLinear } from 'd3-scale';
import { line as d3line, symbolCircle, symbolSquare, symbolTimes } from 'd3-shape';
import type { MosaicResult } from '../../analysis/result.ts';
import { num, speed } from '../format.ts';
import { el, isNum, line, svgRoot, text } from './svg.ts';
import { fitText, textWidth } from './text-metrics.ts';
import { marker, siteStyle, strokeAttrs, type SeriesStyle } from './styles.ts';
import { BOTTOM_AXIS_SPACE, DEFAULT_WIDTH, axisBottom, axisLeft, bottom, leftAxisSpace, legend, padExtent, right, type Box, type Chart, type ChartSize, type LegendEntry } from './frame.ts';

const EXACT: SeriesStyle = { key: '', stroke: '#000000', dash: '', width: 1, marker: { type: symbolCircle, rotate: 0 }, fill: '#000000' };
const HOMOG: SeriesStyle = { key: '', stroke: '#555555', dash: '', width: 1, marker: { type: symbolSquare, rotate: 0 } };
/** Drawn as a thin ×, on top of the others, so it never hides the exact value. */
const MEASURED: SeriesStyle = { key: '', stroke: '#000000', dash: '', width: 1, marker: { type: symbolTimes, rotate: 0 }, fill: 'none' };
const ROW = 22;

/** Speeds per pattern as a dot chart, with intact forest as the reference line; null without mosaics. */
export function mosaicSpeedChart(mosaics: MosaicResult[] | undefined, size: ChartSize = {}): Chart | null {
  if (!mosaics?.length) return null;
  const width = size.width ?? DEFAULT_WIDTH;
  const labels = mosaics.map((m) => `${m.name} (${num(m.forestM)} m forest / ${num(m.gapM)} m gap)`);
  const labelW = Math.min(width * 0.42, Math.max(...labels.map((l) => textWidth(l, 9))) + 8);
  const values = mosaics.flatMap((m) => [m.exactKmPerYear, m.homogenisedKmPerYear, m.measuredKmPerYear, m.intactKmPerYear]).filter(isNum);
  const xScale = scaleLinear().domain([0, Math.max(0.1, ...values) * 1.08]).nice(6);
  const box: Box = { left: labelW + 10, top: 10, width: width - labelW - 26, height: mosaics.length * ROW + 8 };
  xScale.range([box.left, right(box)]);
  const entries: LegendEntry[] = [
    { label: 'exact (dispersion relation)', style: { ...EXACT, width: 0 } },
    { label: 'homogenised estimate', style: { ...HOMOG, width: 0 } },
    { label: 'measured in a simulation', style: { ...MEASURED, width: 0 } },
    { label: 'intact host forest', swatch: line(12, 0, 12, 10, { stroke: '#000000', 'stroke-dasharray': '4 2', 'stroke-width': 1.3 }) },
  ];
  const lg = legend(entries, 8, bottom(box) + BOTTOM_AXIS_SPACE + 6, width - 16);
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + lg.height + 8;
  let body = axisBottom(xScale, box, { label: 'spread speed (km/yr)', grid: true });
  body += line(box.left, box.top, box.left, bottom(box), { stroke: '#333333' });
  const intact = mosaics.map((m) => m.intactKmPerYear).find(isNum);
  if (isNum(intact)) body += line(xScale(intact), box.top, xScale(intact), bottom(box), { stroke: '#000000', 'stroke-dasharray': '4 2', 'stroke-width': 1.3 });
  mosaics.forEach((m, k) => {
    const y = box.top + 4 + k * ROW + ROW / 2;
    body += text(box.left - 6, y, fitText(labels[k], labelW, 9), { anchor: 'end', size: 9, valign: 'middle' });
    body += line(box.left, y, right(box), y, { stroke: '#eeeeee' });
    if (!m.persists) {
      body += text(box.left + 6, y, 'pest does not persist in this pattern (stops)', { size: 9, valign: 'middle', italic: true });
      return;
    }
    if (isNum(m.homogenisedKmPerYear)) body += marker(HOMOG, xScale(m.homogenisedKmPerYear), y, 40);
    if (isNum(m.exactKmPerYear)) body += marker(EXACT, xScale(m.exactKmPerYear), y, 36);
    if (isNum(m.measuredKmPerYear)) body += marker(MEASURED, xScale(m.measuredKmPerYear), y, 90);
  });
  body += lg.svg;
  const title = 'Spread speed in thinning patterns';
  const hint = 'Dots left of the dashed line slow the pest; right of it the pattern speeds it up; "does not persist" means it stops.';
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}

/** λ(s) with the tangent from the origin whose slope is the exact speed; null without a curve. */
export function dispersionCurveChart(m: MosaicResult, size: ChartSize = {}): Chart | null {
  const pts = m.curve.s.map((s, i) => [s, m.curve.lambda[i]] as [number, number]).filter((p) => isNum(p[0]) && isNum(p[1]) && p[0] > 0);
  if (pts.length < 2) return null;
  const width = size.width ?? DEFAULT_WIDTH;
  const plotHeight = size.plotHeight ?? 200;
  const xScale = scaleLinear().domain([0, Math.max(...pts.map((p) => p[0]))]).nice(6);
  const yScale = scaleLinear().domain(padExtent(Math.min(0, ...pts.map((p) => p[1])), Math.max(...pts.map((p) => p[1])), 0.05));
  const left = leftAxisSpace(yScale);
  const box: Box = { left, top: 12, width: width - left - 16, height: plotHeight };
  xScale.range([box.left, right(box)]);
  yScale.range([bottom(box), box.top]);
  const curveStyle: SeriesStyle = { ...siteStyle(0), marker: null };
  const entries: LegendEntry[] = [{ label: 'growth rate of a front decaying at rate s, λ(s)', style: curveStyle }];
  const c = m.exactKmPerYear;
  if (isNum(c)) entries.push({ label: `tangent from the origin: slope = exact speed ${speed(c)}`, swatch: line(0, 5, 24, 5, { stroke: '#000000', 'stroke-dasharray': '5 3', 'stroke-width': 1.3 }) });
  const lg = legend(entries, 8, bottom(box) + BOTTOM_AXIS_SPACE + 6, width - 16);
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + lg.height + 8;
  let body = axisBottom(xScale, box, { label: 'decay rate of the front s (1/km)', grid: true });
  body += axisLeft(yScale, box, { label: 'λ(s) (1/yr)', grid: true });
  const d = d3line<[number, number]>().x((p) => xScale(p[0])).y((p) => yScale(p[1])).digits(2)(pts);
  if (d) body += el('path', { d, ...strokeAttrs(curveStyle) });
  if (isNum(c)) {
    const top = yScale.domain()[1];
    const sEnd = Math.min(xScale.domain()[1], c > 0 ? top / c : xScale.domain()[1]);
    body += line(xScale(0), yScale(0), xScale(sEnd), yScale(c * sEnd), { stroke: '#000000', 'stroke-dasharray': '5 3', 'stroke-width': 1.3 });
    // Tangency point: where λ(s)/s is smallest.
    const best = pts.reduce((a, b) => (b[1] / b[0] < a[1] / a[0] ? b : a));
    body += marker(EXACT, xScale(best[0]), yScale(best[1]), 40);
  }
  if (isNum(m.lambda0)) body += line(box.left, yScale(0), right(box), yScale(0), { stroke: '#777777', 'stroke-width': 0.8 });
  body += lg.svg;
  const title = `Dispersion curve — ${m.name}`;
  const hint = isNum(c)
    ? 'The dashed line from the origin just touching the curve has the pattern’s spread speed as its slope.'
    : 'The curve starts below zero: the pest cannot persist in this pattern, so there is no spread speed.';
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}
