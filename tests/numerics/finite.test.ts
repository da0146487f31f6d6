/**
 * A non-finite number never becomes a verdict (regression: a 1e-15 km clearing, a 1e-12 m option and an edge
 * preference of 5e-324 gave NaN densities and runs reported "completed" with verdicts). The checks
 * (server/numerics/finite.ts) run in every time loop and before every run; the schema refuses the inputs.
 * IEEE 754 facts used: NaN − NaN and ∞ − ∞ are NaN (IEEE 754-2019 §6.2, §7.2).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { checkFiniteCoefficients, checkFiniteResult, checkFiniteState, firstNonFinite, NonFiniteError, nonFiniteNumbers } from '../../server/numerics/finite.ts';
import { runTimeLoop, type FieldStepper } from '../../server/numerics/time-loop.ts';
import { parseScenario, type Scenario } from '../../server/model/scenario.ts';
import { ScenarioError } from '../../server/model/errors.ts';
import { evaluateScenarioParallel } from '../../server/jobs/parallel.ts';
import { ComputationError } from '../../server/analysis/finite-guard.ts';

const quickRaw = () => JSON.parse(readFileSync(new URL('../fixtures/quick-scenario.json', import.meta.url), 'utf8'));

describe('finite checks', () => {
  it('firstNonFinite finds NaN and both infinities, and nothing else', () => {
    expect(firstNonFinite(new Float64Array([0, -0, 5e-324, Number.MAX_VALUE, -1]))).toBe(-1);
    expect(firstNonFinite([1, 2, NaN])).toBe(2);
    expect(firstNonFinite([Infinity])).toBe(0);
    expect(firstNonFinite([1, -Infinity])).toBe(1);
  });

  it('the time loop stops with a NonFiniteError naming the field, the time and the cell', () => {
    let k = 0;
    const poisoning: FieldStepper = {
      step(u) {
        if (++k === 70) u[3] = NaN;
      },
      counters: () => ({ diffusion: { solves: 0 }, reaction: { substeps: 0 } }) as unknown as ReturnType<FieldStepper['counters']>,
    };
    const run = () => runTimeLoop(poisoning, new Float64Array(8), new Float64Array(8).fill(1), { tEnd: 10, dt: 0.01 });
    expect(run).toThrow(NonFiniteError);
    k = 0;
    expect(run).toThrow(/the insect density became NaN at t = 1\.280 yr in cell 4 of 8/);
    expect(() => checkFiniteState([0], [Infinity], 2)).toThrow(/host fraction became Infinity/);
  });

  it('coefficients that would turn into NaN are named with their place before the run', () => {
    const base = { grid: { centersKm: [0.5, 1.5], widthsKm: [1, 1] }, diffusionAtCells: [1, 1], residenceAtCells: [1, 1], mortalityAtCells: [0, 1] };
    expect(() => checkFiniteCoefficients(base)).not.toThrow();
    expect(() => checkFiniteCoefficients({ ...base, residenceAtCells: [1, Infinity] })).toThrow(/edge weight at 1\.50000 km is Infinity.*edge preference/);
    expect(() => checkFiniteCoefficients({ ...base, grid: { centersKm: [0, 0], widthsKm: [1, 0] } })).toThrow(/too narrow to compute/);
    expect(() => checkFiniteCoefficients({ ...base, mortalityAtCells: [0, NaN] })).toThrow(/mortality/);
  });

  it('a result document with a NaN anywhere is refused with its path', () => {
    expect(nonFiniteNumbers({ a: [1, { b: NaN }], c: null, d: new Float64Array([0, Infinity]) })).toEqual([
      { path: 'a[1].b', value: NaN },
      { path: 'd[1]', value: Infinity },
    ]);
    expect(() => checkFiniteResult({ host: { remainingShare: NaN } })).toThrow(/host\.remainingShare = NaN/);
  });
});

describe('the inputs that gave NaN verdicts', () => {
  const refused = (edit: (s: ReturnType<typeof quickRaw>) => void) => {
    const s = quickRaw();
    edit(s);
    try {
      parseScenario(s);
    } catch (e) {
      return (e as ScenarioError).problems.map((p) => `${p.path}: ${p.message}`);
    }
    return [];
  };

  it('are refused by the schema with the field named (widths ≥ 1 m, lengths ≥ 1 m, edge preference in [1e-6, 1 − 1e-6])', () => {
    expect(refused((s) => (s.barrier.options[0].widthM = 1e-12))).toEqual(['barrier.options[0].widthM: must be ≥ 1 and ≤ 100000 m']);
    expect(refused((s) => s.transect.segments.splice(1, 0, { habitat: 'clearing', lengthKm: 1e-15 }))).toEqual(['transect.segments[1].lengthKm: must be ≥ 0.001 and ≤ 5000 km']);
    expect(refused((s) => (s.pest.edgePreferenceOpen = 5e-324))).toEqual(['pest.edgePreferenceOpen: must be ≥ 0.000001 and ≤ 0.999999']);
    expect(refused((s) => (s.pest.edgePreferenceOpen = 1 - 1e-17))).toEqual(['pest.edgePreferenceOpen: must be ≥ 0.000001 and ≤ 0.999999']);
    expect(refused((s) => (s.barrier.options[0].widthM = 1))).toEqual([]);
    expect(refused((s) => (s.pest.edgePreferenceOpen = 1e-6))).toEqual([]);
  });

  it('and, past the schema (a scenario built in code), the run fails naming the cause instead of a verdict', async () => {
    const s = parseScenario(quickRaw()) as Scenario;
    (s.pest as { edgePreferenceOpen: number }).edgePreferenceOpen = 5e-324;
    await expect(evaluateScenarioParallel(s)).rejects.toThrow(ComputationError);
    await expect(evaluateScenarioParallel(s)).rejects.toThrow(/The computation broke down: the edge weight at 6\.\d+ km is Infinity/);
    const w = parseScenario(quickRaw()) as Scenario;
    w.barrier!.options[0].widthM = 1e-12;
    await expect(evaluateScenarioParallel(w)).rejects.toThrow(/too narrow to compute/);
  });

  it('the edge preference at the limits of the new range runs to a finite verdict', async () => {
    for (const a of [1e-6, 0.999999]) {
      const raw = quickRaw();
      raw.pest.edgePreferenceOpen = a;
      raw.horizonYears = 4;
      const doc = await evaluateScenarioParallel(parseScenario(raw));
      expect(nonFiniteNumbers(doc)).toEqual([]);
    }
  });
});
