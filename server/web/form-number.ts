/**
 * Numbers as people type them into a form box, read the way they meant or refused — never silently
 * rescaled. The tool prints numbers with a point for decimals and spaces between groups of three digits
 * ("1 200 m"); people also type thousands commas, decimal commas and units.
 *
 * - "1200", "1.2", "-0.5", "1e3", ".5": plain numbers (a point is the decimal mark).
 * - "1 200", "1 200,5", "1'200": digits grouped in threes by spaces (or ' or _): read as 1200, 1200.5.
 * - "1,200.5", "12,000,000": commas grouping threes, unambiguous with a decimal point or several groups.
 * - "1.200,5", "1.200.000": points grouping threes with a decimal comma, or several groups.
 * - "0,5", "2,75": a decimal comma (not three digits after it, or a leading 0).
 * - "1,200" (one comma followed by exactly three digits) is refused: it is 1.2 to some readers and 1200 to others;
 *   so is "1.200" in a box in metres or trees per hectare (where a thousand is common and a millimetre is not).
 * - a unit after the number: the box's own unit is accepted ("1200 m" in a box in m); m and km are converted
 *   into each other ("1.2 km" in a box in m is 1200 m); any other unit is refused, naming the box's unit.
 * - a number that would change on reading (1e-400 becomes 0, 1e400 becomes Infinity) is refused.
 *
 * Accepted readings other than a plain number come with a note ("1 200 m" read as 1200 m) that the page
 * shows back.
 */

/** What was read from one box. */
export interface NumberReading {
  /** The number; the text as typed when it is not a number (the schema then reports it); undefined when empty. */
  value: number | string | undefined;
  /** Why the text is refused, in words for the field's problem message. */
  problem?: string;
  /** How the text was read when it was not a plain number, e.g. `"1 200 m" read as 1200 m`. */
  note?: string;
}

const PLAIN = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
/** The number part (digits with group and decimal marks, an exponent) and what follows it. */
const NUMBER_THEN_REST = /^([+-]?(?:\d[\d.,'\u00a0\u202f _]*|[.,]\d+)(?:[eE][+-]?\d+)?)\s*(.*)$/s;

/** Units people type, folded to one spelling (lower case, no spaces, ² as 2, years as yr, "per" as /). */
function foldUnit(u: string): string {
  return u
    .toLowerCase()
    .replace(/\s+/g, '')
    .replace(/²|\^2/g, '2')
    .replace(/per/g, '/')
    .replace(/years?|yrs|(?<=\/)y$|^y$|^a$/g, 'yr')
    .replace(/metres?|meters?/g, 'm')
    .replace(/kilom/g, 'km')
    .replace(/trees?/g, '')
    .replace(/^1\//, '/');
}

/** Factor from a typed unit to the box's unit, for the conversions that cannot be misread (m ↔ km). */
function conversion(typed: string, unit: string): number | undefined {
  const t = foldUnit(typed);
  const u = foldUnit(unit);
  if (t === u && t !== '') return 1;
  if (u === 'm' && t === 'km') return 1000;
  if (u === 'km' && t === 'm') return 1e-3;
  return undefined;
}

/** The digits of a number as JavaScript reads them, or a problem when the grouping or decimal mark is ambiguous. */
function readDigits(body: string, pointMayGroup: boolean): { text: string } | { problem: string } | undefined {
  const sign = /^[+-]/.test(body) ? body[0] : '';
  const b = sign ? body.slice(1) : body;
  if (pointMayGroup && /^[1-9]\d{0,2}\.\d{3}$/.test(b)) {
    const [a, c] = b.split('.');
    return {
      problem: `is ambiguous: "${body}" may mean ${sign}${a}${c} (a point groups thousands in some countries) or ${sign}${Number(`${a}.${c}`)}; type ${sign}${a}${c} or "${sign}${a} ${c}" for the first`,
    };
  }
  if (PLAIN.test(body)) return { text: body };
  // Spaces (or ' or _) grouping threes; then a comma or a point is the decimal mark.
  let m = /^(\d{1,3}(?:[ \u00a0\u202f'_]\d{3})+)(?:[.,](\d+))?$/.exec(b);
  if (m) return { text: `${sign}${m[1].replace(/[ \u00a0\u202f'_]/g, '')}${m[2] ? `.${m[2]}` : ''}` };
  if (/[ \u00a0\u202f'_]/.test(b)) return { problem: 'has spaces that do not group digits in threes; type the number without them' };
  // Commas grouping threes, with a decimal point or in several groups.
  m = /^(\d{1,3}(?:,\d{3})+)\.(\d+)$/.exec(b) ?? /^(\d{1,3}(?:,\d{3}){2,})()$/.exec(b);
  if (m) return { text: `${sign}${m[1].replace(/,/g, '')}${m[2] ? `.${m[2]}` : ''}` };
  // Points grouping threes, with a decimal comma or in several groups.
  m = /^(\d{1,3}(?:\.\d{3})+),(\d+)$/.exec(b) ?? /^(\d{1,3}(?:\.\d{3}){2,})()$/.exec(b);
  if (m) return { text: `${sign}${m[1].replace(/\./g, '')}${m[2] ? `.${m[2]}` : ''}` };
  if (/^[1-9]\d{0,2},\d{3}$/.test(b)) {
    const [a, c] = b.split(',');
    return {
      problem: `is ambiguous: "${body}" may mean ${sign}${Number(`${a}.${c}`)} or ${sign}${a}${c}; type ${sign}${a}${c} or ${sign}${Number(`${a}.${c}`)} (a point marks decimals; spaces may group thousands, as in "${sign}${a} ${c}")`,
    };
  }
  // One decimal comma.
  m = /^(\d*),(\d+)$/.exec(b);
  if (m) return { text: `${sign}${m[1] || '0'}.${m[2]}` };
  return undefined;
}

/** A number rounded for a note, without binary noise. */
function shown(x: number): string {
  return String(Number(x.toPrecision(12)));
}

/**
 * Reads one box.
 * @param text - as typed
 * @param unit - the box's unit as printed beside it ('' for none)
 */
export function readNumberText(text: string | undefined, unit = ''): NumberReading {
  if (text === undefined) return { value: undefined };
  const typed = text.trim();
  const s = typed.replace(/\u2212/g, '-');
  if (s === '') return { value: undefined };
  const m = NUMBER_THEN_REST.exec(s);
  if (!m) return { value: typed };
  const numberPart = m[1].trim();
  const rest = m[2].trim();
  let factor = 1;
  if (rest !== '') {
    const f = conversion(rest, unit);
    if (f === undefined) {
      if (/^%$/.test(rest)) return { value: typed, problem: `takes a fraction, not a percentage: type ${shown(Number(numberPart.replace(',', '.')) / 100)} for ${numberPart} %` };
      if (/^[\p{L}µ°/%²]/u.test(rest)) {
        return { value: typed, problem: unit ? `has the unit "${rest}"; this box is in ${unit}: type the number only` : `has "${rest}" after the number; this box takes a number only` };
      }
      return { value: typed };
    }
    factor = f;
  }
  // In boxes in metres or trees per hectare thousands are common and three decimals are not (a millimetre):
  // there "1.200" is as likely to mean 1200 as 1.2.
  const digits = readDigits(numberPart, /^(m|trees\/ha)$/.test(unit));
  if (digits === undefined) return { value: typed };
  if ('problem' in digits) return { value: typed, problem: digits.problem };
  const x = Number(digits.text) * factor;
  if (!Number.isFinite(x)) return { value: typed, problem: 'is too large to be a number here' };
  if (x === 0 && /[1-9]/.test(digits.text.replace(/[eE].*$/, ''))) return { value: typed, problem: 'is too small to be told from 0; type 0 or a larger number' };
  const plain = rest === '' && PLAIN.test(numberPart);
  return plain ? { value: x } : { value: x, note: `"${typed}" read as ${shown(x)}${unit ? ` ${unit}` : ''}` };
}

/** The number in a box (or its text when not a number, undefined when empty); see readNumberText. */
export function readNumber(text: string | undefined, unit = ''): number | string | undefined {
  const r = readNumberText(text, unit);
  return r.problem ? (text ?? '').trim() : r.value;
}

/**
 * Reads a list of numbers typed in one box. Entries are separated by ";" or by a comma and a space
 * ("300, 600"), or by spaces alone when there is no comma or semicolon. Refused as ambiguous: a comma
 * between two digits ("300,600", "1,200") and space-separated entries that could be one number with grouped
 * thousands ("300 600", "1 200").
 */
export function readNumberList(text: string | undefined, unit = ''): { values: (number | string | undefined)[] | undefined; problem?: string; notes: string[] } {
  const t = (text ?? '').trim();
  if (t === '') return { values: undefined, notes: [] };
  if (/\d,\d/.test(t)) {
    return {
      values: [t],
      problem: 'has a comma between digits, which is ambiguous in a list (1,200 may be 1.2 or 1200): separate the entries with ";" or with a comma and a space ("300, 600")',
      notes: [],
    };
  }
  if (!/[;,]/.test(t) && /(^|\s)\d{1,3}(\s\d{3})+(\s|$)/.test(t)) {
    return {
      values: [t],
      problem: 'is ambiguous: spaces separate the entries here but may also group thousands ("1 200"): separate the entries with ";" or with a comma and a space ("300, 600")',
      notes: [],
    };
  }
  const parts = /[;,]/.test(t) ? t.split(/[;,]/) : t.split(/\s+/);
  const notes: string[] = [];
  const values: (number | string | undefined)[] = [];
  for (const p of parts.map((x) => x.trim()).filter(Boolean)) {
    const r = readNumberText(p, unit);
    if (r.problem) return { values: [t], problem: `entry "${p}" ${r.problem}`, notes: [] };
    if (r.note) notes.push(r.note);
    values.push(r.value);
  }
  return { values, notes };
}
