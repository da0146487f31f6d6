import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText, pointScenario } from '../../../server/model/scenario.ts';
import { parseSurveyCsv } from '../../../server/model/survey.ts';
import { adoptFit, fitSurvey } from '../../../server/analysis/calibration/fit.ts';
import { withValue } from '../../../server/analysis/calibration/model-fit.ts';
import { normalCdf } from '../../../server/analysis/calibration/statistics.ts';
import { coarsened, evaluatePoint, runEnsemble } from '../../../server/analysis/ensemble/ensemble.ts';
import { TRANSECT_DRAW_FACTOR } from '../../../server/analysis/ensemble/plan.ts';
import { RECORDS_FILE, SCENARIO_FILE, TRUTH } from '../../../scenarios/generate-survey-records.ts';

/**
 * The fitted range, fed into the ensemble, moves P(holds) as the narrowed range implies. With one uncertain
 * parameter, the option holds within the horizon exactly when D lies below a threshold D* (the front is
 * slower the smaller D is), so P(holds) = F(D*) for the distribution F of D; a one-dimensional Latin
 * hypercube of n draws has exactly one draw per stratum of probability 1/n, so the ensemble's estimate is
 * within 1/n of F(D*) (McKay, Beckman & Conover 1979).
 */
describe('fitted ranges in the ensemble (demo)', () => {
  const DRAWS = 20;
  const base = parseScenarioText(readFileSync(SCENARIO_FILE, 'utf8'));
  // The edge preference held at one value so that D is the only uncertain parameter.
  const prior = parseScenario({ ...base, pest: { ...base.pest, edgePreferenceOpen: TRUTH.edgePreferenceOpen }, uncertainty: { draws: DRAWS, seed: 3, criticalWidth: false } });
  const fit = fitSurvey(prior, parseSurveyCsv(readFileSync(RECORDS_FILE, 'utf8')), { start: TRUTH.start });
  const adopted = parseScenario(adoptFit(prior, fit));
  // The demo's pest does not kill its hosts, and over the prior's range the crossing comes earlier the larger D
  // is (the bisection's end checks below fail otherwise), so one threshold D* separates holds from crossed.
  const factor = prior.uncertainty!.resolutionFactor ?? TRANSECT_DRAW_FACTOR;
  const holds = (d: number) => evaluatePoint(coarsened(withValue(pointScenario(prior), ['pest', 'diffusionHost'], d), factor), { criticalWidth: false }).options[0].crossingYears === null;

  it('P(holds) with the prior and with the fitted range both equal F(D*) within one Latin-hypercube stratum', () => {
    let lo = 0.1;
    let hi = 1.5;
    expect(holds(lo)).toBe(true);
    expect(holds(hi)).toBe(false);
    for (let k = 0; k < 12; k++) {
      const m = 0.5 * (lo + hi);
      if (holds(m)) lo = m;
      else hi = m;
    }
    const dStar = 0.5 * (lo + hi);
    const prd = prior.pest.diffusionHost as { dist: 'uniform'; min: number; max: number };
    const fd = adopted.pest.diffusionHost as { dist: 'lognormal'; median: number; spread: number };
    expect(fd.dist).toBe('lognormal');
    const expectedPrior = (dStar - prd.min) / (prd.max - prd.min);
    const expectedFit = normalCdf(Math.log(dStar / fd.median) / Math.log(fd.spread));
    const pPrior = runEnsemble(prior).options[0].holdsWithinHorizon.p;
    const pFit = runEnsemble(adopted).options[0].holdsWithinHorizon.p;
    console.log(`D* = ${dStar.toFixed(3)} km²/yr; P(holds) prior ${pPrior} (F(D*) = ${expectedPrior.toFixed(3)}), fitted ${pFit} (F(D*) = ${expectedFit.toFixed(3)}), fitted range ${fit.parameters[0].interval90?.map((x) => x.toFixed(3)).join('–')}`);
    // The fitted range lies below D*: the narrowed uncertainty makes "holds" nearly certain.
    expect(fit.parameters[0].interval90![1]).toBeLessThan(dStar);
    expect(pFit).toBeGreaterThan(pPrior + 0.3);
    // 1/n for the stratification, plus one more stratum for draws that land within the bisection's tolerance of D*.
    expect(Math.abs(pPrior - expectedPrior)).toBeLessThanOrEqual(2 / DRAWS);
    expect(Math.abs(pFit - expectedFit)).toBeLessThanOrEqual(2 / DRAWS);
  });
});
