/**
 * Writes scenarios/landscapes/ossenvale-valley.records.csv: invented survey records on the demo map, simulated
 * by the 2-D engine from the demo scenario with a known movement rate (MAP_TRUTH below), started from the
 * scenario's infestation in MAP_TRUTH.startYear and observed at random points each year with random misses
 * (seeded), plus one planted detection far ahead of the front (a human-carried introduction the fit must
 * flag). The tests import MAP_TRUTH to check the fit against it.
 *
 *   npx tsx scenarios/generate-map-survey-records.ts
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseLandscapeScenario, pointLandscapeScenario, type LandscapeScenario } from '../server/model/landscape.ts';
import { surveyToCsv, type SurveyRecord } from '../server/model/survey.ts';
import { loadLandscape } from '../server/domain/gis/load.ts';
import { mapFileNames } from '../server/analysis/landscape-scenario.ts';
import { landscapeProblem, type PointPest } from '../server/analysis/landscape/problem.ts';
import { runLandscapeProblem } from '../server/analysis/landscape/run.ts';
import { drawMapRecords } from '../server/analysis/calibration/synthetic.ts';
import { readMapFiles } from '../server/landscape-cli.ts';
import { makeRng } from '../server/numerics/rng.ts';

/** The invented truth behind the demo map records. */
export const MAP_TRUTH = {
  diffusionHost: 0.6,
  startYear: 2014,
  years: [2019, 2020, 2021, 2022, 2023, 2024, 2025],
  pointsPerYear: 160,
  detectionChance: 0.6,
  seed: 2025,
  /** The planted record: a detection no natural spread explains (map metres). */
  planted: { year: 2023, x: 505_000, y: 4_030_000, detected: true } as SurveyRecord,
};

export const MAP_SCENARIO_FILE = fileURLToPath(new URL('./landscapes/ossenvale-valley.json', import.meta.url));
export const MAP_RECORDS_FILE = fileURLToPath(new URL('./landscapes/ossenvale-valley.records.csv', import.meta.url));

export function demoLandscape(): LandscapeScenario {
  return parseLandscapeScenario(JSON.parse(readFileSync(MAP_SCENARIO_FILE, 'utf8')));
}

export async function generateMapRecords(): Promise<SurveyRecord[]> {
  const s = demoLandscape();
  const loaded = await loadLandscape(s, readMapFiles(mapFileNames(s), dirname(MAP_SCENARIO_FILE)));
  const point = pointLandscapeScenario(s);
  const pest = { ...point.pest, diffusionHost: MAP_TRUTH.diffusionHost } as PointPest;
  const years = Math.max(...MAP_TRUTH.years) - MAP_TRUTH.startYear;
  const p = landscapeProblem(loaded, pest, { mapEdges: 'reflecting', infestedDensity: point.infestation.density, horizonYears: years });
  const arrival = runLandscapeProblem(p, pest, { horizonYears: years, detectionLevel: point.detectionLevel }).detected;
  const design = { years: MAP_TRUTH.years, pointsPerYear: MAP_TRUTH.pointsPerYear, startYear: MAP_TRUTH.startYear };
  const recs: SurveyRecord[] = drawMapRecords(arrival, loaded, design, MAP_TRUTH.detectionChance, makeRng(MAP_TRUTH.seed)).map((r) => ({ ...r, x: Math.round(r.x as number), y: Math.round(r.y as number) }));
  const at = recs.findIndex((r) => r.year === MAP_TRUTH.planted.year + 1);
  recs.splice(at, 0, MAP_TRUTH.planted);
  return recs;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  generateMapRecords().then((recs) => {
    writeFileSync(MAP_RECORDS_FILE, surveyToCsv(recs));
    process.stdout.write(`${recs.length} records (${recs.filter((r) => r.detected).length} detections) written to ${MAP_RECORDS_FILE}\n`);
  });
}
