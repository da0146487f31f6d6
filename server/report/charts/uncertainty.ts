/**
 * Extension point for charts of the uncertainty and sensitivity analysis (issue 6): the briefing and the web
 * pages call `uncertaintyCharts(doc)` and show whatever it returns after the uncertainty tables. It returns
 * no charts until that analysis adds them here (e.g. probability of holding against width, or a bar per
 * parameter of the sensitivity ranking), built from frame.ts, styles.ts and svg.ts like the other charts.
 */
import type { ResultDocument } from '../../analysis/result.ts';
import type { Chart } from './frame.ts';

export function uncertaintyCharts(doc: Pick<ResultDocument, 'uncertainty' | 'options'>): Chart[] {
  if (!doc.uncertainty) return [];
  return [];
}
