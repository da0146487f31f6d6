/**
 * Survey fit on a landscape map. Records are simulated by the 2-D engine from a known pest (logistic growth,
 * r = 0.8 /yr, D = 0.4 km²/yr: planar Fisher–KPP speed 2√(rD) = 1.13 km/yr, Aronson & Weinberger 1978) on a
 * uniform invented map, observed with detection chance 0.6 where the density has reached the detection level;
 * the fit must recover D within its stated 90 % range. Also: the origin is the infestation's centroid, a
 * detection far ahead of the front is flagged as a possible human-carried introduction, and bad records get
 * messages naming the row.
 */
import { describe, expect, it } from 'vitest';
import { makeLandscape } from '../../helpers/landscape.ts';
import { landscapeProblem, type PointPest } from '../../../server/analysis/landscape/problem.ts';
import { runLandscapeProblem } from '../../../server/analysis/landscape/run.ts';
import { adoptMapFit, fitMapSurvey, infestationOrigin } from '../../../server/analysis/calibration/map-fit.ts';
import { drawMapRecords } from '../../../server/analysis/calibration/synthetic.ts';
import { parseLandscapeScenario, type LandscapeScenarioInput } from '../../../server/model/landscape.ts';
import { parseSurveyRecords, SurveyError, type SurveyRecord } from '../../../server/model/survey.ts';
import { makeRng } from '../../../server/numerics/rng.ts';

const truth = { diffusionHost: 0.4, rate: 0.8 };
const pest = {
  name: 'map fit test borer (invented)',
  illustrative: true,
  diffusionHost: truth.diffusionHost,
  diffusionOpen: 0.8,
  edgePreferenceOpen: 0.8,
  growth: { form: 'logistic', rate: truth.rate },
  hostKillRate: 0,
  mortalityOpen: 2,
} as const;
const cellM = 250;
const n = 160; // 40 km square
const centre = (n * cellM) / 2;
const L = makeLandscape({ nx: n, ny: n, cellM, infestedAt: (x, y) => (Math.hypot(x - centre, y - centre) < 1000 ? 1 : 0) });
const X0 = L.originXM;
const Y0 = L.originYM;

/** The landscape scenario the records belong to (its map files are not read: the test hands the fit the raster). */
const scenarioInput = (p: Record<string, unknown>): LandscapeScenarioInput => ({
  kind: 'landscape',
  title: 'map fit test (invented)',
  pest: p as LandscapeScenarioInput['pest'],
  map: { format: 'geotiff', file: 'host.tif', unit: 'share', stemsPerHaAtFullCover: 400 } as LandscapeScenarioInput['map'],
  infestation: { places: [{ point: [X0 + centre, Y0 - centre], radiusM: 1000 }] },
  horizonYears: 20,
});

const startYear = 2010;
const surveyYears = [2017, 2018, 2019, 2020, 2021, 2022, 2023];
let arrival: Float32Array | null = null;
function arrivalYears(): Float32Array {
  if (!arrival) {
    const p = landscapeProblem(L, pest as unknown as PointPest, { mapEdges: 'reflecting', infestedDensity: 1, horizonYears: 14 });
    arrival = runLandscapeProblem(p, pest as unknown as PointPest, { horizonYears: 14, detectionLevel: 0.01 }).detected;
  }
  return arrival;
}

/** 300 random survey points a year over the map; detected with chance 0.6 where the pest has arrived. */
const records = (seed: number): SurveyRecord[] => drawMapRecords(arrivalYears(), L, { years: surveyYears, pointsPerYear: 300, startYear }, 0.6, makeRng(seed));

describe('survey fit on a map (radial front)', () => {
  it('origin is the share-weighted centroid of the infested cells, radius √(A/π)', () => {
    const o = infestationOrigin(L);
    expect(Math.abs(o.xM - (X0 + centre))).toBeLessThan(1);
    expect(Math.abs(o.yM - (Y0 - centre))).toBeLessThan(1);
    // A 1 km disc rasterised by cell centre at 250 m: area within a few cells of π km².
    expect(Math.abs(o.radiusKm - 1) / 1).toBeLessThan(0.06);
  });

  it('recovers the movement rate within its 90 % range (engine-simulated records, three seeds)', () => {
    const s = parseLandscapeScenario(scenarioInput({ ...pest, diffusionHost: 1 }));
    for (const seed of [1, 2, 3]) {
      const fit = fitMapSurvey(s, L, parseSurveyRecords(records(seed)));
      const d = fit.parameters[0];
      console.log(`seed ${seed}: D = ${d.estimate?.toFixed(3)} (90 % ${d.interval90?.map((v) => v.toFixed(3)).join('–')}), radial rate ${fit.front.kmPerYear?.toFixed(3)} km/yr (planar speed 1.131), flagged ${fit.flagged.length}`);
      expect(d.identifiable).toBe(true);
      expect(d.interval90![0]).toBeLessThanOrEqual(truth.diffusionHost);
      expect(d.interval90![1]).toBeGreaterThanOrEqual(truth.diffusionHost);
      expect(fit.flagged.length).toBe(0);
      const adopted = adoptMapFit(s, fit);
      expect(adopted.pest.diffusionHost).toMatchObject({ dist: 'lognormal' });
      expect(adopted.calibration?.sentence).toMatch(/fitted to the radial spread of \d+ detections/);
      expect(adopted.uncertainty?.draws).toBe(200);
    }
  });

  it('a detection far ahead of the front is flagged as a possible human-carried introduction, not fitted', () => {
    const s = parseLandscapeScenario(scenarioInput(pest));
    const rs = records(4);
    const i = rs.findIndex((r) => r.year === 2019 && !r.detected && Math.hypot((r.x as number) - X0 - centre, Y0 - (r.y as number) - centre) > 17_000);
    rs[i] = { ...rs[i], detected: true };
    const fit = fitMapSurvey(s, L, parseSurveyRecords(rs));
    expect(fit.flagged.map((f) => f.index)).toEqual([i]);
    expect(fit.flagged[0].sentence).toMatch(/human-carried/);
    expect(fit.flagged[0].sentence).toMatch(/from the infestation’s centre/);
  });

  it('records off the map or given as transect km are refused, naming the row', () => {
    const s = parseLandscapeScenario(scenarioInput(pest));
    const rs = records(5);
    rs[3] = { ...rs[3], x: X0 - 5000 };
    expect(() => fitMapSurvey(s, L, parseSurveyRecords(rs))).toThrow(SurveyError);
    try {
      fitMapSurvey(s, L, parseSurveyRecords(rs));
    } catch (e) {
      expect((e as SurveyError).problems[0]).toMatchObject({ path: 'records[3].x' });
      expect((e as SurveyError).problems[0].message).toMatch(/off the map/);
    }
    const km = records(5).map((r) => ({ year: r.year, atKm: 3, detected: r.detected }));
    expect(() => fitMapSurvey(s, L, parseSurveyRecords(km))).toThrow(/transect position/);
  });
});
