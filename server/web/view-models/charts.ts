/**
 * Chart slots of the result pages. The charts themselves (inline SVG with axes, units and a reading
 * hint, shared with the PDF briefing) come from the shared chart module in server/report/charts/;
 * until a chart is available there, its slot says so plainly instead of drawing anything.
 */
import type { MosaicResult, OptionResult, ResultDocument, RunResult } from '../../analysis/result.ts';

export interface ChartSlot {
  key: string;
  title: string;
  hint: string;
  /** Inline SVG markup from the chart module; null when the chart is not available. */
  svg: string | null;
  note: string;
}

const NOT_AVAILABLE = 'Chart not available in this version; the numbers are in the tables and in the downloads.';

function slot(key: string, title: string): ChartSlot {
  return { key, title, hint: '', svg: null, note: NOT_AVAILABLE };
}

/** Front position against time: the baseline and the chosen options in one chart. */
export function frontChart(_doc: ResultDocument, _options: OptionResult[]): ChartSlot {
  return slot('front', 'Front position over time');
}

/** Space–time density map of one run. */
export function spaceTimeChart(_run: RunResult, label: string): ChartSlot {
  return slot('space-time', `Density over space and time — ${label}`);
}

/** Host remaining along the transect at the end of a run. */
export function hostChart(_run: RunResult, label: string): ChartSlot {
  return slot('host', `Host remaining along the transect — ${label}`);
}

/** Delay (or pinning) against clearing width for one option. */
export function widthDelayChart(_doc: ResultDocument, option: OptionResult): ChartSlot {
  return slot('width-delay', `Delay against clearing width — ${option.name}`);
}

/** Spread speed in periodic forest/gap patterns. */
export function mosaicChart(_doc: ResultDocument, _mosaics: MosaicResult[]): ChartSlot {
  return slot('mosaic', 'Spread speed in strip patterns');
}

/** The transect with a layout's habitats and clearing. */
export function stripChart(_run: RunResult, label: string): ChartSlot {
  return slot('strip', `Transect — ${label}`);
}
