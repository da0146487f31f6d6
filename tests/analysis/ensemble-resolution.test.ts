import { describe, expect, it } from 'vitest';
import { parseScenario } from '../../server/model/scenario.ts';
import { coarsened, drawScenario, drawToleranceM, evaluatePoint, planEnsemble } from '../../server/analysis/ensemble.ts';
import { smallEnsembleScenario } from './ensemble-fixture.ts';

/**
 * Accuracy cost of running ensemble draws at twice the automatic cell size and step (uncertainty.resolutionFactor,
 * default 2; README "Performance"). Internal comparison against the same draws at the full automatic resolution.
 * Bound: the same holds / pinned outcome, critical widths within two bisection tolerances (the bracket itself is
 * only known to one tolerance), baseline arrivals within 0.1 yr.
 */
describe('ensemble draws at coarsened resolution', () => {
  it('give the same verdicts, critical widths within two tolerances and arrivals within 0.1 yr', () => {
    const s = parseScenario(smallEnsembleScenario({ numerics: {}, transport: undefined, uncertainty: { draws: 8, seed: 11, criticalWidth: true } }));
    const plan = planEnsemble(s);
    const rows: string[] = [];
    for (const i of [0, 3, 6]) {
      const fine = drawScenario(s, plan, i).point;
      const full = { ...fine, numerics: {} };
      const a = evaluatePoint(full);
      const b = evaluatePoint(coarsened(full, 2));
      const tol = drawToleranceM(full, full.barrier!.options[0].widthM);
      const wa = a.options[0].criticalWidthM;
      const wb = b.options[0].criticalWidthM;
      rows.push(`draw ${i}: W* ${wa?.toFixed(0)} vs ${wb?.toFixed(0)} m (tolerance ${tol.toFixed(0)}), pinned ${a.options[0].pinned}/${b.options[0].pinned}, baseline arrival ${a.baselineArrivals[0]?.toFixed(2)} vs ${b.baselineArrivals[0]?.toFixed(2)}`);
      expect(b.options[0].pinned).toBe(a.options[0].pinned);
      expect(b.options[0].crossingYears === null).toBe(a.options[0].crossingYears === null);
      if (wa !== null && Number.isFinite(wa)) expect(Math.abs((wb ?? NaN) - wa)).toBeLessThanOrEqual(2 * tol + 1e-9);
      else expect(wb).toBe(wa);
      a.baselineArrivals.forEach((x, k) => {
        if (x === null) expect(b.baselineArrivals[k]).toBeNull();
        else expect(Math.abs((b.baselineArrivals[k] ?? NaN) - x)).toBeLessThan(0.1);
      });
    }
    console.log(rows.join('\n'));
  });
});
