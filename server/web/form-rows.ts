/**
 * The form's row buttons (add, remove, move up/down a row of segments, sites, options, kernel points or
 * mosaics; each a submit button with an `_action` value, so they work without JavaScript), and the
 * normalisation of a posted form body with its size limits. Part of the scenario form (form-state.ts).
 *
 * Work on a form post is linear in its number of inputs, and the number of inputs and rows is capped
 * (MAX_FORM_INPUTS, each group's maxRows): a post can never keep the event loop busy for long.
 */
import { InputError } from '../model/errors.ts';
import { ROW_GROUPS, type FormState, type RowGroupDef } from './form-layout.ts';

/** Keys never copied from user input (they would reach object prototypes). */
export const UNSAFE_KEYS = new Set(['__proto__', 'prototype', 'constructor']);

/**
 * Most inputs one form post may carry. The largest form the page itself produces (500 segments with every
 * distribution part, all other groups full) has about 10 300 inputs.
 */
export const MAX_FORM_INPUTS = 12_000;

/** A form post with more inputs or rows than any form of this app has (answered 413, naming the limit). */
export class FormTooLargeError extends InputError {
  readonly statusCode = 413;
  constructor(path: string, value: string, message: string) {
    super('FORM_TOO_LARGE', [{ path, value, message }]);
    this.name = 'FormTooLargeError';
  }
}

/** Indices of the rows of a group present in the form, in order. */
export function rowIndices(state: FormState, prefix: string): number[] {
  const re = new RegExp(`^${prefix.replace(/\./g, '\\.')}\\[(\\d{1,4})\\]\\.`);
  const seen = new Set<number>();
  for (const key of Object.keys(state)) {
    const m = re.exec(key);
    if (m) seen.add(Number(m[1]));
  }
  return [...seen].sort((a, b) => a - b);
}

export type RowAction =
  | { kind: 'add'; group: RowGroupDef['key'] }
  | { kind: 'remove' | 'up' | 'down'; group: RowGroupDef['key']; index: number };

/** Parses an action button value such as `add:segments` or `remove:sites:2`; undefined for other values. */
export function parseRowAction(value: string | undefined): RowAction | undefined {
  const m = /^(add|remove|up|down):(segments|sites|options|kernel|mosaics)(?::(\d{1,4}))?$/.exec(value ?? '');
  if (!m) return undefined;
  const group = m[2] as RowGroupDef['key'];
  if (m[1] === 'add') return { kind: 'add', group };
  if (m[3] === undefined) return undefined;
  return { kind: m[1] as 'remove' | 'up' | 'down', group, index: Number(m[3]) };
}

/** `<index>].<column>` after a group's `prefix[`. */
const ROW_KEY = /^(\d+)\]\.(.+)$/s;

/**
 * Applies a row button to the form text and returns the new text (rows renumbered from 0).
 * One pass over the inputs to sort them into rows, one to write them back: linear in the form's size.
 */
export function applyRowAction(state: FormState, action: RowAction): FormState {
  const group = ROW_GROUPS[action.group];
  const head = `${group.prefix}[`;
  const out: FormState = Object.create(null) as FormState;
  const byIndex = new Map<number, FormState>();
  for (const [k, v] of Object.entries(state)) {
    const m = k.startsWith(head) ? ROW_KEY.exec(k.slice(head.length)) : null;
    if (!m) {
      out[k] = v;
      continue;
    }
    // Row numbers beyond four digits are not rows of this form (rowIndices ignores them too): dropped.
    if (m[1].length > 4) continue;
    const i = Number(m[1]);
    let row = byIndex.get(i);
    if (!row) byIndex.set(i, (row = Object.create(null) as FormState));
    row[m[2]] = v;
  }
  const indices = [...byIndex.keys()].sort((a, b) => a - b);
  const rows = indices.map((i) => byIndex.get(i)!);
  const at = action.kind === 'add' ? -1 : indices.indexOf(action.index);
  switch (action.kind) {
    case 'add':
      if (rows.length < group.maxRows) rows.push(group.newRow(rows.length));
      break;
    case 'remove':
      if (at >= 0) rows.splice(at, 1);
      break;
    case 'up':
      if (at > 0) [rows[at - 1], rows[at]] = [rows[at], rows[at - 1]];
      break;
    case 'down':
      if (at >= 0 && at < rows.length - 1) [rows[at], rows[at + 1]] = [rows[at + 1], rows[at]];
      break;
  }
  rows.forEach((row, i) => {
    for (const [k, v] of Object.entries(row)) out[`${group.prefix}[${i}].${k}`] = v;
  });
  return out;
}

/**
 * Normalises a parsed form body: one string per input (the last one when an input is repeated), and
 * only names that look like form inputs (a dotted path, brackets, `~`, letters and digits).
 * @throws FormTooLargeError when the body has more than MAX_FORM_INPUTS inputs or a group more rows than
 *   the form allows
 */
export function formStateFromBody(body: unknown): FormState {
  const state: FormState = Object.create(null) as FormState;
  if (!body || typeof body !== 'object') return state;
  const entries = Object.entries(body as Record<string, unknown>);
  if (entries.length > MAX_FORM_INPUTS) {
    throw new FormTooLargeError('(form)', `${entries.length} inputs`, `a scenario form has at most ${MAX_FORM_INPUTS} inputs; this post was not read`);
  }
  for (const [k, v] of entries) {
    if (k.length > 120 || !/^[A-Za-z_][\w.[\]~]*$/.test(k) || [...UNSAFE_KEYS].some((u) => k.includes(u))) continue;
    const value = Array.isArray(v) ? v[v.length - 1] : v;
    if (typeof value === 'string') state[k] = value;
  }
  for (const group of Object.values(ROW_GROUPS)) {
    const n = rowIndices(state, group.prefix).length;
    if (n > group.maxRows) {
      throw new FormTooLargeError(group.prefix, `${n} rows`, `has at most ${group.maxRows} rows in this form; this post was not read`);
    }
  }
  return state;
}
