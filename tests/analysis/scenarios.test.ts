import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { evaluateScenario } from '../../server/analysis/evaluate.ts';

const dir = new URL('../../scenarios/', import.meta.url);
const files = readdirSync(dir).filter((f) => f.endsWith('.json'));

/** The outcome each demo exists to show, option by option (scenario order). */
const EXPECTED_VERDICTS: Record<string, string[]> = {
  'clearing-holds.json': ['holds', 'delays', 'marginal'],
  'clearing-delays.json': ['delays', 'delays'],
  'clearing-speeds-up.json': ['speeds-up'],
  'clearing-not-crossed.json': ['not-crossed', 'holds'],
};

describe('demo scenarios', () => {
  it('there are at least three', () => {
    expect(files.length).toBeGreaterThanOrEqual(3);
  });
  for (const f of files) {
    it(`${f} validates, states its purpose, is marked illustrative, runs and reaches its verdicts`, () => {
      const s = parseScenarioText(readFileSync(new URL(f, dir), 'utf8'));
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
    });
  }
});
