/**
 * CSV downloads (formatting only). The series file is in long form — one row per layout and time — because
 * each layout has its own time steps.
 */
import type { ResultDocument } from '../../analysis/result.ts';
import type { TableView } from './table.ts';
import { fringeMask } from '../../report/charts/front-position.ts';
import { infestationOf, sideOf } from '../../report/charts/parts.ts';

/** Quotes a text cell; a leading = + - @ is defused so spreadsheets do not run it as a formula. */
export function csvText(s: string): string {
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return `"${safe.replace(/"/g, '""')}"`;
}

const cell = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? '' : String(x));

/**
 * Front positions and insect totals over time for the baseline and every option. The last column says what
 * the front towards an option's clearing is at that time: the breeding front, or only the thin non-breeding
 * fringe beyond a clearing the breeding front has not crossed (the same rule as the front-position chart).
 */
export function seriesCsv(doc: ResultDocument): string {
  const lines = ['layout,time_years,right_front_km,left_front_km,total_insects_km,front_towards_clearing_is'];
  const infestation = infestationOf(doc);
  const runs = [{ name: 'baseline', run: doc.baseline, fringe: null as boolean[] | null }, ...doc.options.map((o) => {
    const side = sideOf(o, infestation);
    return { name: o.name, run: o.run, fringe: fringeMask(o, o.run.series.timesYears, side === 'right' ? o.run.series.rightFrontKm : o.run.series.leftFrontKm, side) };
  })];
  for (const { name, run, fringe } of runs) {
    const s = run.series;
    const label = csvText(name);
    for (let i = 0; i < s.timesYears.length; i++) {
      const kind = fringe === null ? '' : fringe[i] ? csvText('thin non-breeding fringe only') : csvText('breeding front');
      lines.push(`${label},${cell(s.timesYears[i])},${cell(s.rightFrontKm[i])},${cell(s.leftFrontKm[i])},${cell(s.totalInsects[i])},${kind}`);
    }
  }
  return `${lines.join('\r\n')}\r\n`;
}

/**
 * Any table of the pages as CSV: the caption as a first comment-like row is left out (spreadsheets read the
 * first row as the header); cells are the same words the page shows, so a CSV never says less than the page.
 */
export function tableCsv(t: TableView): string {
  const lines = [t.head.map(csvText).join(',')];
  for (const r of t.rows) lines.push([r.label, ...r.cells].map((c) => csvText(c)).join(','));
  return `${lines.join('\r\n')}\r\n`;
}
