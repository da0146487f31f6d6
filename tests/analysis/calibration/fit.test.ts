import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText, pointScenario, type ScenarioInput } from '../../../server/model/scenario.ts';
import { parseSurveyCsv, parseSurveyRecords, SurveyError } from '../../../server/model/survey.ts';
import { adoptFit, fitSurvey } from '../../../server/analysis/calibration/fit.ts';
import { drawRecords, truthRun } from '../../../server/analysis/calibration/synthetic.ts';
import { makeRng } from '../../../server/numerics/rng.ts';
import { RECORDS_FILE, SCENARIO_FILE, TRUTH } from '../../../scenarios/generate-survey-records.ts';

/** A small invented logistic pest on 30 km of host forest (truth D = 0.4 km²/yr, r = 0.8 /yr). */
const SMALL: ScenarioInput = {
  title: 'calibration test (invented)',
  pest: { name: 'test borer (invented)', illustrative: true, diffusionHost: 0.4, diffusionOpen: 0.8, edgePreferenceOpen: 0.8, growth: { form: 'logistic', rate: 0.8 }, hostKillRate: 0.5, mortalityOpen: 2 },
  transect: { segments: [{ habitat: 'host-forest', lengthKm: 30, stocking: 1, stemsPerHa: 400 }] },
  infestation: { fromKm: 0, toKm: 1 },
  horizonYears: 15,
};
const START = { fromKm: 0, toKm: 1, density: 1 };
const DESIGN = { years: [2019, 2020, 2021, 2022, 2023, 2024, 2025], positionsKm: Array.from({ length: 20 }, (_, k) => 1 + k) };

describe('recovery of the movement rate from engine-simulated records with detection noise', () => {
  const truth = parseScenario(SMALL);
  const run = truthRun(pointScenario(truth), START, 2016, DESIGN);
  // The scenario the team would have: the movement rate only guessed (wrong by 2.5×).
  const guessed = parseScenario({ ...SMALL, pest: { ...SMALL.pest, diffusionHost: 1 } });
  // Fixed seeds; the bench (bench/calibration.bench.ts) measures the coverage over ≥ 200 replicates.
  for (const seed of [101, 102, 103]) {
    it(`replicate ${seed}: the 90 % range covers the true 0.4 km²/yr and the estimate is within 50 %`, () => {
      const records = drawRecords(run, 0.6, makeRng(seed));
      const fit = fitSurvey(guessed, parseSurveyRecords(records));
      const d = fit.parameters[0];
      console.log(`seed ${seed}: D = ${d.estimate?.toFixed(3)} (${d.interval90?.map((x) => x.toFixed(3)).join('–')}), ${fit.model.runs} runs, ${fit.model.wallMs} ms`);
      expect(d.path).toBe('pest.diffusionHost');
      expect(d.identifiable).toBe(true);
      expect(d.interval90![0]).toBeLessThan(0.4);
      expect(d.interval90![1]).toBeGreaterThan(0.4);
      expect(Math.abs((d.estimate as number) / 0.4 - 1)).toBeLessThan(0.5);
      expect(fit.flagged).toEqual([]);
    });
  }

  it('a growth rate given as a range is carried into the movement rate’s range, and reported not identifiable when flat', () => {
    const uncertainR = parseScenario({ ...SMALL, pest: { ...SMALL.pest, diffusionHost: 1, growth: { form: 'logistic', rate: { dist: 'uniform', min: 0.5, max: 1.2 } } } });
    const records = drawRecords(run, 0.6, makeRng(101));
    const fixedR = fitSurvey(guessed, parseSurveyRecords(records));
    const fit = fitSurvey(uncertainR, parseSurveyRecords(records), { gridPoints: 3 });
    const [d, r] = fit.parameters;
    expect(r.path).toBe('pest.growth.rate');
    expect(r.identifiable).toBe(false);
    expect(fit.messages.join(' ')).toMatch(/Growth rate is not identifiable from these records/);
    // Spread pins r·D (c = 2√(rD)); a range of r widens D's range relative to r known.
    const width = (p: typeof d) => Math.log(p.interval90![1] / p.interval90![0]);
    expect(width(d)).toBeGreaterThan(width(fixedR.parameters[0]));
  });
});

describe('the demo records (scenarios/survey-fit.records.csv)', () => {
  const scenario = parseScenarioText(readFileSync(SCENARIO_FILE, 'utf8'));
  const table = parseSurveyCsv(readFileSync(RECORDS_FILE, 'utf8'));
  const fit = fitSurvey(scenario, table, { start: TRUTH.start, gridPoints: 3 });

  it('recovers the generator’s movement rate within its range and flags the planted introduction by its row', () => {
    const d = fit.parameters[0];
    console.log(`demo: D = ${d.estimate?.toFixed(3)} (${d.interval90?.map((x) => x.toFixed(3)).join('–')}), truth ${TRUTH.diffusionHost}; ${fit.model.runs} runs`);
    expect(d.interval90![0]).toBeLessThan(TRUTH.diffusionHost);
    expect(d.interval90![1]).toBeGreaterThan(TRUTH.diffusionHost);
    expect(fit.flagged.map((f) => [f.year, f.atKm])).toEqual([[TRUTH.planted.year, TRUTH.planted.atKm]]);
    expect(fit.flagged[0].row).toMatch(/^row \d+$/);
    expect(fit.flagged[0].sentence).toMatch(/possible human-carried introduction.*regulator/);
  });

  it('says the edge preference is not pinned down rather than giving a narrow range', () => {
    const a = fit.parameters.find((p) => p.path === 'pest.edgePreferenceOpen')!;
    expect(a.identifiable).toBe(false);
    expect(a.interval90).toBeNull();
    expect(a.distribution).toBeNull();
  });

  it('diagnostics: residuals for every record used, observed vs expected per year, provenance sentence', () => {
    expect(fit.diagnostics.residuals.length).toBe(table.records.length - 1);
    expect(fit.diagnostics.byYear.map((y) => y.year)).toEqual(TRUTH.years);
    for (const y of fit.diagnostics.byYear) expect(Math.abs(y.detected - y.expected)).toBeLessThan(3 * Math.sqrt(y.expected) + 2);
    expect(fit.provenance).toMatch(/^Movement in host forest fitted to \d+ detections \(\d+ survey records\), 2019–2025$/);
  });

  it('adopting gives a valid scenario with the fitted range and the provenance, the rest unchanged', () => {
    const adopted = parseScenario(adoptFit(scenario, fit));
    expect(adopted.pest.diffusionHost).toEqual(fit.parameters[0].distribution);
    expect(adopted.pest.edgePreferenceOpen).toEqual(scenario.pest.edgePreferenceOpen);
    expect(adopted.calibration?.sentence).toBe(fit.provenance);
    expect(adopted.calibration?.paths).toEqual(['pest.diffusionHost']);
    expect(adopted.uncertainty?.draws).toBe(200);
    expect(adopted.transect).toEqual(scenario.transect);
  });
});

describe('records the fit cannot use', () => {
  const scenario = parseScenario(SMALL);
  it('fewer than three years with a detection, positions off the transect: SurveyError naming them', () => {
    const two = parseSurveyRecords([2020, 2021, 2022].map((year, k) => ({ year, atKm: 2, detected: k < 2 })));
    expect(() => fitSurvey(scenario, two)).toThrow(SurveyError);
    expect(() => fitSurvey(scenario, two)).toThrow(/at least 3 different years/);
    const off = parseSurveyRecords([2020, 2021, 2022].map((year) => ({ year, atKm: 31, detected: true })));
    expect(() => fitSurvey(scenario, off)).toThrow(/records\[0\]\.atKm = 31: is off the transect/);
  });

  it('a front that does not move: the movement rate is reported not identifiable, not given a narrow range', () => {
    // The same stretch found infested every year and nothing beyond: any D small enough fits.
    const records = [2019, 2020, 2021, 2022].flatMap((year) => [0.5, 1, 3, 6, 10].map((atKm) => ({ year, atKm, detected: atKm <= 1 })));
    const fit = fitSurvey(scenario, parseSurveyRecords(records));
    const d = fit.parameters[0];
    expect(d.identifiable).toBe(false);
    expect(d.interval90).toBeNull();
    expect(d.message).toMatch(/not identifiable .*do not bound it towards small values/);
    expect(fit.quick.diffusion).toBeNull();
  });
});
