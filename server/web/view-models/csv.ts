/**
 * CSV downloads (formatting only). The series file is in long form — one row per layout and time — because
 * each layout has its own time steps.
 */
import type { ResultDocument } from '../../analysis/result.ts';
import type { TableView } from './table.ts';

/** Quotes a text cell; a leading = + - @ is defused so spreadsheets do not run it as a formula. */
export function csvText(s: string): string {
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return `"${safe.replace(/"/g, '""')}"`;
}

const cell = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? '' : String(x));

/** Front positions and insect totals over time for the baseline and every option. */
export function seriesCsv(doc: ResultDocument): string {
  const lines = ['layout,time_years,right_front_km,left_front_km,total_insects_km'];
  const runs = [{ name: 'baseline', run: doc.baseline }, ...doc.options.map((o) => ({ name: o.name, run: o.run }))];
  for (const { name, run } of runs) {
    const s = run.series;
    const label = csvText(name);
    for (let i = 0; i < s.timesYears.length; i++) {
      lines.push(`${label},${cell(s.timesYears[i])},${cell(s.rightFrontKm[i])},${cell(s.leftFrontKm[i])},${cell(s.totalInsects[i])}`);
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
