/**
 * Coverage of the map survey fit's 90 % range for the movement rate (server/analysis/calibration/map-fit.ts):
 * records simulated by the 2-D engine from a known pest (logistic, r = 0.8 /yr, D = 0.4 km²/yr) released from
 * a 1 km disc in the middle of a uniform invented 40 × 40 km map (125 m cells: at 250 m the discrete front runs about 1 % fast, which the fit duly reads as a 2–3 % larger D), 300 random survey points a year for 7
 * years from year 7 after the start, detection chance 0.6; `BENCH_REPLICATES` replicates (default 1000: a fit takes milliseconds).
 * Target: the stated range covers the truth in 85–95 % of replicates. Also printed: the coverage the raw
 * straight line through the front radii would give (no lag correction), which shows why the correction is
 * there. The binomial standard error of a coverage from n replicates is √(0.09/n) (0.009 for n = 1000).
 */
import { makeLandscape } from '../tests/helpers/landscape.ts';
import { landscapeProblem, type PointPest } from '../server/analysis/landscape/problem.ts';
import { runLandscapeProblem } from '../server/analysis/landscape/run.ts';
import { fitMapSurvey } from '../server/analysis/calibration/map-fit.ts';
import { drawMapRecords } from '../server/analysis/calibration/synthetic.ts';
import { movementRateFromSpeed, unitSpeed } from '../server/analysis/calibration/inversion.ts';
import { parseLandscapeScenario } from '../server/model/landscape.ts';
import { parseScenario, pointScenario } from '../server/model/scenario.ts';
import { parseSurveyRecords } from '../server/model/survey.ts';
import { makeRng } from '../server/numerics/rng.ts';

const replicates = Number(process.env.BENCH_REPLICATES ?? 1000);
const truthD = 0.4;
const pest = { name: 'bench borer (invented)', illustrative: true, diffusionHost: truthD, diffusionOpen: 0.8, edgePreferenceOpen: 0.8, growth: { form: 'logistic' as const, rate: 0.8 }, hostKillRate: 0, mortalityOpen: 2 };
const cellM = Number(process.env.BENCH_CELL_M ?? 125);
const n = Math.round(40_000 / cellM);
const c0 = (n * cellM) / 2;
const L = makeLandscape({ nx: n, ny: n, cellM, infestedAt: (x, y) => (Math.hypot(x - c0, y - c0) < 1000 ? 1 : 0) });
const t0 = performance.now();
const p = landscapeProblem(L, pest as unknown as PointPest, { mapEdges: 'reflecting', infestedDensity: 1, horizonYears: 14 });
const arrival = runLandscapeProblem(p, pest as unknown as PointPest, { horizonYears: 14, detectionLevel: 0.01 }).detected;
const runS = (performance.now() - t0) / 1000;
const scenario = parseLandscapeScenario({
  kind: 'landscape',
  title: 'map calibration bench (invented)',
  pest: { ...pest, diffusionHost: 1 },
  map: { format: 'geotiff', file: 'host.tif', unit: 'share', stemsPerHaAtFullCover: 400 },
  infestation: { places: [{ point: [L.originXM + c0, L.originYM - c0], radiusM: 1000 }] },
  horizonYears: 20,
});
const unit = unitSpeed(pointScenario(parseScenario({ title: 'u', pest, transect: { segments: [{ habitat: 'host-forest', lengthKm: 10, stocking: 1, stemsPerHa: 400 }] }, infestation: { fromKm: 0, toKm: 1 }, horizonYears: 10 }))).kmPerYear as number;

const years = [2017, 2018, 2019, 2020, 2021, 2022, 2023];
let covered = 0;
let rawCovered = 0;
let lagApplied = 0;
let flagged = 0;
const logRatio: number[] = [];
const t1 = performance.now();
for (let k = 0; k < replicates; k++) {
  const recs = drawMapRecords(arrival, L, { years, pointsPerYear: 300, startYear: 2010 }, 0.6, makeRng(50_000 + k));
  const fit = fitMapSurvey(scenario, L, parseSurveyRecords(recs));
  const d = fit.parameters[0];
  flagged += fit.flagged.length;
  if (fit.lag) lagApplied++;
  if (d.interval90 && d.interval90[0] <= truthD && truthD <= d.interval90[1]) covered++;
  if (fit.front.interval90) {
    const [lo, hi] = fit.front.interval90.map((c) => movementRateFromSpeed(Math.max(0, c), unit));
    if (lo <= truthD && truthD <= hi) rawCovered++;
  }
  if (d.estimate) logRatio.push(Math.log(d.estimate / truthD));
}
const cov = covered / replicates;
const se = Math.sqrt((cov * (1 - cov)) / replicates);
console.log(`map fit, uniform 40 × 40 km map at ${cellM} m, ${replicates} replicates, true D = ${truthD} km²/yr (truth run ${runS.toFixed(1)} s)`);
console.log(`    90 % range (lag taken out) covers the truth in ${(100 * cov).toFixed(1)} % ± ${(100 * se).toFixed(1)} % (target 85–95 %: ${cov >= 0.85 && cov <= 0.95 ? 'MET' : 'NOT MET'}); lag correction applied in ${lagApplied}`);
console.log(`    straight line without the lag correction would cover it in ${((100 * rawCovered) / replicates).toFixed(1)} %`);
console.log(`    estimate: geometric mean ratio to the truth ${Math.exp(logRatio.reduce((a, b) => a + b, 0) / Math.max(1, logRatio.length)).toFixed(3)}; flagged records ${flagged} (the truth has none); ${((performance.now() - t1) / replicates).toFixed(0)} ms per fit`);
