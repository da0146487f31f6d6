/**
 * Chart slots of the result pages. The charts themselves (inline SVG with axes, units and a reading hint,
 * the same SVG the PDF briefing embeds) come from the shared chart module in server/report/charts/; this
 * file only picks them and wraps them for the `chart` partial. A chart that cannot be drawn for a stored
 * document (e.g. one written by an older version) leaves a plain note in its slot instead of failing the page.
 */
import type { ResultDocument } from '../../analysis/result.ts';
import { chartsForResult, frontPositionChart, type Chart, type ChartGroup } from '../../report/charts/index.ts';

export interface ChartSlot {
  /** Stable id (also used as the figure's data-chart attribute). */
  key: string;
  title: string;
  hint: string;
  /** Inline SVG markup from the chart module; null when the chart is not available. */
  svg: string | null;
  note: string;
  /**
   * Narrowest width [px] at which the chart's smallest text is still `MIN_TEXT_PX` on screen; below it (a
   * phone) the chart keeps this width and scrolls sideways inside its own box, never widening the page.
   */
  minWidthPx: number;
}

/** Smallest chart text on screen [px] (WCAG-style legibility at 100 % zoom; this tool's choice, no source). */
export const MIN_TEXT_PX = 12;

/** The width [px] at which the smallest font-size in `svg` (in viewBox units) renders as `MIN_TEXT_PX`. */
export function chartMinWidthPx(svg: string): number {
  const vb = /viewBox="[\d.\-]+ [\d.\-]+ ([\d.]+) [\d.]+"/.exec(svg);
  const sizes = [...svg.matchAll(/font-size="([\d.]+)"/g)].map((m) => Number(m[1])).filter((x) => x > 0);
  if (!vb || !sizes.length) return 0;
  return Math.ceil((Number(vb[1]) * MIN_TEXT_PX) / Math.min(...sizes));
}

const NOT_AVAILABLE = 'Chart not available for this result; the numbers are in the tables and in the downloads.';

const slot = (key: string, chart: Chart): ChartSlot => ({ key, title: chart.title, hint: chart.hint, svg: chart.svg, note: '', minWidthPx: chartMinWidthPx(chart.svg) });
const missing = (key: string, title: string): ChartSlot => ({ key, title, hint: '', svg: null, note: NOT_AVAILABLE, minWidthPx: 0 });

export type ChartGroups = Record<ChartGroup, ChartSlot[]>;

/** Every chart the result supports, by group (transect, fronts, width–delay, host, space–time, mosaic, uncertainty). */
export function resultCharts(doc: ResultDocument): ChartGroups {
  const groups: ChartGroups = { transect: [], fronts: [], 'width-delay': [], host: [], 'space-time': [], mosaic: [], uncertainty: [] };
  try {
    for (const c of chartsForResult(doc)) groups[c.group].push(slot(c.id, c.chart));
  } catch {
    groups.fronts.push(missing('front-position', 'Front position over time'));
  }
  return groups;
}

/** The one chart of the compare page: front position over time, baseline and every option. */
export function compareChart(doc: ResultDocument): ChartSlot {
  try {
    return slot('front-position', frontPositionChart(doc));
  } catch {
    return missing('front-position', 'Front position over time');
  }
}
