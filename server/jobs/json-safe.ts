/**
 * JSON that keeps every double: ±Infinity, NaN and −0 become `{"$float": "Infinity" | "-Infinity" | "NaN" |
 * "-0"}` on the way out and come back as the same numbers. Plain JSON would turn them into null or 0, and a
 * critical width of +∞ ("no finite width pins the front") would then read as null ("not computed"). Task
 * payloads and results that cross a process or machine boundary (queue) or go to disk (checkpoints) use it,
 * so a result assembled from stored or remote pieces is bit-identical to one computed in this thread.
 */
const MARK = '$float';

function encodeNumber(x: number): unknown {
  if (Number.isFinite(x)) return Object.is(x, -0) ? { [MARK]: '-0' } : x;
  return { [MARK]: Number.isNaN(x) ? 'NaN' : x > 0 ? 'Infinity' : '-Infinity' };
}

/** A deep copy of `value` in which every non-finite number and −0 is replaced by its marker object. */
export function toJsonSafe(value: unknown): unknown {
  if (typeof value === 'number') return encodeNumber(value);
  if (Array.isArray(value)) return value.map(toJsonSafe);
  if (value !== null && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(value as Record<string, unknown>)) if (v !== undefined) out[k] = toJsonSafe(v);
    return out;
  }
  return value;
}

/** Inverse of toJsonSafe. */
export function fromJsonSafe<T = unknown>(value: unknown): T {
  if (Array.isArray(value)) return value.map((v) => fromJsonSafe(v)) as T;
  if (value !== null && typeof value === 'object') {
    const o = value as Record<string, unknown>;
    const keys = Object.keys(o);
    if (keys.length === 1 && keys[0] === MARK && typeof o[MARK] === 'string') {
      const t = o[MARK];
      return (t === '-0' ? -0 : t === 'NaN' ? NaN : t === 'Infinity' ? Infinity : t === '-Infinity' ? -Infinity : (() => { throw new Error(`bad ${MARK} marker ${t}`); })()) as T;
    }
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(o)) out[k] = fromJsonSafe(v);
    return out as T;
  }
  return value as T;
}

/** JSON text of a value with every double kept. */
export const stringifySafe = (value: unknown): string => JSON.stringify(toJsonSafe(value));
/** Parses text written by stringifySafe. */
export const parseSafe = <T = unknown>(text: string): T => fromJsonSafe<T>(JSON.parse(text));
