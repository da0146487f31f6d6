import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText, pointScenario } from '../../server/model/scenario.ts';
import { coarsened, drawScenario, drawToleranceM, evaluatePoint, planEnsemble } from '../../server/analysis/ensemble/ensemble.ts';
import { FIELDS } from '../../server/model/fields.ts';
import { smallEnsembleScenario } from './ensemble-fixture.ts';

/**
 * Accuracy cost of running ensemble draws with cells and steps `resolutionFactor` times the automatic choice
 * (default 3; README "Performance"). Internal comparison against the same draws at the full automatic
 * resolution. Bound: the same holds / pinned outcome, critical widths within two bisection tolerances (the
 * bracket itself is only known to one tolerance), arrival and crossing years within 0.1 yr.
 * Measured: critical widths equal or one tolerance apart; arrivals ≤ 0.07 yr (logistic demo, year 34).
 */
const factor = FIELDS.ensembleResolutionFactor.defaultValue;

describe(`ensemble draws at ${factor}× the automatic cell and step`, () => {
  it('strong Allee pest: same verdicts, critical widths within two tolerances, arrivals within 0.1 yr', () => {
    const s = parseScenario(smallEnsembleScenario({ numerics: {}, transport: undefined, uncertainty: { draws: 8, seed: 11, criticalWidth: true } }));
    const plan = planEnsemble(s);
    const rows: string[] = [];
    for (const i of [0, 3, 6]) {
      const full = { ...drawScenario(s, plan, i).point, numerics: {} };
      const a = evaluatePoint(full);
      const b = evaluatePoint(coarsened(full, factor));
      const tol = drawToleranceM(full, full.barrier!.options[0].widthM);
      const wa = a.options[0].criticalWidthM;
      const wb = b.options[0].criticalWidthM;
      rows.push(`draw ${i}: W* ${wa?.toFixed(0)} vs ${wb?.toFixed(0)} m (tolerance ${tol.toFixed(0)}), pinned ${a.options[0].pinned}/${b.options[0].pinned}, baseline arrival ${a.baselineArrivals[0]?.toFixed(3)} vs ${b.baselineArrivals[0]?.toFixed(3)}`);
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

  it('logistic pest (pulled front, the most resolution-sensitive): arrivals and crossings within 0.1 yr', () => {
    const s = pointScenario(parseScenarioText(readFileSync(new URL('../../scenarios/clearing-delays.json', import.meta.url), 'utf8')));
    const a = evaluatePoint(s);
    const b = evaluatePoint(coarsened(s, factor));
    const pairs: [number | null, number | null][] = [
      ...a.baselineArrivals.map((x, k) => [x, b.baselineArrivals[k]] as [number | null, number | null]),
      ...a.options.flatMap((o, m) => [[o.crossingYears, b.options[m].crossingYears] as [number | null, number | null], ...o.arrivals.map((x, k) => [x, b.options[m].arrivals[k]] as [number | null, number | null])]),
    ];
    console.log(`logistic demo, full vs coarsened: ${pairs.map(([x, y]) => `${x?.toFixed(3)}/${y?.toFixed(3)}`).join(', ')}`);
    for (const [x, y] of pairs) {
      expect(y === null).toBe(x === null);
      if (x !== null) expect(Math.abs((y as number) - x)).toBeLessThan(0.1);
    }
  });
});
