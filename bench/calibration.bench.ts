/**
 * Coverage of the survey fit's 90 % ranges for the movement rate: records simulated by the engine from known
 * parameters with detection noise (detection chance 0.6 per record), fitted as a team would fit them (the
 * movement rate only guessed), replicated `BENCH_REPLICATES` times (default 200) with independent seeds.
 * Target: the stated 90 % range covers the truth in 85–95 % of replicates. Two set-ups:
 *   A  30 km of unbroken host forest, 20 survey points a year for 7 years (the test suite's set-up);
 *   B  the demo layout (scenarios/survey-fit.json) with the old fire lane the records cross, 48 points a
 *      year, edge preference known.
 * Also reported: the coverage of the quick range read from the front line (farthest detection per year,
 * Fisher–KPP inversion), which assumes an established front at its asymptotic speed.
 * The binomial standard error of a coverage estimate from n replicates is √(0.09/n) (0.021 for n = 200).
 */
import { readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText, pointScenario, type Scenario, type ScenarioInput } from '../server/model/scenario.ts';
import { parseSurveyRecords } from '../server/model/survey.ts';
import { fitSurvey } from '../server/analysis/calibration/fit.ts';
import { drawRecords, truthRun, type SurveyDesign } from '../server/analysis/calibration/synthetic.ts';
import { makeRng } from '../server/numerics/rng.ts';
import { SCENARIO_FILE, TRUTH, truthScenario } from '../scenarios/generate-survey-records.ts';

const replicates = Number(process.env.BENCH_REPLICATES ?? 200);
const only = process.env.BENCH_SETUP;

interface SetUp {
  name: string;
  truthD: number;
  truth: ReturnType<typeof pointScenario>;
  guessed: Scenario;
  start: { fromKm: number; toKm: number; density: number };
  startYear: number;
  design: SurveyDesign;
}

const small: ScenarioInput = {
  title: 'calibration bench (invented)',
  pest: { name: 'bench borer (invented)', illustrative: true, diffusionHost: 0.4, diffusionOpen: 0.8, edgePreferenceOpen: 0.8, growth: { form: 'logistic', rate: 0.8 }, hostKillRate: 0.5, mortalityOpen: 2 },
  transect: { segments: [{ habitat: 'host-forest', lengthKm: 30, stocking: 1, stemsPerHa: 400 }] },
  infestation: { fromKm: 0, toKm: 1 },
  horizonYears: 15,
};
const years = [2019, 2020, 2021, 2022, 2023, 2024, 2025];
const demo = parseScenarioText(readFileSync(SCENARIO_FILE, 'utf8'));
const setups: SetUp[] = [
  {
    name: 'A uniform forest',
    truthD: 0.4,
    truth: pointScenario(parseScenario(small)),
    guessed: parseScenario({ ...small, pest: { ...small.pest, diffusionHost: 1 } }),
    start: { fromKm: 0, toKm: 1, density: 1 },
    startYear: 2016,
    design: { years, positionsKm: Array.from({ length: 20 }, (_, k) => 1 + k) },
  },
  {
    name: 'B demo layout, across the fire lane',
    truthD: TRUTH.diffusionHost,
    truth: truthScenario(),
    guessed: { ...demo, pest: { ...demo.pest, edgePreferenceOpen: TRUTH.edgePreferenceOpen } },
    start: TRUTH.start,
    startYear: TRUTH.startYear,
    design: { years: TRUTH.years, positionsKm: TRUTH.positionsKm },
  },
];

for (const su of setups.filter((s) => !only || s.name.startsWith(only))) {
  const t0 = performance.now();
  const run = truthRun(su.truth, su.start, su.startYear, su.design);
  let covered = 0;
  let quickCovered = 0;
  let quickN = 0;
  let notIdentifiable = 0;
  let flagged = 0;
  let runs = 0;
  const logRatio: number[] = [];
  const widths: number[] = [];
  for (let k = 0; k < replicates; k++) {
    const records = drawRecords(run, 0.6, makeRng(10_000 + k));
    const fit = fitSurvey(su.guessed, parseSurveyRecords(records), { start: su.start });
    const d = fit.parameters[0];
    runs += fit.model.runs;
    flagged += fit.flagged.length;
    if (!d.identifiable || !d.interval90) notIdentifiable++;
    else {
      if (d.interval90[0] <= su.truthD && su.truthD <= d.interval90[1]) covered++;
      widths.push(d.interval90[1] / d.interval90[0]);
    }
    logRatio.push(Math.log((d.estimate as number) / su.truthD));
    if (fit.quick.interval90) {
      quickN++;
      if (fit.quick.interval90[0] <= su.truthD && su.truthD <= fit.quick.interval90[1]) quickCovered++;
    }
    if ((k + 1) % 50 === 0) process.stderr.write(`  ${su.name}: ${k + 1}/${replicates} after ${((performance.now() - t0) / 1000).toFixed(0)} s, coverage so far ${(covered / (k + 1)).toFixed(3)}\n`);
  }
  const cov = covered / replicates;
  const se = Math.sqrt((cov * (1 - cov)) / replicates);
  const meanLog = logRatio.reduce((a, b) => a + b, 0) / logRatio.length;
  widths.sort((a, b) => a - b);
  console.log(`${su.name}: ${replicates} replicates, true D = ${su.truthD} km²/yr`);
  console.log(`    full-model 90 % range covers the truth in ${(100 * cov).toFixed(1)} % ± ${(100 * se).toFixed(1)} % of replicates (target 85–95 %: ${cov >= 0.85 && cov <= 0.95 ? 'MET' : 'NOT MET'}); not identifiable in ${notIdentifiable}`);
  console.log(`    estimate: geometric mean ratio to the truth ${Math.exp(meanLog).toFixed(3)}; median range width ×${widths[Math.floor(widths.length / 2)]?.toFixed(2)} (high/low)`);
  console.log(`    quick front-line range covers the truth in ${quickN ? ((100 * quickCovered) / quickN).toFixed(1) : '—'} % of ${quickN} replicates`);
  console.log(`    ${runs} model runs, ${((performance.now() - t0) / 1000).toFixed(1)} s wall (${((performance.now() - t0) / replicates).toFixed(0)} ms per fit); records flagged as introductions: ${flagged} (the truth has none)`);
}
