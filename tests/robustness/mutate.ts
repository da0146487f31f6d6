/**
 * Seeded generator of hostile inputs for the robustness harness: mutated scenario texts (field values at and
 * beyond every range edge, wrong types, removed or duplicated keys, prototype keys, control characters and
 * scripts the briefing cannot draw, deep nesting, truncation, byte-order marks), hostile form bodies and
 * hostile requests. The same seed gives the same inputs on any machine (server/numerics/rng.ts).
 * Used by tests/robustness/fuzz.test.ts (quick, CI) and bench/robustness/fuzz.ts (long).
 */
import { FIELDS } from '../../server/model/fields.ts';
import { makeRng, type Rng } from '../../server/numerics/rng.ts';

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

/** Numbers that have broken numerical code before: zero, signs, float limits, denormals. */
const EXTREME_NUMBERS = [0, -0, -1, 1, 1e-300, 5e-324, 1e-15, 1e-12, 1e-9, 1e-6, 0.5, 0.999999, 1 - 1e-16, 1e6, 1e12, 1e300, Number.MAX_VALUE, 2 ** 53 + 1];
/** Texts that have broken text handling before. */
const HOSTILE_STRINGS = [
  '',
  '   ',
  '\u0000',
  'bell\u0007',
  '\u001b[31mred\u001b[0m',
  '\u001b]0;title\u0007',
  'a\u202eb',
  '<script>alert(1)</script>',
  '{{title}}',
  '../../etc/passwd',
  '森林',
  'fire 🔥',
  'שלום',
  'x'.repeat(5000),
  '\ud800',
  '%00',
  "'; DROP TABLE scenarios; --",
];
/** Texts typed into a number box of the form. */
const NUMBER_TEXTS = ['1,200', '1 200', '1200 m', '1.2 km', '0,5', '1e-400', '1e400', 'NaN', 'Infinity', '-0', '0x10', '١٢', '5 %', '1.200', '12,000,000', ''];

function pick<T>(rng: Rng, xs: readonly T[]): T {
  return xs[rng.int(xs.length)];
}

/** Paths of the values of a JSON tree down to depth 12 (objects and arrays included); iterative. */
function paths(root: Json): (string | number)[][] {
  const out: (string | number)[][] = [];
  const stack: [Json, (string | number)[]][] = [[root, []]];
  while (stack.length) {
    const [v, at] = stack.pop()!;
    out.push(at);
    if (at.length >= 12) continue;
    if (Array.isArray(v)) v.forEach((x, i) => stack.push([x, [...at, i]]));
    else if (v !== null && typeof v === 'object') for (const [k, x] of Object.entries(v)) stack.push([x, [...at, k]]);
  }
  return out;
}

function getAt(root: Json, path: (string | number)[]): Json {
  let cur: Json = root;
  for (const p of path) cur = (cur as Record<string | number, Json>)[p];
  return cur;
}

function setAt(root: Json, path: (string | number)[], v: Json | undefined): void {
  if (path.length === 0) return;
  let cur: Json = root;
  for (const p of path.slice(0, -1)) cur = (cur as Record<string | number, Json>)[p];
  const last = path[path.length - 1];
  if (v === undefined) {
    if (Array.isArray(cur)) cur.splice(last as number, 1);
    else delete (cur as Record<string, Json>)[last as string];
  } else (cur as Record<string | number, Json>)[last] = v;
}

/** A value at or just beyond an edge of some field's allowed range. */
function rangeEdge(rng: Rng): number {
  const spec = pick(rng, Object.values(FIELDS));
  const lo = spec.min;
  const hi = Number.isFinite(spec.max) ? spec.max : 1e6;
  const eps = (x: number) => Math.max(Math.abs(x) * 1e-9, 1e-12);
  return pick(rng, [lo, lo + eps(lo), lo - eps(lo), hi, hi - eps(hi), hi + eps(hi), (lo + hi) / 2]);
}

/** One mutation of a scenario object, in place; returns its name (for the report). */
function mutateObject(rng: Rng, s: Json): string {
  const all = paths(s).filter((p) => p.length > 0);
  const p = pick(rng, all);
  const v = getAt(s, p);
  switch (rng.int(9)) {
    case 0:
    case 1: {
      // Most mutations keep the type: numbers at range edges and float extremes, so many scenarios stay valid and run.
      const numeric = all.filter((q) => typeof getAt(s, q) === 'number');
      const q = pick(rng, numeric);
      setAt(s, q, rng.next() < 0.5 ? rangeEdge(rng) : pick(rng, EXTREME_NUMBERS));
      return 'number-edge';
    }
    case 2: {
      const numeric = all.filter((q) => typeof getAt(s, q) === 'number');
      const q = pick(rng, numeric);
      const x = getAt(s, q) as number;
      setAt(s, q, x * pick(rng, [0.5, 2, 10, 0.1, 1.0000001]));
      return 'number-scale';
    }
    case 3:
      setAt(s, p, undefined);
      return 'remove';
    case 4:
      setAt(s, p, pick<Json>(rng, [null, true, 'text', [], {}, [1, 2], { dist: 'uniform', min: 0, max: 1 }, { dist: 'lognormal', median: 1, spread: 0.5 }, -1]));
      return 'type-swap';
    case 5: {
      const texts = all.filter((q) => typeof getAt(s, q) === 'string');
      setAt(s, pick(rng, texts), pick(rng, HOSTILE_STRINGS));
      return 'hostile-text';
    }
    case 6: {
      // A deep nesting or a long array where a value was.
      const depth = pick(rng, [10, 70, 2000]);
      setAt(s, p, JSON.parse(`${'['.repeat(depth)}1${']'.repeat(depth)}`) as Json);
      return 'deep';
    }
    case 7: {
      const arrays = all.filter((q) => Array.isArray(getAt(s, q)) && (getAt(s, q) as Json[]).length > 0);
      if (!arrays.length) return 'none';
      const q = pick(rng, arrays);
      const arr = getAt(s, q) as Json[];
      const n = pick(rng, [2, 9, 60, 600]);
      setAt(s, q, Array.from({ length: n }, () => structuredClone(arr[rng.int(arr.length)])));
      return 'repeat-rows';
    }
    default: {
      if (v !== null && typeof v === 'object' && !Array.isArray(v)) {
        (v as Record<string, Json>)[pick(rng, ['extra', 'Title', 'horizon', 'numerics2'])] = 1;
        return 'unknown-key';
      }
      setAt(s, p, v);
      return 'none';
    }
  }
}

/** One mutation of the text itself (after the object mutations). */
function mutateText(rng: Rng, text: string): { text: string; kind: string } {
  switch (rng.int(10)) {
    case 0:
      return { text: text.slice(0, rng.int(text.length)), kind: 'truncate' };
    case 1:
      return { text: `\ufeff${text}`, kind: 'bom' };
    case 2:
      return { text: text.replace('{', '{"__proto__": {"polluted": 1}, '), kind: 'proto-key' };
    case 3:
      return { text: text.replace('"pest": {', '"pest": {"constructor": {"prototype": {"x": 1}}, '), kind: 'constructor-key' };
    case 4: {
      const m = /"(horizonYears|title)": ("[^"]*"|[0-9.e+-]+)/.exec(text);
      return { text: m ? text.replace(m[0], `${m[0]}, ${m[0]}`) : text, kind: 'duplicate-key' };
    }
    case 5: {
      const at = rng.int(text.length);
      return { text: text.slice(0, at) + pick(rng, [',', '}', '"', '\u0000', '1e999', 'NaN']) + text.slice(at), kind: 'syntax' };
    }
    default:
      return { text, kind: 'none' };
  }
}

/** A mutated scenario text, with the names of the mutations applied. */
export interface MutatedScenario {
  text: string;
  kinds: string[];
}

/**
 * `n` mutated scenario texts from a base scenario object (1–3 object mutations, then possibly one text
 * mutation each), reproducible from `seed`.
 */
export function mutatedScenarios(base: unknown, n: number, seed: number): MutatedScenario[] {
  const rng = makeRng(seed);
  const out: MutatedScenario[] = [];
  for (let i = 0; i < n; i++) {
    const r = rng.child(i);
    const s = structuredClone(base) as Json;
    const kinds: string[] = [];
    const m = 1 + r.int(3);
    for (let k = 0; k < m; k++) kinds.push(mutateObject(r, s));
    const t = mutateText(r, JSON.stringify(s, null, r.next() < 0.5 ? 2 : undefined));
    kinds.push(t.kind);
    out.push({ text: t.text, kinds: kinds.filter((x) => x !== 'none') });
  }
  return out;
}

/** Hostile form bodies for the scenario form: typed number texts, row actions, odd keys. */
export function hostileFormBodies(baseForm: Record<string, string>, n: number, seed: number): Record<string, string>[] {
  const rng = makeRng(seed);
  const keys = Object.keys(baseForm);
  const out: Record<string, string>[] = [];
  for (let i = 0; i < n; i++) {
    const r = rng.child(i);
    const f = { ...baseForm };
    for (let k = 0, m = 1 + r.int(4); k < m; k++) {
      const key = pick(r, keys);
      switch (r.int(5)) {
        case 0:
          f[key] = pick(r, NUMBER_TEXTS);
          break;
        case 1:
          f[key] = pick(r, HOSTILE_STRINGS);
          break;
        case 2:
          f._action = pick(r, ['add:segments', 'remove:segments:0', 'up:sites:0', 'down:options:0', 'remove:segments:9999', 'add:kernel', 'check', 'bogus:x', 'add:segments:1']);
          break;
        case 3:
          f[pick(r, ['__proto__', 'constructor.prototype.x', 'transect.segments[9999].lengthKm', `${key}~kind`, 'a'.repeat(200), '_extra'])] = pick(r, ['1', '{"x":', 'lognormal', '']);
          break;
        default:
          delete f[key];
      }
    }
    out.push(f);
  }
  return out;
}

/** Hostile requests (method, url, headers, body) around the app's routes. */
export function hostileRequests(n: number, seed: number): { method: string; url: string; headers: Record<string, string>; payload?: string }[] {
  const rng = makeRng(seed);
  const urls = [
    '/',
    '/scenarios',
    '/scenarios/demo-quick-check',
    '/scenarios/../../etc/passwd',
    '/scenarios/%2e%2e%2fetc%2fpasswd',
    '/scenarios/%zz',
    `/scenarios/${'9'.repeat(120)}`,
    '/scenarios/demo-quick-check/json',
    '/scenarios/demo-quick-check/edit',
    '/scenarios/999999/delete',
    '/results/nope',
    '/runs/nope',
    '/api/scenarios',
    '/api/scenarios/demo-quick-check',
    '/api/evaluations',
    '/api/evaluations/nope',
    '/api/results?limit=abc',
    '/api/results?limit=1e9',
    '/api/results/nope/briefing.pdf',
    '/assets/../../package.json',
    '/assets/%2e%2e/app.ts',
    '/api/fields',
    '/api/limits',
    '/api/openapi.json',
  ];
  const types = ['application/json', 'application/x-www-form-urlencoded', 'text/plain', 'multipart/form-data', 'multipart/form-data; boundary=x', 'application/json; charset=latin1', 'application/xml'];
  const out: { method: string; url: string; headers: Record<string, string>; payload?: string }[] = [];
  for (let i = 0; i < n; i++) {
    const r = rng.child(i);
    const method = pick(r, ['GET', 'POST', 'PUT', 'DELETE', 'PATCH', 'HEAD', 'OPTIONS']);
    const headers: Record<string, string> = {};
    if (method !== 'GET' && method !== 'HEAD') headers['content-type'] = pick(r, types);
    if (r.next() < 0.2) headers.origin = pick(r, ['http://localhost', 'http://evil.example', 'null']);
    const payload = method === 'GET' || method === 'HEAD' ? undefined : pick(r, ['', '{}', '{"scenarioRef":"demo-quick-check"}', '{"scenarioRef":', 'title=x', `--x\r\nContent-Disposition: form-data; name="file"; filename="a.json"\r\n\r\n{"a":`, '\ufeff{}', 'a=1&a=2&__proto__=1']);
    out.push({ method, url: pick(r, urls), headers, payload });
  }
  return out;
}
