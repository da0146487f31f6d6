/**
 * The wall-time message names what made the run long: the grid (cells), a high mortality off the host
 * forest (short time steps), or the horizon — not always the horizon (regression).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScenario, type ScenarioInput } from '../../server/model/scenario.ts';
import { longRunProblem, runCost } from '../../server/web/run-cost.ts';

const quick = (): ScenarioInput => JSON.parse(readFileSync(new URL('../web/fixtures/scenarios/quick-check.json', import.meta.url), 'utf8'));

describe('longRunProblem', () => {
  it('names the cells of a fine grid', () => {
    const s = quick();
    s.numerics = { cellM: 1 };
    const p = longRunProblem(parseScenario(s), 5);
    expect(p.path).toBe('numerics.cellM');
    expect(p.message).toMatch(/up to \d+ grid cells/);
  });
  it('names the mortality that forces short steps', () => {
    const s = quick();
    (s.pest as Record<string, unknown>).mortalityOpen = 1000;
    s.horizonYears = 200;
    const sc = parseScenario(s);
    const c = runCost(sc);
    expect(c.stepSetBy).toBe('mortality');
    const p = longRunProblem(sc, 5);
    expect(p.path).toBe('pest.mortalityOpen');
    expect(p.value).toBe(1000);
  });
  it('names the horizon when many ordinary steps make it long', () => {
    const s = quick();
    s.horizonYears = 200;
    (s.pest as Record<string, unknown>).mortalityOpen = 0.1;
    const sc = parseScenario(s);
    const p = longRunProblem(sc, 5);
    expect(runCost(sc).stepSetBy).toBe('growth');
    expect(p.path).toBe('horizonYears');
  });
});
