/**
 * Every chart a result document supports, in reading order, with a stable id per chart: the list the web
 * results page and the briefing both show. Charts whose data is missing (no options, no width–delay rows
 * yet, no mosaics) are left out rather than drawn empty.
 */
import type { ResultDocument } from '../../analysis/result.ts';
import type { Chart, ChartSize } from './frame.ts';
import { frontPositionChart } from './front-position.ts';
import { hostProfileChart } from './host-profile.ts';
import { spaceTimeChart } from './space-time.ts';
import { widthDelayChart } from './width-delay.ts';
import { dispersionCurveChart, mosaicSpeedChart } from './mosaic.ts';
import { transectStrip } from './transect.ts';
import { optionKey } from './styles.ts';

export type ChartGroup = 'transect' | 'fronts' | 'width-delay' | 'host' | 'space-time' | 'mosaic' | 'uncertainty';

export interface ResultChart {
  /** Stable id, e.g. "front-position", "width-delay-B", "space-time-baseline" (usable as an HTML id). */
  id: string;
  group: ChartGroup;
  chart: Chart;
}

export function chartsForResult(doc: ResultDocument, size: ChartSize = {}): ResultChart[] {
  const out: ResultChart[] = [];
  const sites = doc.baseline.arrivals;
  out.push({ id: 'transect', group: 'transect', chart: transectStrip(doc, size) });
  out.push({ id: 'front-position', group: 'fronts', chart: frontPositionChart(doc, size) });
  doc.options.forEach((o, k) => {
    const c = widthDelayChart(o, { ...size, key: optionKey(k), siteNames: sites.map((s) => s.name) });
    if (c) out.push({ id: `width-delay-${optionKey(k)}`, group: 'width-delay', chart: c });
  });
  out.push({ id: 'host-profile', group: 'host', chart: hostProfileChart(doc, size) });
  out.push({ id: 'space-time-baseline', group: 'space-time', chart: spaceTimeChart(doc.baseline, { ...size, detectionLevel: doc.detectionLevel, runLabel: 'baseline (no clearing)', sites }) });
  doc.options.forEach((o, k) => {
    const key = optionKey(k);
    out.push({
      id: `space-time-${key}`,
      group: 'space-time',
      chart: spaceTimeChart(o.run, { ...size, detectionLevel: doc.detectionLevel, runLabel: `${key}: ${o.name}`, clearing: { fromKm: o.fromKm, widthM: o.widthM, key }, sites }),
    });
  });
  const ms = mosaicSpeedChart(doc.mosaics, size);
  if (ms) out.push({ id: 'mosaic-speed', group: 'mosaic', chart: ms });
  (doc.mosaics ?? []).forEach((m, i) => {
    const c = dispersionCurveChart(m, size);
    if (c) out.push({ id: `dispersion-${i + 1}`, group: 'mosaic', chart: c });
  });
  return out;
}
