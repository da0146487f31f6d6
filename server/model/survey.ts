import { z } from 'zod';
import { FIELDS } from './fields.ts';
import { valueSchema } from './quantity.ts';
import { InputError, problemsFromZod, type Problem } from './errors.ts';

/**
 * Survey records: where and when the team looked for the pest, and whether it was found (trap catches,
 * infested trees found in delimitation surveys). One concept, shared by the CSV file, the form table, the
 * API body and the command line. No I/O here: `parseSurveyCsv` takes the file's text.
 */

/** Earliest and latest survey year accepted. */
export const SURVEY_YEAR_MIN = 1900;
export const SURVEY_YEAR_MAX = 2200;
/** Largest number of records in one fit (keeps a fit's cost bounded). */
export const MAX_SURVEY_RECORDS = 20_000;
/** Largest survey effort per record (relative units: traps, visits or trap-weeks). */
export const MAX_EFFORT = 1000;
/** Fewest survey years with a detection a spread rate needs (a line through two points has no error estimate). */
export const MIN_DETECTION_YEARS = 3;

const yearSchema = z
  .number({ error: `must be a whole year between ${SURVEY_YEAR_MIN} and ${SURVEY_YEAR_MAX}` })
  .int({ error: 'must be a whole year' })
  .gte(SURVEY_YEAR_MIN, { error: `must be a year from ${SURVEY_YEAR_MIN} to ${SURVEY_YEAR_MAX}` })
  .lte(SURVEY_YEAR_MAX, { error: `must be a year from ${SURVEY_YEAR_MIN} to ${SURVEY_YEAR_MAX}` });

const coordinateSchema = z
  .number({ error: 'must be a number (map coordinate in the map’s CRS units)' })
  .gte(-1e8, { error: 'must be within ±1e8 (map coordinate)' })
  .lte(1e8, { error: 'must be within ±1e8 (map coordinate)' });

/**
 * One survey record. Position: `atKm` along the transect, or `x`/`y` in the map's CRS for a landscape
 * (exactly one of the two kinds).
 */
export const SurveyRecordSchema = z
  .strictObject({
    year: yearSchema,
    /** Position along the transect [km]. */
    atKm: valueSchema(FIELDS.positionKm).optional(),
    /** Map easting in the landscape's CRS units (landscapes only). */
    x: coordinateSchema.optional(),
    /** Map northing in the landscape's CRS units (landscapes only). */
    y: coordinateSchema.optional(),
    /** True when the pest was found at this place in this year. */
    detected: z.boolean({ error: 'must be yes or no (true/false)' }),
    /** Survey effort, relative (e.g. traps or visits; 1 when absent): more effort finds a sparse pest more often. */
    effort: z
      .number({ error: `must be a number > 0 and ≤ ${MAX_EFFORT}` })
      .gt(0, { error: `must be > 0 and ≤ ${MAX_EFFORT}` })
      .lte(MAX_EFFORT, { error: `must be > 0 and ≤ ${MAX_EFFORT}` })
      .optional(),
  })
  .superRefine((r, ctx) => {
    const hasKm = r.atKm !== undefined;
    const hasX = r.x !== undefined;
    const hasY = r.y !== undefined;
    if (!hasKm && !hasX && !hasY) {
      ctx.addIssue({ code: 'custom', path: ['atKm'], input: undefined, message: 'is required (km along the transect), or give x and y on a map' });
    } else if (hasKm && (hasX || hasY)) {
      ctx.addIssue({ code: 'custom', path: [hasX ? 'x' : 'y'], input: hasX ? r.x : r.y, message: 'give either km along the transect or x/y on a map, not both' });
    } else if (!hasKm && hasX !== hasY) {
      ctx.addIssue({ code: 'custom', path: [hasX ? 'y' : 'x'], input: undefined, message: 'is required with the other map coordinate' });
    }
  });

export type SurveyRecord = z.infer<typeof SurveyRecordSchema>;

export const SurveyRecordsSchema = z
  .array(SurveyRecordSchema)
  .min(1, { error: 'needs at least one record' })
  .max(MAX_SURVEY_RECORDS, { error: `must have at most ${MAX_SURVEY_RECORDS} records` });

/** Where a record lies: on a transect, or on a map (the hook for landscapes). */
export type SurveyPosition = { kind: 'transect'; atKm: number } | { kind: 'map'; x: number; y: number };

export function recordPosition(r: SurveyRecord): SurveyPosition {
  return r.atKm !== undefined ? { kind: 'transect', atKm: r.atKm } : { kind: 'map', x: r.x as number, y: r.y as number };
}

/**
 * What the record checks need to know about a landscape map (the landscape schema lives in
 * `landscape.ts`; a landscape loader supplies this). Map-based fitting is not built yet: see `surveyProblems`.
 */
export interface SurveyMapExtent {
  /** True when (x, y) lies on the map's habitat grid. */
  contains(x: number, y: number): boolean;
  /** The extent in words, e.g. "x 500000–512000, y 6200000–6209000 (EPSG:25832)". */
  describe: string;
}

/** Survey records read from a file or form, with the row each came from (for messages). */
export interface SurveyTable {
  records: SurveyRecord[];
  /** Source label of record i: "row 7" (CSV, spreadsheet numbering, header = row 1) or "records[3]" (JSON). */
  rowLabels: string[];
  /** Path prefix of record i's problems: `rows[7]` (CSV) or `records[3]` (JSON / form). */
  rowPaths: string[];
}

/** Survey records that do not validate (file, form or API body). */
export class SurveyError extends InputError {
  constructor(problems: Problem[]) {
    super('SURVEY_INVALID', problems);
    this.name = 'SurveyError';
  }
}

/**
 * Validates records given as JSON (API body, form table).
 * @throws SurveyError naming `records[i].field`, the value found and what is allowed
 */
export function parseSurveyRecords(input: unknown): SurveyTable {
  const r = SurveyRecordsSchema.safeParse(input);
  if (!r.success) throw new SurveyError(problemsFromZod(r.error.issues, input, ['records']));
  const rowPaths = r.data.map((_, i) => `records[${i}]`);
  return { records: r.data, rowLabels: rowPaths, rowPaths };
}

/** Header names accepted for each column (case and spaces ignored). */
const COLUMN_ALIASES: Record<'year' | 'atKm' | 'x' | 'y' | 'detected' | 'effort', string[]> = {
  year: ['year'],
  atKm: ['km', 'atkm', 'positionkm', 'position_km', 'position'],
  x: ['x', 'easting'],
  y: ['y', 'northing'],
  detected: ['detected', 'found'],
  effort: ['effort'],
};

const YES = new Set(['yes', 'y', 'true', '1']);
const NO = new Set(['no', 'n', 'false', '0']);

/** Splits one CSV line at the separator, honouring double quotes ("" inside quotes is a quote). */
function splitCsvLine(line: string, sep: string): string[] {
  const out: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const ch = line[i];
    if (quoted) {
      if (ch === '"' && line[i + 1] === '"') {
        cur += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cur += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === sep) {
      out.push(cur.trim());
      cur = '';
    } else cur += ch;
  }
  out.push(cur.trim());
  return out;
}

/** Largest survey file accepted [characters]. */
export const MAX_SURVEY_CSV_CHARS = 2_000_000;

/**
 * Reads survey records from CSV text: a header row naming the columns (`year`, `km` — or `x` and `y` on a
 * map —, `detected`, optional `effort`; comma or semicolon separated; lines starting with `#` are notes),
 * then one record per row. Every row is validated; problems name the row as a spreadsheet numbers it
 * (`rows[7].year`: row 7, column year), the value found and what is allowed.
 * @throws SurveyError listing every problem found (up to 50)
 */
export function parseSurveyCsv(text: string): SurveyTable {
  if (text.length > MAX_SURVEY_CSV_CHARS) {
    throw new SurveyError([{ path: '', value: `${text.length} characters`, message: `is too large: a survey file may have at most ${MAX_SURVEY_CSV_CHARS} characters` }]);
  }
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  let headerRow = -1;
  for (let i = 0; i < lines.length; i++) {
    const t = lines[i].trim();
    if (t === '' || t.startsWith('#')) continue;
    headerRow = i;
    break;
  }
  if (headerRow < 0) throw new SurveyError([{ path: '', value: '(empty file)', message: 'has no header row: the first line must name the columns, e.g. year,km,detected,effort' }]);
  const sep = (lines[headerRow].match(/;/g)?.length ?? 0) > (lines[headerRow].match(/,/g)?.length ?? 0) ? ';' : ',';
  const header = splitCsvLine(lines[headerRow], sep).map((h) => h.toLowerCase().replace(/[\s"]/g, ''));
  const col: Partial<Record<keyof typeof COLUMN_ALIASES, number>> = {};
  const problems: Problem[] = [];
  header.forEach((h, k) => {
    const key = (Object.keys(COLUMN_ALIASES) as (keyof typeof COLUMN_ALIASES)[]).find((c) => COLUMN_ALIASES[c].includes(h));
    if (!key) problems.push({ path: `rows[${headerRow + 1}]`, value: h, message: `is not a known column (use year, km or x and y, detected, effort)` });
    else if (col[key] !== undefined) problems.push({ path: `rows[${headerRow + 1}]`, value: h, message: `names the column ${key} a second time` });
    else col[key] = k;
  });
  for (const need of ['year', 'detected'] as const) {
    if (col[need] === undefined) problems.push({ path: `rows[${headerRow + 1}]`, value: header.join(sep), message: `needs a column named ${need}` });
  }
  if (col.atKm === undefined && (col.x === undefined || col.y === undefined)) {
    problems.push({ path: `rows[${headerRow + 1}]`, value: header.join(sep), message: 'needs a position column: km (along the transect), or x and y (on a map)' });
  }
  if (problems.length) throw new SurveyError(problems);

  const records: SurveyRecord[] = [];
  const rowLabels: string[] = [];
  const rowPaths: string[] = [];
  for (let i = headerRow + 1; i < lines.length && problems.length < 50; i++) {
    const t = lines[i].trim();
    if (t === '' || t.startsWith('#')) continue;
    const row = i + 1;
    const path = `rows[${row}]`;
    const cells = splitCsvLine(lines[i], sep);
    if (cells.length > header.length && cells.slice(header.length).some((c) => c !== '')) {
      problems.push({ path, value: t.length > 60 ? `${t.slice(0, 57)}...` : t, message: `has ${cells.length} cells but the header names ${header.length} columns` });
      continue;
    }
    const raw: Record<string, unknown> = {};
    const cell = (k: number | undefined) => (k === undefined ? '' : (cells[k] ?? '').trim());
    for (const key of ['year', 'atKm', 'x', 'y', 'effort'] as const) {
      const s = cell(col[key]);
      if (s === '') continue;
      const v = Number(s);
      raw[key] = s !== '' && Number.isFinite(v) ? v : s;
    }
    const d = cell(col.detected).toLowerCase();
    if (d !== '') raw.detected = YES.has(d) ? true : NO.has(d) ? false : cell(col.detected);
    const r = SurveyRecordSchema.safeParse(raw);
    if (!r.success) {
      for (const p of problemsFromZod(r.error.issues, raw)) {
        const column = p.path === 'atKm' ? 'km' : p.path;
        problems.push({ ...p, path: `${path}.${column}`, message: p.path === 'detected' && typeof p.value === 'string' ? 'must be yes or no (also accepted: y/n, true/false, 1/0)' : p.message });
      }
      continue;
    }
    records.push(r.data);
    rowLabels.push(`row ${row}`);
    rowPaths.push(path);
  }
  if (problems.length) throw new SurveyError(problems);
  if (records.length === 0) throw new SurveyError([{ path: '', value: '(no rows)', message: 'has a header but no records' }]);
  if (records.length > MAX_SURVEY_RECORDS) throw new SurveyError([{ path: '', value: records.length, message: `must have at most ${MAX_SURVEY_RECORDS} records` }]);
  return { records, rowLabels, rowPaths };
}

/** Survey records as CSV text (the format `parseSurveyCsv` reads). */
export function surveyToCsv(records: readonly SurveyRecord[], notes: readonly string[] = []): string {
  const map = records.some((r) => r.atKm === undefined);
  const hasEffort = records.some((r) => r.effort !== undefined);
  const lines = [...notes.map((n) => `# ${n}`), ['year', map ? 'x,y' : 'km', 'detected', ...(hasEffort ? ['effort'] : [])].join(',')];
  for (const r of records) {
    const pos = map ? `${r.x},${r.y}` : String(r.atKm);
    lines.push([String(r.year), pos, r.detected ? 'yes' : 'no', ...(hasEffort ? [r.effort === undefined ? '' : String(r.effort)] : [])].join(','));
  }
  return lines.join('\n') + '\n';
}

/** What the records are checked against: the transect's extent [km], or a map's extent. */
export type SurveyDomain = { kind: 'transect'; startKm: number; endKm: number } | { kind: 'map'; extent: SurveyMapExtent };

/** Slack for positions at the transect ends [km] (1 mm), as the scenario's own checks use. */
const POSITION_SLACK_KM = 1e-6;

/**
 * Checks that need the whole table and the scenario: positions on the transect (or map), years in order,
 * and at least three survey years with a detection. Returns problems (empty when the records can be fitted).
 */
export function surveyProblems(table: SurveyTable, domain: SurveyDomain): Problem[] {
  const problems: Problem[] = [];
  const { records, rowPaths, rowLabels } = table;
  records.forEach((r, i) => {
    const pos = recordPosition(r);
    if (domain.kind === 'transect') {
      if (pos.kind === 'map') {
        problems.push({ path: `${rowPaths[i]}.x`, value: r.x, message: 'is a map coordinate, but this scenario is a transect: give km along the transect' });
      } else if (pos.atKm < domain.startKm - POSITION_SLACK_KM || pos.atKm > domain.endKm + POSITION_SLACK_KM) {
        problems.push({ path: `${rowPaths[i]}.${rowPaths[i].startsWith('rows') ? 'km' : 'atKm'}`, value: pos.atKm, message: `is off the transect: must be within [${domain.startKm}, ${domain.endKm}] km` });
      }
    } else if (pos.kind === 'transect') {
      problems.push({ path: `${rowPaths[i]}.${rowPaths[i].startsWith('rows') ? 'km' : 'atKm'}`, value: r.atKm, message: 'is a transect position, but this scenario is a map: give x and y in the map’s CRS' });
    } else if (!domain.extent.contains(pos.x, pos.y)) {
      problems.push({ path: `${rowPaths[i]}.x`, value: { x: pos.x, y: pos.y }, message: `is off the map: must lie within ${domain.extent.describe}` });
    }
    if (i > 0 && r.year < records[i - 1].year) {
      problems.push({
        path: `${rowPaths[i]}.year`,
        value: r.year,
        message: `is out of order: it comes after ${records[i - 1].year} (${rowLabels[i - 1]}); list the records by year, earliest first (a typing slip in a year shows up this way)`,
      });
    }
  });
  if (problems.length) return problems;
  const years = [...new Set(records.map((r) => r.year))];
  const detectionYears = [...new Set(records.filter((r) => r.detected).map((r) => r.year))];
  if (detectionYears.length < MIN_DETECTION_YEARS) {
    problems.push({
      path: 'records',
      value: detectionYears.length ? detectionYears.join(', ') : 'no detections',
      message: `must have detections in at least ${MIN_DETECTION_YEARS} different years to measure a spread rate (found ${detectionYears.length} year${detectionYears.length === 1 ? '' : 's'} with a detection among ${years.length} survey year${years.length === 1 ? '' : 's'})`,
    });
  }
  return problems;
}
