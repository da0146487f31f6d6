/**
 * The server's limit check counts the cells of every run an evaluation will make with the runs' own
 * resolution policy: for every demo, the counted baseline and option cells equal the `numerics.nCells` the
 * runs report (read from the golden documents, which demos.test.ts keeps equal to fresh evaluations), and a
 * mosaic pattern run larger than the server allows is refused before any compute, quoting the server's limit.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { parseScenarioText, type Scenario } from '../../server/model/scenario.ts';
import { checkLimits, DEFAULT_LIMITS } from '../../server/web/limits.ts';
import { plannedRuns } from '../../server/analysis/evaluate/planned-runs.ts';
import { LimitError } from '../../server/model/errors.ts';
import { GOLDEN_DIR, SCENARIO_DIR } from '../golden/golden.ts';

const demos = readdirSync(SCENARIO_DIR).filter((f) => f.endsWith('.json'));
const load = (f: string): Scenario => parseScenarioText(readFileSync(new URL(f, SCENARIO_DIR), 'utf8'));

function limitError(s: Scenario, maxCells = DEFAULT_LIMITS.maxCells): LimitError | null {
  try {
    checkLimits(s, { ...DEFAULT_LIMITS, maxCells });
    return null;
  } catch (e) {
    if (e instanceof LimitError) return e;
    throw e;
  }
}

describe('cells counted by the limit check', () => {
  for (const f of demos) {
    it(`${f}: baseline and every option as many cells as the run reports`, () => {
      const doc = JSON.parse(readFileSync(new URL(f, GOLDEN_DIR), 'utf8'));
      const runs = plannedRuns(load(f));
      expect(runs[0].label).toBe('baseline');
      expect(runs[0].nCells).toBe(doc.baseline.numerics.nCells);
      doc.options.forEach((o: { name: string; run: { numerics: { nCells: number } } }) => {
        expect(runs.find((r) => r.label === `option "${o.name}"`)!.nCells).toBe(o.run.numerics.nCells);
      });
    });
  }
  it('clearing-delays: the baseline is counted at the resolution shared with the options (1096 cells, not its own 567)', () => {
    expect(plannedRuns(load('clearing-delays.json'))[0].nCells).toBe(1096);
  });
  it('a limit just below the largest run refuses the scenario naming that run; at it, the scenario passes', () => {
    const s = load('clearing-delays.json');
    const largest = Math.max(...plannedRuns(s).map((r) => r.nCells));
    expect(limitError(s, largest)).toBeNull();
    const e = limitError(s, largest - 1)!;
    expect(e.problems[0].path).toBe('numerics.cellM');
    expect(e.problems[0].message).toContain(`gives ${largest} cells`);
  });
});

describe('every run is checked before compute', () => {
  it('a fine cell size that only the mosaic pattern run breaks is refused, quoting the server limit', () => {
    const s = load('clearing-speeds-up.json');
    s.numerics = { ...s.numerics, cellM: 0.5 };
    const runs = plannedRuns(s);
    const largest = runs.reduce((a, b) => (b.nCells > a.nCells ? b : a));
    expect(largest.label).toMatch(/^mosaic /);
    const e = limitError(s)!;
    expect(e).not.toBeNull();
    expect(e.problems[0].message).toContain(`this server allows at most ${DEFAULT_LIMITS.maxCells}`);
    expect(e.problems[0].message).toContain(largest.label);
    expect(e.problems[0].message).not.toContain('limit is 200000');
    console.log(`clearing-speeds-up at 0.5 m cells: ${e.problems[0].message}`);
  });
  it('ensemble draws are counted too (transport-decides: one set of runs per draw)', () => {
    const s = load('transport-decides.json');
    const runs = plannedRuns(s);
    expect(runs.filter((r) => r.label.startsWith('ensemble draw 1,')).length).toBeGreaterThan(0);
    expect(runs.some((r) => r.label.startsWith(`ensemble draw ${s.uncertainty!.draws},`))).toBe(true);
  });
  it('a step count above the engine limit is refused naming the step', () => {
    const s = load('clearing-delays.json');
    s.numerics = { ...s.numerics, stepYears: 1e-5 };
    const e = limitError(s)!;
    expect(e.problems.map((p) => p.path)).toContain('numerics.stepYears');
  });
});
