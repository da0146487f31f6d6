import { describe, expect, it } from 'vitest';
import { surveyFitChart, type SurveyFitChartInput } from '../../../server/report/charts/survey-fit.ts';
import { texts } from '../../helpers/svg.ts';

/** A hand-made fit: records 2019–2021 at 1–5 km, a front line of 1 km/yr from the edge at 1 km. */
function input(): SurveyFitChartInput {
  const residuals = [2019, 2020, 2021].flatMap((year, k) => [1, 2, 3, 4, 5].map((atKm) => ({ row: `row ${atKm}`, year, atKm, detected: atKm <= 2 + k, predicted: 0.5, residual: 0 })));
  return {
    diagnostics: { residuals, byYear: [], largestResidual: 0, identifiable: [], notIdentifiable: [] },
    flagged: [{ index: 99, row: 'row 99 <script>', year: 2021, atKm: 12, aheadKm: 8, sentence: 'far ahead' }],
    model: { logLik: 0, startYear: 2017, startAtBound: false, detectionChance: 0.6, runs: 1, wallMs: 1, cellKm: 0.1, stepYears: 0.1, fronts: [2019, 2020, 2021].map((year, k) => ({ year, bestKm: 2 + k, lowKm: 1.8 + k, highKm: 2.3 + k })) },
    front: { direction: 1, edgeKm: 1, years: [], flagged: [], kmPerYear: 1, standardError: 0.1, degreesOfFreedom: 1, interval90: [0.5, 1.5], residuals: [], referenceYear: 2019, interceptKm: 1, message: '' },
  };
}

describe('surveyFitChart', () => {
  const chart = surveyFitChart(input())!;
  it('has a title, a reading hint and axis titles with units', () => {
    expect(chart.title).toMatch(/Survey records/);
    expect(chart.hint.length).toBeGreaterThan(20);
    const t = texts(chart.svg).map((x) => x.text);
    expect(t).toContain('survey year');
    expect(t).toContain('position along the transect (km)');
    expect(t).toContain('possible human-carried introduction (left out)');
  });
  it('no NaN, and the year axis is to scale (tick spacing equal per year)', () => {
    expect(chart.svg).not.toMatch(/NaN/);
    const ticks = texts(chart.svg).filter((x) => /^20(19|20|21)$/.test(x.text));
    expect(ticks.map((x) => x.text)).toEqual(['2019', '2020', '2021']);
    expect(ticks[2].x - ticks[1].x).toBeCloseTo(ticks[1].x - ticks[0].x, 6);
  });
  it('null without records', () => {
    expect(surveyFitChart({ ...input(), diagnostics: { ...input().diagnostics, residuals: [] } })).toBeNull();
  });
});
