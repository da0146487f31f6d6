/**
 * Form text → scenario object (unvalidated): each input read by its kind (numbers through form-number.ts,
 * which refuses ambiguous ones), rows in order, the hidden settings merged back. Part of the scenario form
 * (form-state.ts); parseScenario validates the object.
 */
import { FIELDS } from '../model/fields.ts';
import type { Problem } from '../model/errors.ts';
import { applies, DIST_PARTS, EXTRA_INPUT, FORM_SECTIONS, ROW_GROUPS, type FormFieldDef, type FormState } from './form-layout.ts';
import { readNumberList, readNumberText } from './form-number.ts';
import { rowIndices, UNSAFE_KEYS } from './form-rows.ts';

type Obj = Record<string, unknown>;

function readText(text: string | undefined): string | undefined {
  if (text === undefined) return undefined;
  const s = text.replace(/\r\n/g, '\n').trim();
  return s === '' ? undefined : s;
}

/** What reading the form found besides the values: refused numbers (problems) and numbers read with a note. */
interface Reading {
  problems: Problem[];
  notes: FormNote[];
}

/** Reads one number box, recording a refusal or a note under the box's input name. */
function numberAt(state: FormState, name: string, unit: string, r: Reading): unknown {
  const got = readNumberText(state[name], unit);
  if (got.problem) r.problems.push({ path: name, value: state[name]?.trim(), message: got.problem });
  else if (got.note) r.notes.push({ path: name, message: got.note });
  return got.value;
}

function readQuantity(state: FormState, name: string, unit: string, r: Reading): unknown {
  const kind = state[`${name}~kind`] ?? 'value';
  if (kind === 'value' || !(kind in DIST_PARTS)) return numberAt(state, name, unit, r);
  const parts = DIST_PARTS[kind as keyof typeof DIST_PARTS];
  if (parts.every((p) => readNumberText(state[`${name}~${p}`], unit).value === undefined)) {
    // A distribution chosen but not filled in: fall back to the single value, if there is one.
    return numberAt(state, name, unit, r) ?? { dist: kind };
  }
  const out: Obj = { dist: kind };
  // The spread of a log-normal distribution is a factor, without the field's unit.
  for (const p of parts) out[p] = numberAt(state, `${name}~${p}`, p === 'spread' ? '' : unit, r);
  return out;
}

/** Unit of a movement rate typed as a distance: `${name}~as` = DISTANCE_AS. */
export const DISTANCE_AS = 'distance';
export const DISTANCE_UNIT = 'km/yr';

/**
 * A movement rate typed as the typical distance d an insect moves along the transect in a year (the
 * root-mean-square displacement of a random walk, √(2·D·t) in one dimension: Einstein 1905; Berg, Random
 * Walks in Biology, 1993): D = d²/(2·1 yr). A log-normal range of d is a log-normal range of D (median d²/2,
 * spread factor squared, since ln D = 2 ln d − ln 2); a uniform or triangular range is not, so it is refused
 * rather than reshaped. Each conversion is shown back as a note.
 */
function readDistance(state: FormState, name: string, r: Reading): unknown {
  const kind = state[`${name}~kind`] ?? 'value';
  const note = (d: number, D: number) => r.notes.push({ path: name, message: `a typical distance of ${num(d)} km a year read as a movement rate of ${num(d)}²/2 = ${num(D)} km²/yr (D = d²/2)` });
  if (kind === 'value' || !(kind in DIST_PARTS)) {
    const d = numberAt(state, name, DISTANCE_UNIT, r);
    if (typeof d !== 'number') return d;
    const D = (d * d) / 2;
    note(d, D);
    return D;
  }
  if (kind !== 'lognormal') {
    r.problems.push({ path: `${name}~kind`, value: kind, message: 'a range of distances can be given as log-normal only (it then is a log-normal range of the movement rate); for a uniform or triangular range give the movement rate in km²/yr' });
    return undefined;
  }
  const median = numberAt(state, `${name}~median`, DISTANCE_UNIT, r);
  const spread = numberAt(state, `${name}~spread`, '', r);
  if (typeof median !== 'number' || typeof spread !== 'number') return { dist: kind, median, spread };
  const D = (median * median) / 2;
  note(median, D);
  return { dist: 'lognormal', median: D, spread: spread * spread };
}

function num(x: number): string {
  return Number(x.toPrecision(4)).toString();
}

function readField(state: FormState, name: string, def: FormFieldDef, r: Reading): unknown {
  if (def.kind === 'quantity' && def.distanceInput && state[`${name}~as`] === DISTANCE_AS) return readDistance(state, name, r);
  const unit = def.field ? FIELDS[def.field].unit : '';
  switch (def.kind) {
    case 'number':
      return numberAt(state, name, unit, r);
    case 'quantity':
      return readQuantity(state, name, unit, r);
    case 'checkbox':
      return state[name] === 'on' || state[name] === 'true' || state[name] === '1';
    case 'numberList': {
      const got = readNumberList(state[name], unit);
      if (got.problem) r.problems.push({ path: name, value: state[name]?.trim(), message: got.problem });
      for (const note of got.notes) r.notes.push({ path: name, message: note });
      return got.values;
    }
    case 'select':
      if (state[name] === '' || state[name] === undefined) return undefined;
      if (def.booleanChoice) return state[name] === 'true' ? true : state[name] === 'false' ? false : state[name];
      return state[name];
    default:
      return readText(state[name]);
  }
}

function setPath(root: Obj, path: string, v: unknown): void {
  if (v === undefined) return;
  const keys = path.split('.');
  let cur = root;
  for (const k of keys.slice(0, -1)) {
    if (typeof cur[k] !== 'object' || cur[k] === null) cur[k] = {};
    cur = cur[k] as Obj;
  }
  cur[keys[keys.length - 1]] = v;
}

function deepMerge(base: unknown, over: unknown): unknown {
  if (base === null || typeof base !== 'object' || Array.isArray(base)) return over === undefined ? base : over;
  if (over === null || typeof over !== 'object' || Array.isArray(over)) return over === undefined ? base : over;
  const out: Obj = {};
  for (const [k, v] of Object.entries(base as Obj)) if (!UNSAFE_KEYS.has(k)) out[k] = v;
  for (const [k, v] of Object.entries(over as Obj)) if (!UNSAFE_KEYS.has(k)) out[k] = deepMerge(out[k], v);
  return out;
}

/** A number read other than as typed ("1 200 m" read as 1200 m), by its input name, to show back. */
export interface FormNote {
  path: string;
  message: string;
}

/**
 * Builds the (unvalidated) scenario object from form text. Inputs that do not apply (growth fields of
 * another growth form, stocking of a clearing) are left out. Returns form-level problems (a damaged hidden
 * field, a number refused as ambiguous: form-number.ts) beside the object, and notes on numbers read other
 * than as typed; the other field problems come from parseScenario.
 */
export function formToScenario(state: FormState): { input: Obj; problems: Problem[]; notes: FormNote[] } {
  const problems: Problem[] = [];
  const reading: Reading = { problems, notes: [] };
  let extra: Obj = {};
  const extraText = state[EXTRA_INPUT]?.trim();
  if (extraText) {
    try {
      const parsed: unknown = JSON.parse(extraText);
      if (parsed && typeof parsed === 'object' && !Array.isArray(parsed)) extra = parsed as Obj;
      else throw new Error('not an object');
    } catch {
      problems.push({ path: EXTRA_INPUT, value: extraText.slice(0, 40), message: 'the hidden settings of this form were damaged; reload the scenario' });
    }
  }
  const input: Obj = {};
  for (const section of FORM_SECTIONS) {
    for (const def of section.fields) {
      if (def.switchFor) {
        // A ticked switch with nothing else filled in still makes the block (its fields have defaults).
        if (state[def.path] === 'on') setPath(input, def.switchFor, {});
        continue;
      }
      if (!applies(def.showWhen, state)) continue;
      setPath(input, def.path, readField(state, def.path, def, reading));
    }
  }
  for (const group of Object.values(ROW_GROUPS)) {
    if (!applies(group.showWhen, state)) continue;
    const rows = rowIndices(state, group.prefix).map((i) => {
      const row: Obj = {};
      const habitat = state[`${group.prefix}[${i}].habitat`];
      for (const col of group.columns) {
        if (col.habitats && !col.habitats.includes(habitat)) continue;
        const v = readField(state, `${group.prefix}[${i}].${col.path}`, col, reading);
        if (v !== undefined) row[col.path] = v;
      }
      return row;
    });
    // Optional lists (options, mosaics) are left out when empty; the others are required.
    if (rows.length || (group.key !== 'options' && group.key !== 'mosaics')) setPath(input, group.prefix, rows);
  }
  // No barrier at all when neither its length nor any option was given (its other settings then do not apply).
  const barrier = input.barrier as Obj | undefined;
  if (barrier && barrier.lengthKm === undefined && !(Array.isArray(barrier.options) && barrier.options.length > 0)) {
    delete input.barrier;
  }
  return { input: deepMerge(extra, input) as Obj, problems, notes: reading.notes };
}

/** The unit of a number input by its name ('' when it has none or is not a number input). */
export function inputUnit(name: string): string {
  const base = name.replace(/~.*$/, '');
  const unitOf = (def: FormFieldDef) => (def.field && !name.endsWith('~spread') ? FIELDS[def.field].unit : '');
  for (const section of FORM_SECTIONS) for (const def of section.fields) if (def.path === base) return unitOf(def);
  for (const group of Object.values(ROW_GROUPS)) {
    const m = new RegExp(`^${group.prefix.replace(/\./g, '\\.')}\\[\\d+\\]\\.(.+)$`).exec(base);
    const col = m ? group.columns.find((c) => c.path === m[1]) : undefined;
    if (col) return unitOf(col);
  }
  return '';
}
