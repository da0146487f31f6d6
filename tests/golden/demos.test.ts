/**
 * The demo scenarios (scenarios/*.json): each validates, states its purpose, reaches the verdicts it exists
 * to show, and its result document equals the golden file in tests/golden/ (run date, wall times and thread
 * counts stripped; see golden.ts). A restructuring of the engine must not move a reported number: a
 * difference fails here naming the path. Where a deliberate change moves a number (e.g. a double computation
 * removed), list the path pattern in MOVED with the reason; it is then compared within 1e-9 relative.
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { evaluateScenario } from '../../server/analysis/evaluate.ts';
import { GOLDEN_DIR, SCENARIO_DIR, stripVolatile } from './golden.ts';

const files = readdirSync(SCENARIO_DIR).filter((f) => f.endsWith('.json'));

/** The outcome each demo exists to show, option by option (scenario order). */
const EXPECTED_VERDICTS: Record<string, string[]> = {
  'clearing-holds.json': ['holds', 'delays', 'marginal'],
  'clearing-delays.json': ['delays', 'delays'],
  'clearing-speeds-up.json': ['speeds-up'],
  'clearing-not-crossed.json': ['not-crossed', 'holds'],
};

/**
 * Numbers allowed to move by a deliberate change, with the reason: path pattern (regular expression on the
 * dotted path, e.g. `options.0.crossing.years`) → why. Compared within MOVED_RTOL relative.
 */
const MOVED: { path: RegExp; why: string }[] = [];
const MOVED_RTOL = 1e-9;

/** Every difference between two JSON values, as dotted paths with both values (at most `max`). */
function jsonDiff(a: unknown, b: unknown, path = '', out: string[] = [], max = 20): string[] {
  if (out.length >= max) return out;
  if (typeof a === 'number' && typeof b === 'number') {
    if (a === b) return out;
    const moved = MOVED.find((m) => m.path.test(path));
    if (moved && Math.abs(a - b) <= MOVED_RTOL * Math.max(Math.abs(a), Math.abs(b))) return out;
    out.push(`${path}: ${a} (golden ${b})${moved ? ` — beyond ${MOVED_RTOL} though allowed to move: ${moved.why}` : ''}`);
    return out;
  }
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') {
    if (a !== b) out.push(`${path}: ${JSON.stringify(a)} (golden ${JSON.stringify(b)})`);
    return out;
  }
  if (Array.isArray(a) !== Array.isArray(b)) {
    out.push(`${path}: array vs object`);
    return out;
  }
  const at = (k: string) => (path ? `${path}.${k}` : k);
  const ka = Object.keys(a as object);
  const kb = Object.keys(b as object);
  for (const k of kb) if (!(k in (a as object))) out.push(`${at(k)}: missing (golden has it)`);
  for (const k of ka) if (!(k in (b as object))) out.push(`${at(k)}: new (not in golden)`);
  for (const k of ka) {
    if (k in (b as object)) jsonDiff((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], at(k), out, max);
  }
  return out;
}

describe('demo scenarios', () => {
  it('there are at least three, and each has a golden document', () => {
    expect(files.length).toBeGreaterThanOrEqual(3);
    const golden = readdirSync(GOLDEN_DIR).filter((f) => f.endsWith('.json'));
    expect(golden.sort()).toEqual([...files].sort());
  });
  it('the comparison finds a moved number and a missing key (it can fail)', () => {
    expect(jsonDiff({ a: [1, 2] }, { a: [1, 2 + 1e-12] })).toEqual(['a.1: 2 (golden 2.000000000001)']);
    expect(jsonDiff({ a: 1 }, { a: 1, b: 2 })).toEqual(['b: missing (golden has it)']);
  });
  for (const f of files) {
    it(`${f} validates, states its purpose, is marked illustrative, reaches its verdicts and equals its golden document`, () => {
      const s = parseScenarioText(readFileSync(new URL(f, SCENARIO_DIR), 'utf8'));
      expect(s.description).toMatch(/Purpose:/);
      expect(s.pest.illustrative).toBe(true);
      const doc = evaluateScenario(s);
      expect(doc.baseline.numerics.status).toBe('completed');
      expect(doc.options.length).toBe(s.barrier?.options.length ?? 0);
      expect(doc.cautions.join(' ')).toMatch(/regulator/);
      const expected = EXPECTED_VERDICTS[f];
      if (expected) expect(doc.options.map((o) => o.verdict.kind)).toEqual(expected);
      for (const o of doc.options) {
        // "holds" only with a verified pinning, never because a run ran out of time.
        if (o.verdict.kind === 'holds') expect(o.pinning.verified).toBe(true);
        // A phase-plane width that holds hosts intact is flagged whenever the pest kills its hosts.
        if (o.criticalWidth.phasePlaneM !== null) expect(o.criticalWidth.phasePlaneAssumesIntactHosts).toBe(s.pest.hostKillRate !== 0);
      }
      const golden = JSON.parse(readFileSync(new URL(f, GOLDEN_DIR), 'utf8'));
      expect(jsonDiff(stripVolatile(doc), golden)).toEqual([]);
    });
  }
});
