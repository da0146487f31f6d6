/**
 * Result documents compared across runners: everything but the run date, wall times, thread counts and where the draws ran
 * (which say when and how, not what) must be identical, bit for bit.
 */
import { stringifySafe } from '../../server/jobs/json-safe.ts';

const VOLATILE = new Set(['runAt', 'wallMs', 'threads', 'ranOn']);

/** The document with its volatile fields removed, as JSON text that keeps ±∞, NaN and −0. */
export function comparable(doc: unknown): string {
  const strip = (v: unknown): unknown => {
    if (Array.isArray(v)) return v.map(strip);
    if (v !== null && typeof v === 'object') {
      const out: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(v as Record<string, unknown>)) if (!VOLATILE.has(k)) out[k] = strip(x);
      return out;
    }
    return v;
  };
  return stringifySafe(strip(doc));
}
