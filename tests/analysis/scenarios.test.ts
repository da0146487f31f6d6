import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { evaluateScenario } from '../../server/analysis/evaluate.ts';

const dir = new URL('../../scenarios/', import.meta.url);
const files = readdirSync(dir).filter((f) => f.endsWith('.json'));

describe('demo scenarios', () => {
  it('there are at least three', () => {
    expect(files.length).toBeGreaterThanOrEqual(3);
  });
  for (const f of files) {
    it(`${f} validates, states its purpose, is marked illustrative and runs`, () => {
      const s = parseScenarioText(readFileSync(new URL(f, dir), 'utf8'));
      expect(s.description).toMatch(/Purpose:/);
      expect(s.pest.illustrative).toBe(true);
      const doc = evaluateScenario(s);
      expect(doc.baseline.numerics.status).toBe('completed');
      expect(doc.options.length).toBe(s.barrier?.options.length ?? 0);
      expect(doc.cautions.join(' ')).toMatch(/regulator/);
    });
  }
});
