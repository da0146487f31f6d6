/** The ensemble plan: parameter order and labels, clipping into range, Latin hypercube strata, draws through quantiles. */
import { describe, expect, it } from 'vitest';
import { clipToField, drawScenario, drawToleranceM, drawValues, fieldOfPath, parameterLabel, planEnsemble } from '../../../server/analysis/ensemble/plan.ts';
import { FIELDS, type FieldSpec } from '../../../server/model/fields.ts';
import { parseScenario, pointScenario } from '../../../server/model/scenario.ts';
import { normalQuantile } from '../../../server/model/quantity.ts';
import { expectAllClose } from '../../helpers/close.ts';

// Invented scenario with three distributions (two pest values and one segment's stocking).
const scenario = parseScenario({
  title: 'plan test (invented)',
  pest: {
    name: 'plan test pest (invented)',
    diffusionHost: { dist: 'uniform', min: 0.5, max: 1.5 },
    diffusionOpen: 1,
    edgePreferenceOpen: 0.5,
    hostKillRate: 0,
    mortalityOpen: { dist: 'lognormal', median: 2, spread: 1.5 },
    growth: { form: 'logistic', rate: 1 },
  },
  transect: { originKm: 0, segments: [{ habitat: 'host-forest', name: 'Test stand', lengthKm: 10, stocking: { dist: 'triangular', min: 0.5, mode: 0.8, max: 1 }, stemsPerHa: 400 }] },
  infestation: { fromKm: 0, toKm: 1, density: 1 },
  horizonYears: 5,
  uncertainty: { draws: 40, seed: 7, resolutionFactor: 2 },
});

describe('planEnsemble', () => {
  const plan = planEnsemble(scenario);
  it('parameters depth first in key order, with their field specs and labels', () => {
    expect(plan.parameters.map((p) => p.pathText)).toEqual(['pest.diffusionHost', 'pest.mortalityOpen', 'transect.segments[0].stocking']);
    expect(fieldOfPath(['pest', 'growth', 'rate'])).toBe(FIELDS.growthRate);
    expect(() => fieldOfPath(['pest', 'noSuchField'])).toThrow(/no field spec/);
    expect(parameterLabel(scenario, ['transect', 'segments', 0, 'stocking'])).toMatch(/\("Test stand"\)$/);
  });
  it('a Latin hypercube: each parameter has exactly one draw in each of the 40 strata', () => {
    expect(plan.draws).toBe(40);
    for (let j = 0; j < 3; j++) {
      const strata = Array.from({ length: 40 }, (_, i) => Math.floor(plan.unit[i * 3 + j] * 40)).sort((a, b) => a - b);
      expect(strata).toEqual(Array.from({ length: 40 }, (_, i) => i));
    }
  });
  it('draw values are the distributions’ quantiles at the unit design (formulas written out here)', () => {
    for (const i of [0, 17, 39]) {
      const [a, b, c] = [plan.unit[i * 3], plan.unit[i * 3 + 1], plan.unit[i * 3 + 2]];
      const tri = c < 0.6 ? 0.5 + Math.sqrt(c * 0.5 * 0.3) : 1 - Math.sqrt((1 - c) * 0.5 * 0.2); // mode at (0.8 − 0.5)/(1 − 0.5) = 0.6
      const expected = [0.5 + a, 2 * 1.5 ** normalQuantile(b), tri];
      expectAllClose(drawValues(plan, i).values, expected, { rtol: 1e-12 });
    }
  });
  it('without distributions the plan is one draw', () => {
    const plain = parseScenario({ ...JSON.parse(JSON.stringify(scenario)), pest: { ...scenario.pest, diffusionHost: 1, mortalityOpen: 2 }, transect: { originKm: 0, segments: [{ habitat: 'host-forest', lengthKm: 10, stocking: 1, stemsPerHa: 400 }] } });
    expect(planEnsemble(plain).draws).toBe(1);
  });
  it('drawScenario: the point scenario holds the draw and the central values elsewhere', () => {
    const d = drawScenario(scenario, plan, 3);
    expect(d.point.pest.diffusionHost).toBe(d.values[0]);
    expect((d.point.transect.segments[0] as { stocking: number }).stocking).toBe(d.values[2]);
    expect(d.point.pest.edgePreferenceOpen).toBe(0.5);
  });
});

describe('clipToField and drawToleranceM', () => {
  it('values outside a field are moved to its bounds (1e-9 inside an exclusive bound)', () => {
    const inclusive: FieldSpec = FIELDS.edgePreferenceOpen; // [1e-6, 0.999999], bounds allowed
    expect(clipToField(inclusive, 0.3)).toBe(0.3);
    expect(clipToField(inclusive, -2)).toBe(1e-6);
    expect(clipToField(inclusive, 1.5)).toBe(0.999999);
    const exclusive: FieldSpec = { ...inclusive, min: 0, max: 50, minExclusive: true, maxExclusive: true };
    expect(clipToField(exclusive, 0)).toBe(1e-9); // 0 + 1e-9 × max(1, |0|)
    expect(clipToField(exclusive, 70)).toBe(50 - 1e-9 * 50);
  });
  it('tolerance: the scenario’s (default 10 m) or 2 % of the width, whichever is larger', () => {
    const p = pointScenario(scenario);
    expect(drawToleranceM(p, 300)).toBe(10);
    expect(drawToleranceM(p, 1000)).toBe(20);
  });
});
