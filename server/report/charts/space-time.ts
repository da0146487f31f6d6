/**
 * Space–time density map of one run: position along the transect across, time upwards, density in a few
 * log-spaced classes. The colour ramp gets darker with density (sequential, single direction in lightness),
 * so the classes read the same in greyscale; below the detection level stays white.
 */
import { scaleLinear } from 'd3-scale';
import { interpolateYlOrBr } from 'd3-scale-chromatic';
import type { RunResult } from '../../analysis/result.ts';
import { num } from '../format.ts';
import { isNum, line, rect, svgRoot, text } from './svg.ts';

/** Vertical overlap of neighbouring map rows [SVG units]. */
const ROW_OVERLAP = 0.4;
import { fitText } from './text-metrics.ts';
import { BOTTOM_AXIS_SPACE, DEFAULT_WIDTH, LABEL_SIZE, axisBottom, axisLeft, bottom, emptyPanel, haloText, leftAxisSpace, right, siteNumber, type Box, type Chart, type ChartSize } from './frame.ts';
import { optionInterval, transectExtent, type SitePart } from './parts.ts';

export interface SpaceTimeOptions extends ChartSize {
  /** Density that counts as present [share of capacity]; the lowest class starts here. */
  detectionLevel: number;
  /** Which run this is, for the title (e.g. "baseline" or "A: Wide cut"). */
  runLabel?: string;
  /** The option's clearing, drawn as two dashed edges. */
  clearing?: { fromKm: number; widthM: number; key?: string };
  sites?: SitePart[];
}

/** Number of density classes from the detection level to the largest density. */
export const DENSITY_CLASSES = 6;

/** Class boundaries: log-spaced from the detection level to max(1, largest density) [share of capacity]. */
export function densityClasses(detectionLevel: number, maxDensity: number, n = DENSITY_CLASSES): number[] {
  const lo = Math.max(detectionLevel, 1e-12);
  const hi = Math.max(1, maxDensity, lo * 10);
  return Array.from({ length: n + 1 }, (_, k) => lo * Math.pow(hi / lo, k / n));
}

/** Cell edges from cell centres: midpoints, with the ends extended by half a spacing. */
export function edgesFromCentres(c: number[]): number[] {
  if (c.length === 1) return [c[0] - 0.5, c[0] + 0.5];
  const e = [c[0] - (c[1] - c[0]) / 2];
  for (let i = 0; i + 1 < c.length; i++) e.push((c[i] + c[i + 1]) / 2);
  e.push(c[c.length - 1] + (c[c.length - 1] - c[c.length - 2]) / 2);
  return e;
}

function classOf(v: number, bounds: number[]): number {
  if (!isNum(v) || v < bounds[0]) return -1;
  for (let k = bounds.length - 2; k >= 0; k--) if (v >= bounds[k]) return k;
  return -1;
}

export function spaceTimeChart(run: Pick<RunResult, 'spaceTime'> & Partial<Pick<RunResult, 'layout'>>, o: SpaceTimeOptions): Chart {
  const width = o.width ?? DEFAULT_WIDTH;
  const plotHeight = o.plotHeight ?? 200;
  const { xKm, timesYears, density } = run.spaceTime;
  const title = `Where and when the pest is present${o.runLabel ? ` — ${o.runLabel}` : ''}`;
  const siteKey = (o.sites ?? []).map((site, i) => `${siteNumber(i)} ${site.name}`).join(' · ');
  const hint = 'Darker = denser; white = below the detection level. A colour edge that turns vertical has stopped moving.';
  const ok = xKm.length > 0 && timesYears.length > 0 && xKm.every(isNum) && timesYears.every(isNum);
  // The transect's extent when the layout is known (cell centres stop half a cell short of the ends).
  const xs = scaleLinear().domain(run.layout?.length ? transectExtent(run.layout) : ok ? [Math.min(...xKm), Math.max(...xKm)] : [0, 1]);
  const ts = scaleLinear().domain(ok ? [0, Math.max(...timesYears)] : [0, 1]);
  const left = leftAxisSpace(ts);
  const legendW = 92;
  const box: Box = { left, top: 10, width: width - left - legendW - 10, height: plotHeight };
  xs.range([box.left, right(box)]);
  ts.range([bottom(box), box.top]);
  // A key line under the axis names every line drawn over the map: the clearing's edges and each site by its number.
  const keyText = [o.clearing ? 'dashed: edges of the clearing' : '', siteKey ? `dotted: protected sites — ${siteKey}` : ''].filter(Boolean).join('; ');
  const height = bottom(box) + BOTTOM_AXIS_SPACE + 6 + (keyText ? 16 : 0);
  let body = '';
  let maxD = 0;
  for (const row of density) for (const v of row) if (isNum(v) && v > maxD) maxD = v;
  const bounds = densityClasses(o.detectionLevel, maxD);
  const colour = (k: number) => interpolateYlOrBr(0.15 + (0.85 * (k + 1)) / DENSITY_CLASSES);
  if (!ok || !density.length) {
    body += emptyPanel(box, 'no space–time record in this result');
  } else {
    const xe = edgesFromCentres(xKm).map((x) => Math.min(right(box), Math.max(box.left, xs(x))));
    const te = edgesFromCentres(timesYears).map((t) => Math.min(bottom(box), Math.max(box.top, ts(t))));
    // One rectangle per run of equal class along each row keeps the SVG small (a few hundred elements, not 18 000).
    for (let r = 0; r < timesYears.length; r++) {
      const row = density[r] ?? [];
      const y0 = te[r + 1];
      const y1 = te[r];
      let c = 0;
      while (c < xKm.length) {
        const k = classOf(row[c] as number, bounds);
        let c2 = c + 1;
        while (c2 < xKm.length && classOf(row[c2] as number, bounds) === k) c2++;
        // Rows overlap by a fraction of a unit so that anti-aliasing leaves no pale seams between them.
        if (k >= 0) body += rect(xe[c], y0 - ROW_OVERLAP, xe[c2] - xe[c], y1 - y0 + 2 * ROW_OVERLAP, { fill: colour(k), stroke: colour(k), 'stroke-width': 0.3, 'shape-rendering': 'crispEdges' });
        c = c2;
      }
    }
  }
  body += rect(box.left, box.top, box.width, box.height, { fill: 'none', stroke: '#333333', 'stroke-width': 0.8 });
  if (o.clearing) {
    const c = optionInterval(o.clearing);
    for (const x of [c.fromKm, c.toKm]) {
      const px = xs(x);
      if (px >= box.left && px <= right(box)) body += line(px, box.top, px, bottom(box), { stroke: '#000000', 'stroke-dasharray': '5 3', 'stroke-width': 1.1 });
    }
    const label = `clearing${o.clearing.key ? ` ${o.clearing.key}` : ''}`;
    const px = xs(c.toKm);
    if (px >= box.left && px <= right(box)) body += text(Math.min(px + 3, right(box) - 2), box.top + 3, label, { size: 9, valign: 'top', anchor: px + 60 > right(box) ? 'end' : 'start' });
  }
  (o.sites ?? []).forEach((s, i) => {
    const px = xs(s.atKm);
    if (!(px >= box.left && px <= right(box))) return;
    body += line(px, bottom(box) - 6, px, bottom(box), { stroke: '#000000', 'stroke-width': 1.2 });
    body += line(px, box.top, px, bottom(box) - 6, { stroke: '#555555', 'stroke-dasharray': '1.5 2.5', 'stroke-width': 0.9 });
    // Every line named: the site number of the tables (names in the hint) near the bottom of the line.
    body += haloText(Math.min(px + 3, right(box) - 10), bottom(box) - 14, siteNumber(i), 10, '#000000');
  });
  body += axisBottom(xs, box, { label: 'position along the transect (km)' });
  if (keyText) body += text(box.left, bottom(box) + BOTTOM_AXIS_SPACE + 8, fitText(keyText, width - box.left - 8, 10), { size: 10, valign: 'top' });
  body += axisLeft(ts, box, { label: 'time (yr)' });
  // Class legend at the right: one swatch per density class with its lower bound.
  const lx = right(box) + 12;
  body += text(lx, box.top, 'density', { size: 9, valign: 'top' });
  body += text(lx, box.top + 11, '(share of', { size: 9, valign: 'top' });
  body += text(lx, box.top + 22, 'capacity)', { size: 9, valign: 'top' });
  const rowH = Math.min(18, (box.height - 40) / DENSITY_CLASSES);
  for (let k = DENSITY_CLASSES - 1; k >= 0; k--) {
    const y = box.top + 38 + (DENSITY_CLASSES - 1 - k) * rowH;
    body += rect(lx, y, 14, rowH - 2, { fill: colour(k), stroke: '#666666', 'stroke-width': 0.5 });
    body += text(lx + 18, y + (rowH - 2) / 2, fitText(`≥ ${num(bounds[k], 2)}`, legendW - 20, LABEL_SIZE - 2), { size: LABEL_SIZE - 2, valign: 'middle' });
  }
  return { svg: svgRoot(width, height, title, hint, body), title, hint, width, height };
}
