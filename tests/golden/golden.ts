/**
 * Golden result documents of the demo scenarios (scenarios/*.json), stored in tests/golden/*.json.
 * What varies from run to run — the run date, wall times and thread counts — is stripped; everything
 * else must match exactly (see golden.test.ts, and MOVED there for any deliberate, documented change).
 * Regenerate after a deliberate change with `npx tsx tests/golden/update.ts` and say why in the commit.
 */
import type { ResultDocument } from '../../server/analysis/result.ts';

/** Keys whose values differ between identical evaluations (clock, machine). */
export const VOLATILE_KEYS = new Set(['runAt', 'wallMs', 'threads']);

/** A deep copy of a result document without the volatile keys (JSON round trip: what the API sends). */
export function stripVolatile(doc: ResultDocument): unknown {
  return JSON.parse(JSON.stringify(doc, (k, v) => (VOLATILE_KEYS.has(k) ? undefined : v)));
}

export const SCENARIO_DIR = new URL('../../scenarios/', import.meta.url);
export const GOLDEN_DIR = new URL('./', import.meta.url);
