/**
 * Survey records against the fitted fronts: each record at (year, km) — found (filled), not found (open),
 * set aside as a possible human-carried introduction (a cross) — with the model's front at the best fit, the
 * fronts at both ends of the movement rate's 90 % range, and the straight front line read from the farthest
 * detections. Records beyond the fitted fronts with "found" marks, or "not found" marks deep behind them,
 * show where the fit explains the records poorly.
 */
import { scaleLinear } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import { symbolCircle, symbolCross } from 'd3-shape';
import type { CalibrationResult } from '../../analysis/calibration/fit.ts';
import { el, isNum, svgRoot } from './svg.ts';
import { marker, siteStyle, strokeAttrs, type SeriesStyle } from './styles.ts';
import { BOTTOM_AXIS_SPACE, DEFAULT_WIDTH, axisBottom, axisLeft, bottom, leftAxisSpace, legend, padExtent, right, type Box, type Chart, type ChartSize, type LegendEntry } from './frame.ts';

/** The parts of a fit the chart reads. */
export type SurveyFitChartInput = Pick<CalibrationResult, 'diagnostics' | 'flagged' | 'model' | 'front'>;

const FOUND: SeriesStyle = { key: '', stroke: '#000000', dash: '', width: 1, marker: { type: symbolCircle, rotate: 0 }, fill: '#000000' };
const NOT_FOUND: SeriesStyle = { key: '', stroke: '#777777', dash: '', width: 1, marker: { type: symbolCircle, rotate: 0 }, fill: '#ffffff' };
const FLAGGED: SeriesStyle = { key: '', stroke: '#b2182b', dash: '', width: 1, marker: { type: symbolCross, rotate: 45 }, fill: '#b2182b' };
const BEST: SeriesStyle = { ...siteStyle(0), marker: null, width: 2.2 };
const RANGE: SeriesStyle = { ...siteStyle(1), marker: null, width: 1.2 };
const LINE: SeriesStyle = { ...siteStyle(3), dash: '1.5 3', marker: null, width: 1.4 };

/** The chart, or null when the fit has no records on a transect. */
export function surveyFitChart(fit: SurveyFitChartInput, size: ChartSize = {}): Chart | null {
  const recs = fit.diagnostics.residuals;
  if (!recs.length) return null;
  const width = size.width ?? DEFAULT_WIDTH;
  const plotHeight = size.plotHeight ?? 240;
  const years = [...recs.map((r) => r.year), ...fit.flagged.map((f) => f.year)];
  const kms = [...recs.map((r) => r.atKm), ...fit.flagged.map((f) => f.atKm), ...fit.model.fronts.flatMap((f) => [f.bestKm, f.lowKm, f.highKm]).filter(isNum)];
  const xScale = scaleLinear().domain(padExtent(Math.min(...years) - 0.5, Math.max(...years) + 0.5, 0)).nice();
  const yScale = scaleLinear().domain(padExtent(Math.min(...kms), Math.max(...kms), 0.04)).nice();
  const left = leftAxisSpace(yScale);
  const box: Box = { left, top: 12, width: width - left - 16, height: plotHeight };
  xScale.range([box.left, right(box)]);
  yScale.range([bottom(box), box.top]);

  let body = axisBottom(xScale, box, { label: 'survey year', grid: true, format: (v) => (Number.isInteger(v) ? String(v) : '') });
  body += axisLeft(yScale, box, { label: 'position along the transect (km)', grid: true });
  // Records: small horizontal jitter-free marks; found drawn last so they sit on top.
  for (const r of recs.filter((r) => !r.detected)) body += marker(NOT_FOUND, xScale(r.year), yScale(r.atKm), 14);
  for (const r of recs.filter((r) => r.detected)) body += marker(FOUND, xScale(r.year), yScale(r.atKm), 18);
  for (const f of fit.flagged) body += marker(FLAGGED, xScale(f.year), yScale(f.atKm), 60);
  const path = (pts: [number, number | null][], style: SeriesStyle) => {
    const d = d3line<[number, number | null]>()
      .defined((p) => isNum(p[1]))
      .x((p) => xScale(p[0]))
      .y((p) => yScale(p[1] as number))
      .digits(2)(pts);
    return d ? el('path', { d, ...strokeAttrs(style) }) : '';
  };
  body += path(fit.model.fronts.map((f) => [f.year, f.lowKm]), RANGE);
  body += path(fit.model.fronts.map((f) => [f.year, f.highKm]), RANGE);
  body += path(fit.model.fronts.map((f) => [f.year, f.bestKm]), BEST);
  const fl = fit.front;
  if (isNum(fl.kmPerYear) && isNum(fl.interceptKm)) {
    const ends = [xScale.domain()[0], xScale.domain()[1]];
    const at = (y: number) => fl.edgeKm + fl.direction * ((fl.interceptKm as number) + (fl.kmPerYear as number) * (y - fl.referenceYear));
    body += path(ends.map((y) => [y, at(y)]), LINE);
  }
  const entries: LegendEntry[] = [
    { label: 'pest found', swatch: marker(FOUND, 12, 5, 18) },
    { label: 'looked, not found', swatch: marker(NOT_FOUND, 12, 5, 14) },
    ...(fit.flagged.length ? [{ label: 'possible human-carried introduction (left out)', swatch: marker(FLAGGED, 12, 5, 50) }] : []),
    { label: 'model front, best fit', style: BEST },
    { label: 'model fronts at the ends of the 90 % range', style: RANGE },
    { label: 'straight line through the farthest finds', style: LINE },
  ];
  const lg = legend(entries, 8, bottom(box) + BOTTOM_AXIS_SPACE + 6, width - 16);
  body += lg.svg;
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + lg.height + 8;
  const title = 'Survey records and the fitted fronts';
  const hint = 'Filled dots are finds; the fitted front should run along the farthest finds of each year. Crosses are finds too far ahead to be natural spread.';
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}
