/**
 * JSON text as every front end reads it (API bodies, scenario files on the CLI, uploads, the JSON editor):
 * one reader, so they all accept and refuse the same texts.
 *
 * - A byte-order mark at the start is dropped (editors on some systems write one).
 * - A syntax error is reported with its line, column and the text around it.
 * - A key given twice in one object is refused (JSON.parse would silently keep the last one), naming both lines.
 * - `__proto__`, `constructor` and `prototype` are refused as keys: no scenario field has these names, and
 *   they could reach object prototypes in code that copies keys.
 * - A number that would change on reading is refused (1e-400 becomes 0; 1e400 becomes Infinity).
 * - Nesting deeper than MAX_JSON_DEPTH is refused.
 *
 * The text is first scanned (iteratively, so deep nesting cannot overflow the stack), then parsed by JSON.parse.
 */
import { InputError, type Problem } from './errors.ts';

/** Keys refused in any object. */
export const FORBIDDEN_KEYS: ReadonlySet<string> = new Set(['__proto__', 'constructor', 'prototype']);

/** Deepest nesting accepted: a scenario is about six levels deep; far deeper text is not a scenario. */
export const MAX_JSON_DEPTH = 64;

/** Most problems reported for one text. */
const MAX_PROBLEMS = 20;

/** JSON text that cannot be read; every problem names the line and column. */
export class JsonTextError extends InputError {
  constructor(problems: Problem[]) {
    super('JSON_INVALID', problems);
    this.name = 'JsonTextError';
  }
}

interface Frame {
  obj: boolean;
  path: string;
  /** Keys seen in this object, with the offset of their first appearance. */
  keys: Map<string, number> | null;
  key: string;
  index: number;
}

class Stop extends Error {
  constructor(
    readonly at: number,
    readonly what: string,
  ) {
    super(what);
  }
}

/** Line and column (both from 1) of an offset. */
export function lineColumn(text: string, at: number): { line: number; column: number } {
  let line = 1;
  let lineStart = 0;
  for (let i = 0; i < at && i < text.length; i++) {
    if (text.charCodeAt(i) === 10) {
      line++;
      lineStart = i + 1;
    }
  }
  return { line, column: at - lineStart + 1 };
}

/** The text around an offset, on one line, for a problem's value. */
function around(text: string, at: number): string {
  const from = Math.max(0, at - 20);
  const s = text.slice(from, at + 20).replace(/[\r\n\t]/g, ' ');
  return `${from > 0 ? '…' : ''}${s}${at + 20 < text.length ? '…' : ''}`;
}

function where(text: string, at: number): string {
  const { line, column } = lineColumn(text, at);
  return `line ${line}, column ${column}`;
}

const NUMBER = /-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/y;
const HEX4 = /^[0-9a-fA-F]{4}$/;

/**
 * Scans JSON text: the first syntax error (as a Stop), and the duplicate keys, forbidden keys and numbers
 * that change on reading (as problems).
 */
function scan(text: string, problems: Problem[]): void {
  new Scanner(text, problems).run();
}

/** The scanner's state: the text, the position and the open objects and arrays. */
class Scanner {
  private i = 0;
  private readonly n: number;
  private readonly stack: Frame[] = [];
  constructor(
    private readonly text: string,
    private readonly problems: Problem[],
  ) {
    this.n = text.length;
  }

  private add(p: Problem): void {
    if (this.problems.length < MAX_PROBLEMS) this.problems.push(p);
  }

  private ws(): void {
    const { text, n } = this;
    while (this.i < n) {
      const c = text.charCodeAt(this.i);
      if (c === 32 || c === 10 || c === 13 || c === 9) this.i++;
      else break;
    }
  }

  private readString(): void {
    const text = this.text;
    this.i++;
    for (;;) {
      const i = this.i;
      if (i >= this.n) throw new Stop(i, 'the text ends inside a string (a closing " is missing)');
      const c = text.charCodeAt(i);
      if (c === 34) {
        this.i++;
        return;
      }
      if (c === 92) {
        const e = text[i + 1];
        if (e === 'u') {
          if (!HEX4.test(text.slice(i + 2, i + 6))) throw new Stop(i, 'a \\u escape needs four hexadecimal digits');
          this.i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) this.i += 2;
        else throw new Stop(i, `"\\${e ?? ''}" is not a valid escape in a string`);
        continue;
      }
      if (c < 0x20) throw new Stop(i, 'a string contains a raw control character (a line break must be written \\n)');
      this.i++;
    }
  }

  private readKey(f: Frame): void {
    const text = this.text;
    this.ws();
    if (text[this.i] !== '"') throw new Stop(this.i, 'expected a field name in double quotes');
    const start = this.i;
    this.readString();
    const key = JSON.parse(text.slice(start, this.i)) as string;
    const path = f.path ? `${f.path}.${key}` : key;
    if (FORBIDDEN_KEYS.has(key)) {
      this.add({ path, value: key, message: `is not allowed as a field name (${where(text, start)}): no scenario field has this name` });
    }
    const first = f.keys!.get(key);
    if (first !== undefined) {
      this.add({ path, value: key, message: `appears twice in the same object (${where(text, first)} and ${where(text, start)}); give each field once` });
    } else f.keys!.set(key, start);
    f.key = key;
    this.ws();
    if (text[this.i] !== ':') throw new Stop(this.i, `expected ":" after the field name "${key}"`);
    this.i++;
  }

  private readNumber(path: string): void {
    const { text, i } = this;
    NUMBER.lastIndex = i;
    const m = NUMBER.exec(text);
    if (!m) throw new Stop(i, 'this is not a valid number');
    const x = Number(m[0]);
    if (!Number.isFinite(x)) this.add({ path, value: m[0], message: `is too large to be a number (${where(text, i)})` });
    else if (x === 0 && /[1-9]/.test(m[0].replace(/[eE].*$/, ''))) {
      this.add({ path, value: m[0], message: `is too small to be told from 0 (${where(text, i)}); write 0 or a larger number` });
    }
    this.i += m[0].length;
  }

  /** Reads one value; true when it opened an object or array that is not empty (its first member is next). */
  private readValue(): boolean {
    const { text, stack } = this;
    this.ws();
    const i = this.i;
    const path = stack.length ? childPath(stack[stack.length - 1]) : '';
    const c = text[i];
    if (c === '{' || c === '[') {
      if (stack.length >= MAX_JSON_DEPTH) throw new Stop(i, `the text is nested more than ${MAX_JSON_DEPTH} levels deep; a scenario is about six`);
      this.i++;
      this.ws();
      if (text[this.i] === (c === '{' ? '}' : ']')) {
        this.i++;
        return false;
      }
      const f: Frame = { obj: c === '{', path, keys: c === '{' ? new Map() : null, key: '', index: 0 };
      stack.push(f);
      if (f.obj) this.readKey(f);
      return true;
    }
    if (c === '"') this.readString();
    else if (c === '-' || (c !== undefined && c >= '0' && c <= '9')) this.readNumber(path);
    else if (text.startsWith('true', i)) this.i += 4;
    else if (text.startsWith('false', i)) this.i += 5;
    else if (text.startsWith('null', i)) this.i += 4;
    else if (i >= this.n) throw new Stop(i, stack.length ? 'the text ends before the JSON is complete (a closing } or ] is missing)' : 'the text is empty');
    else throw new Stop(i, `expected a value (a number, "text", true, false, null, {…} or […]) but found ${JSON.stringify(text[i])}`);
    return false;
  }

  /** After a value: a comma (true: another value follows), closing brackets, or the end (false). */
  private afterValue(): boolean {
    const text = this.text;
    for (;;) {
      this.ws();
      const f = this.stack[this.stack.length - 1];
      const i = this.i;
      if (!f) {
        if (i < this.n) throw new Stop(i, 'there is more text after the end of the JSON value');
        return false;
      }
      if (text[i] === ',') {
        this.i++;
        if (f.obj) this.readKey(f);
        else f.index++;
        return true;
      }
      if (text[i] === (f.obj ? '}' : ']')) {
        this.i++;
        this.stack.pop();
        continue;
      }
      if (i >= this.n) throw new Stop(i, 'the text ends before the JSON is complete (a closing } or ] is missing)');
      throw new Stop(i, `expected "," or "${f.obj ? '}' : ']'}" after a value but found ${JSON.stringify(text[i])}`);
    }
  }

  run(): void {
    for (;;) {
      if (this.readValue()) continue;
      if (!this.afterValue()) return;
    }
  }
}

function childPath(f: Frame): string {
  return f.obj ? (f.path ? `${f.path}.${f.key}` : f.key) : `${f.path}[${f.index}]`;
}

/**
 * Reads JSON text (see the module comment for what is accepted).
 * @param text - the text; a leading byte-order mark is dropped
 * @throws JsonTextError naming the line and column of a syntax error, or each duplicate key, forbidden key
 *   and number that would change on reading
 */
export function parseJsonText(text: string): unknown {
  const t = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const problems: Problem[] = [];
  try {
    scan(t, problems);
  } catch (e) {
    if (!(e instanceof Stop)) throw e;
    throw new JsonTextError([
      {
        path: '',
        value: t.trim() === '' ? '(empty)' : around(t, e.at),
        message: `is not valid JSON at ${where(t, e.at)}: ${e.what}`,
      },
    ]);
  }
  if (problems.length) throw new JsonTextError(problems);
  return JSON.parse(t) as unknown;
}
