/**
 * The band-options table of the landscape page, without JavaScript: one row per band (name, cover, width,
 * centre line as "x y" points separated by ";"), posted as `band[k].name` … ; the "Add a band" and
 * "Remove" buttons post the form with an `action` and the page comes back with the row added or removed.
 * Rows become the scenario's `bands.options` and are then checked by the one landscape schema, so the
 * problems name the same fields as in a file (bands.options[1].widthM …).
 */
import type { Problem } from '../model/errors.ts';

export interface BandRow {
  name: string;
  cover: string;
  widthM: string;
  /** Centre-line points, "x y; x y; …" in the map's coordinates. */
  line: string;
  /** Set when the option is a polygon (kept as JSON text; not editable in the table). */
  polygon?: string;
}

export const MAX_BAND_ROWS = 8;

/** Points as typed back: 6 decimals keep longitude/latitude to about 0.1 m and metres to a micrometre. */
const fmt = (v: number) => String(Math.round(v * 1e6) / 1e6);

/** Scenario band options → table rows. */
export function bandsToRows(options: readonly Record<string, unknown>[]): BandRow[] {
  return options.map((o) => ({
    name: String(o.name ?? ''),
    cover: String(o.cover ?? 'clearing'),
    widthM: o.widthM === undefined ? '' : String(o.widthM),
    line: Array.isArray(o.line) ? (o.line as number[][]).map((p) => `${fmt(p[0])} ${fmt(p[1])}`).join('; ') : '',
    ...(o.polygon !== undefined ? { polygon: JSON.stringify(o.polygon) } : {}),
  }));
}

const str = (v: unknown) => (typeof v === 'string' ? v.slice(0, 20_000) : '');

/** The posted table → rows (at most MAX_BAND_ROWS; missing fields empty). */
export function rowsFromBody(body: Record<string, unknown>): BandRow[] {
  const n = Math.min(MAX_BAND_ROWS, Math.max(0, Math.floor(Number(body.bandCount) || 0)));
  const rows: BandRow[] = [];
  for (let k = 0; k < n; k++) {
    const row: BandRow = { name: str(body[`band[${k}].name`]).trim(), cover: str(body[`band[${k}].cover`]) || 'clearing', widthM: str(body[`band[${k}].widthM`]).trim(), line: str(body[`band[${k}].line`]).trim() };
    const poly = str(body[`band[${k}].polygon`]);
    if (poly) row.polygon = poly;
    rows.push(row);
  }
  return rows;
}

/** Applies an "add" / "remove-<k>" action; any other action leaves the rows as they are. */
export function applyBandAction(rows: BandRow[], action: string): BandRow[] {
  if (action === 'add' && rows.length < MAX_BAND_ROWS) return [...rows, { name: `Band ${rows.length + 1}`, cover: 'clearing', widthM: '500', line: '' }];
  const m = /^remove-(\d{1,2})$/.exec(action);
  if (m) return rows.filter((_, k) => k !== Number(m[1]));
  return rows;
}

/**
 * Rows → band options for the scenario. Numbers that do not read as numbers are problems here (with the
 * field and the text found); ranges and shapes are left to the schema.
 */
export function rowsToBands(rows: readonly BandRow[]): { options: Record<string, unknown>[]; problems: Problem[] } {
  const problems: Problem[] = [];
  const options = rows.map((r, k) => {
    const o: Record<string, unknown> = { name: r.name, cover: r.cover };
    if (r.polygon) {
      try {
        o.polygon = JSON.parse(r.polygon);
      } catch {
        problems.push({ path: `bands.options[${k}].polygon`, value: r.polygon.slice(0, 40), message: 'is not readable as a polygon' });
      }
      return o;
    }
    const w = Number(r.widthM.replace(',', '.'));
    if (r.widthM === '' || !Number.isFinite(w)) problems.push({ path: `bands.options[${k}].widthM`, value: r.widthM, message: 'must be a width in metres (a number such as 600)' });
    else o.widthM = w;
    const pts = r.line
      .split(';')
      .map((p) => p.trim())
      .filter(Boolean)
      .map((p) => p.split(/[\s,]+/).map(Number));
    const bad = pts.findIndex((p) => p.length !== 2 || !p.every(Number.isFinite));
    if (bad >= 0) problems.push({ path: `bands.options[${k}].line`, value: r.line.slice(0, 60), message: `point ${bad + 1} is not two numbers "x y" (points are separated by ";")` });
    else if (pts.length < 2) problems.push({ path: `bands.options[${k}].line`, value: r.line.slice(0, 60), message: 'a centre line needs at least 2 points "x y; x y"' });
    else o.line = pts;
    return o;
  });
  return { options, problems };
}
