/**
 * Host remaining along the transect at the end of the run, for the baseline and each option, against the
 * stocking at the start. The gap between the "at start" line and a run's line is the host killed; a drop to
 * zero inside a shaded band is the clearing itself (trees removed, not killed).
 */
import { scaleLinear } from 'd3-scale';
import { line as d3line } from 'd3-shape';
import type { RunResult } from '../../analysis/result.ts';
import { fixed } from '../format.ts';
import { el, isNum, rect, svgRoot, text } from './svg.ts';
import { BASELINE_STYLE, marker, optionStyle, strokeAttrs, type SeriesStyle } from './styles.ts';
import {
  BOTTOM_AXIS_SPACE,
  DEFAULT_WIDTH,
  axisBottom,
  axisLeft,
  bottom,
  emptyPanel,
  leftAxisSpace,
  legend,
  right,
  spreadLabels,
  type Box,
  type Chart,
  type ChartSize,
  type LegendEntry,
} from './frame.ts';
import { optionInterval, transectExtent, type OptionPart } from './parts.ts';

export interface HostChartInput {
  baseline: Pick<RunResult, 'profiles' | 'layout'>;
  options: OptionPart[];
}

/** The dotted grey reference: host present at the start of the baseline. */
const START_STYLE: SeriesStyle = { key: '', stroke: '#9a9a9a', dash: '2 2', width: 1.4, marker: null };

export function hostProfileChart(input: HostChartInput, size: ChartSize = {}): Chart {
  const width = size.width ?? DEFAULT_WIDTH;
  const plotHeight = size.plotHeight ?? 200;
  const base = input.baseline.profiles;
  const first = base.snapshots[0];
  const lastOf = (p: RunResult['profiles']) => p.snapshots[p.snapshots.length - 1];
  const endYears = lastOf(base)?.timeYears;
  const series: { label: string; style: SeriesStyle; xs: number[]; host: number[] }[] = [];
  if (first) series.push({ label: 'host at the start (no clearing)', style: START_STYLE, xs: base.xKm, host: first.host });
  const bl = lastOf(base);
  if (bl) series.push({ label: `baseline at year ${fixed(bl.timeYears, 0)}`, style: BASELINE_STYLE, xs: base.xKm, host: bl.host });
  input.options.forEach((o, k) => {
    const l = lastOf(o.run.profiles);
    if (l) series.push({ label: `${o.name} (${Math.round(o.widthM)} m)`, style: optionStyle(k), xs: o.run.profiles.xKm, host: l.host });
  });

  const [x0, x1] = transectExtent(input.baseline.layout);
  const xs = scaleLinear().domain([x0, x1]);
  const ys = scaleLinear().domain([0, 1]);
  const left = leftAxisSpace(ys);
  const box: Box = { left, top: 12, width: width - left - 16, height: plotHeight };
  xs.range([box.left, right(box)]);
  ys.range([bottom(box), box.top]);
  const entries: LegendEntry[] = series.map((s) => ({ label: s.label, style: s.style }));
  if (input.options.length) entries.push({ label: 'clearing of an option (letter at the top)', swatch: rect(0, 0, 24, 10, { fill: '#d0d0d0', stroke: '#777777', 'stroke-width': 0.6 }) });
  const lg = legend(entries, 8, bottom(box) + BOTTOM_AXIS_SPACE + 6, width - 16);
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + lg.height + 8;

  let body = axisBottom(xs, box, { label: 'position along the transect (km)', grid: true });
  body += axisLeft(ys, box, { label: 'host stocking remaining (0–1)', grid: true, format: (v) => fixed(v, 1) });
  const letters: { x: number; key: string }[] = [];
  input.options.forEach((o, k) => {
    const c = optionInterval(o);
    const xa = xs(c.fromKm);
    const w = Math.max(2, xs(c.toKm) - xa);
    body += rect(xa + (xs(c.toKm) - xa) / 2 - w / 2, box.top, w, box.height, { fill: '#d0d0d0', 'fill-opacity': 0.75, stroke: '#777777', 'stroke-width': 0.6 });
    letters.push({ x: (xa + xs(c.toKm)) / 2, key: optionStyle(k).key });
  });
  if (!series.length) body += emptyPanel(box, 'no host profiles in this result');
  series.forEach((s, k) => {
    const pts: [number, number][] = s.xs.map((x, i) => [x, s.host[i] as number]);
    const ok = (p: [number, number]) => isNum(p[0]) && isNum(p[1]);
    const d = d3line<[number, number]>().defined(ok).x((p) => xs(p[0])).y((p) => ys(Math.max(0, Math.min(1, p[1])))).digits(2)(pts);
    if (d) body += el('path', { d, ...strokeAttrs(s.style) });
    if (s.style.marker) {
      const good = pts.filter(ok);
      for (let j = 0; j < 4 && good.length; j++) {
        const p = good[Math.min(good.length - 1, Math.floor(good.length * (0.08 + 0.22 * j + 0.02 * (k % 8))))];
        body += marker(s.style, xs(p[0]), ys(Math.max(0, Math.min(1, p[1]))));
      }
    }
  });
  const la = spreadLabels(letters.map((l) => l.x), 9, box.left + 4, right(box) - 4);
  letters.forEach((l, i) => (body += text(la.at[i], box.top - 2, l.key, { anchor: 'middle', size: 9, bold: true, fill: '#444444' })));
  body += lg.svg;
  const title = `Host remaining${isNum(endYears) ? ` after ${fixed(endYears, 0)} years` : ''}`;
  const hint = 'The gap below the grey "at start" line is host killed by the pest; zero inside a shaded band is the clearing itself.';
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}
