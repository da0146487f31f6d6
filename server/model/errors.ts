import type { z } from 'zod';

/** One thing wrong with an input: where, what was given, and what is allowed. */
export interface Problem {
  /** Dotted field path, e.g. `pest.growth.rate` or `transect.segments[2].lengthKm` ('' for the whole input). */
  path: string;
  /** The value found there (undefined when missing). */
  value: unknown;
  /** What is allowed, in words. */
  message: string;
}

/** Base class for errors the user can fix; carries a stable code for the API. */
export class InputError extends Error {
  readonly code: string;
  readonly problems: Problem[];
  constructor(code: string, problems: Problem[], summary?: string) {
    super(summary ?? formatProblems(problems));
    this.name = 'InputError';
    this.code = code;
    this.problems = problems;
  }
}

/** A scenario (file, form or API body) that does not validate. */
export class ScenarioError extends InputError {
  constructor(problems: Problem[]) {
    super('SCENARIO_INVALID', problems);
    this.name = 'ScenarioError';
  }
}

/** A problem too large to run within the limits (cells, horizon, options). */
export class LimitError extends InputError {
  constructor(problems: Problem[]) {
    super('LIMIT_EXCEEDED', problems);
    this.name = 'LimitError';
  }
}

/** Dotted path with array indices in brackets. */
export function formatPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const p of path) {
    if (typeof p === 'number') out += `[${p}]`;
    else out += out ? `.${String(p)}` : String(p);
  }
  return out;
}

/** The path array of a dotted path such as `barrier.options[0].widthM` (the inverse of formatPath). */
export function pathFromDotted(path: string): (string | number)[] {
  const out: (string | number)[] = [];
  for (const m of path.matchAll(/([^.[\]]+)|\[(\d+)\]/g)) out.push(m[2] !== undefined ? Number(m[2]) : m[1]);
  return out;
}

/** Value at `path` inside `root`, or undefined. */
export function valueAt(root: unknown, path: readonly PropertyKey[]): unknown {
  let cur: unknown = root;
  for (const p of path) {
    if (cur === null || typeof cur !== 'object') return undefined;
    cur = (cur as Record<PropertyKey, unknown>)[p as string];
  }
  return cur;
}

/** The value found, as short JSON text ("missing" when absent). */
export function describeValue(v: unknown): string {
  if (v === undefined) return 'missing';
  if (typeof v === 'number' && !Number.isFinite(v)) return String(v);
  let s: string;
  try {
    s = JSON.stringify(v) ?? String(v);
  } catch {
    s = String(v);
  }
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}

/** Deepest nesting of a value kept in a problem; deeper parts become "...". */
const MAX_VALUE_DEPTH = 12;

/**
 * The value found, cut to a readable depth, so a problem can always be printed and sent back as JSON
 * (a value nested thousands of levels deep overflowed the stack when printed).
 */
export function boundedValue(v: unknown, depth = 0): unknown {
  if (v === null || typeof v !== 'object') return v;
  if (depth >= MAX_VALUE_DEPTH) return '...';
  if (Array.isArray(v)) return v.map((x) => boundedValue(x, depth + 1));
  return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, boundedValue(x, depth + 1)]));
}

/** The value found at `path`, as a problem keeps it (cut to a readable depth). */
function foundAt(root: unknown, path: readonly PropertyKey[]): unknown {
  return boundedValue(valueAt(root, path));
}

/** One line per problem: `path = value: message`. */
export function formatProblems(problems: Problem[]): string {
  return problems
    .map((p) => `${p.path || '(input)'} = ${describeValue(p.value)}: ${p.message}`)
    .join('\n');
}

/**
 * Turns zod issues into problems that name the field, the value found and the allowed range.
 * Union issues where every branch failed on type are summarised in one line.
 */
export function problemsFromZod(issues: readonly z.core.$ZodIssue[], input: unknown, prefix: PropertyKey[] = []): Problem[] {
  const out: Problem[] = [];
  for (const issue of issues) {
    const path = [...prefix, ...issue.path];
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) {
        out.push({ path: formatPath([...path, key]), value: foundAt(input, [...issue.path, key]), message: 'is not a known field (check the spelling)' });
      }
      continue;
    }
    if (issue.code === 'invalid_union') {
      const branches = issue.errors;
      if (branches.length === 0) {
        // A discriminated union whose tag (e.g. growth form, habitat) matched no branch: zod puts the tag in the path.
        const value = foundAt(input, issue.path);
        const options = 'options' in issue && Array.isArray(issue.options) ? (issue.options as unknown[]) : [];
        out.push({
          path: formatPath(path),
          value,
          message:
            value === undefined
              ? `is required${options.length ? ` (one of ${options.map((o) => JSON.stringify(o)).join(', ')})` : ''}`
              : options.length
                ? `must be one of ${options.map((o) => JSON.stringify(o)).join(', ')}`
                : issue.message,
        });
        continue;
      }
      const typeOnly = branches.every((b) => b.length === 1 && b[0].code === 'invalid_type' && b[0].path.length === 0);
      if (typeOnly) {
        const value = foundAt(input, issue.path);
        out.push({
          path: formatPath(path),
          value,
          message:
            value === undefined
              ? 'is required'
              : `${branches[0][0].message}, or a distribution {"dist": "uniform"|"triangular"|"lognormal", ...}`,
        });
        continue;
      }
      // Report the branch that got furthest (fewest type errors at its root).
      const best = [...branches].sort((a, b) => score(a) - score(b))[0];
      out.push(...problemsFromZod(best, valueAt(input, issue.path), path));
      continue;
    }
    const value = foundAt(input, issue.path);
    let message = issue.message;
    if (issue.code === 'invalid_type' && value === undefined) message = 'is required';
    if (issue.code === 'invalid_value' && 'values' in issue) {
      message = `must be one of ${(issue.values as unknown[]).map((v) => JSON.stringify(v)).join(', ')}`;
    }
    out.push({ path: formatPath(path), value, message });
  }
  return out;
}

/**
 * A problem's value as JSON can carry it: JSON has no Infinity or NaN (a number such as 1e309 parses to
 * Infinity and would otherwise be sent back as null), so those become the text "Infinity", "NaN".
 */
export function jsonSafeValue(v: unknown): unknown {
  if (typeof v === 'number' && !Number.isFinite(v)) return String(v);
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) return v.map(jsonSafeValue);
  return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, jsonSafeValue(x)]));
}

function score(branch: readonly z.core.$ZodIssue[]): number {
  return branch.reduce((s, i) => s + (i.code === 'invalid_type' && i.path.length === 0 ? 100 : 1), 0);
}
