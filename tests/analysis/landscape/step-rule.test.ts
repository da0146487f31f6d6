/**
 * Accuracy cost of the map's automatic time step (MAP_STEP_FACTOR × the transect's rule, landscape/problem.ts):
 * arrival years with the automatic step against a step four times smaller (same scheme), on an invented map
 * with a lake, open farmland, a band and a host-killing pest. Bound: the transect rule's own acceptance,
 * 0.03 yr at the sites (tests/problem/step-rule.test.ts); every reached cell within 0.05 yr. Internal
 * comparison; the scheme's order in time is checked in tests/verification/landscape-numerics.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { makeLandscape } from '../../helpers/landscape.ts';
import { automaticStepYears, coarsenLandscape, landscapeProblem, MAP_STEP_FACTOR, type PointPest } from '../../../server/analysis/landscape/problem.ts';
import { DRAW_STEP_FACTOR } from '../../../server/analysis/landscape/ensemble.ts';
import { runLandscapeProblem } from '../../../server/analysis/landscape/run.ts';

const pest = { name: 'test borer (invented)', illustrative: true, diffusionHost: 0.3, diffusionOpen: 1.2, edgePreferenceOpen: 0.8, growth: { form: 'logistic', rate: 0.8 }, hostKillRate: 0.3, mortalityOpen: 1.5 } as PointPest;
const L = makeLandscape({
  nx: 90,
  ny: 50,
  cellM: 100,
  classAt: (x, y) => (Math.hypot(x - 4500, y - 1200) < 900 ? 'outside' : y > 3800 && x < 3000 ? 'open' : 'host'),
  hostCoverAt: (x, y) => 0.7 + 0.3 * Math.cos(x / 2300) * Math.sin(y / 1700) ** 2,
  infestedAt: (x, y) => (Math.hypot(x - 1000, y - 2500) < 600 ? 1 : 0),
  sites: [
    { name: 'east', at: (x, y) => Math.abs(x - 8050) < 60 && Math.abs(y - 2550) < 60 },
    { name: 'north-east', at: (x, y) => Math.abs(x - 7050) < 60 && Math.abs(y - 450) < 60 },
  ],
  bands: [{ id: 'cut', inside: (x, y) => x > 4000 && x < 4300 && y > 1500 && y < 4000, widthM: 300 }],
});

describe('map time step: cost in accuracy', () => {
  it('arrivals with the automatic step match a four-times-smaller step within 0.03 yr at the sites, 0.05 yr at every cell', () => {
    const opts = { mapEdges: 'reflecting' as const, infestedDensity: 1, horizonYears: 14, band: 0 };
    const auto = landscapeProblem(L, pest, opts);
    expect(auto.stepYears).toBeCloseTo(MAP_STEP_FACTOR * automaticStepYears(pest, ['host-forest', 'clearing']), 12);
    const fine = landscapeProblem(L, pest, { ...opts, stepYears: auto.stepYears / 4 });
    const run = { horizonYears: 14, detectionLevel: 0.01 };
    const a = runLandscapeProblem(auto, pest, run);
    const b = runLandscapeProblem(fine, pest, run);
    const site = (r: typeof a, cells: Int32Array) => Math.min(...Array.from(cells, (k) => (r.detected[k] >= 0 ? r.detected[k] : Infinity)));
    let worst = 0;
    let reached = 0;
    for (let k = 0; k < a.detected.length; k++) {
      expect(a.detected[k] >= 0).toBe(b.detected[k] >= 0 || Math.abs(14 - a.detected[k]) < 0.05);
      if (a.detected[k] >= 0 && b.detected[k] >= 0) (worst = Math.max(worst, Math.abs(a.detected[k] - b.detected[k]))), reached++;
    }
    const sites = L.sites.map((s) => [site(a, s.cells), site(b, s.cells)]);
    console.log(`step ${auto.stepYears} yr vs ${fine.stepYears} yr: sites ${sites.map(([x, y]) => `${x.toFixed(3)}/${y.toFixed(3)}`).join(', ')}; largest cell difference ${worst.toFixed(4)} yr over ${reached} cells`);
    expect(reached).toBeGreaterThan(1000);
    for (const [x, y] of sites) {
      expect(Number.isFinite(x)).toBe(true);
      expect(Math.abs(x - y)).toBeLessThan(0.03);
    }
    expect(worst).toBeLessThan(0.05);
  });
});

describe('ensemble draws: cost in accuracy of their longer step', () => {
  it(`on 200 m cells, a step ${DRAW_STEP_FACTOR}× the transect rule moves site arrivals by < 0.1 yr (half the time the front takes to cross a cell) against a four-times-smaller step`, () => {
    // The draws' cell is twice the map's 100 m, so their step is twice the map run's: second order in both
    // space and time, the two errors scale together.
    const coarse = coarsenLandscape(L, 2);
    const opts = { mapEdges: 'reflecting' as const, infestedDensity: 1, horizonYears: 14, band: 0 };
    const stepYears = DRAW_STEP_FACTOR * automaticStepYears(pest, ['host-forest', 'clearing']);
    const run = { horizonYears: 14, detectionLevel: 0.01 };
    const a = runLandscapeProblem(landscapeProblem(coarse, pest, { ...opts, stepYears }), pest, run);
    const b = runLandscapeProblem(landscapeProblem(coarse, pest, { ...opts, stepYears: stepYears / 4 }), pest, run);
    const site = (r: typeof a, cells: Int32Array) => Math.min(...Array.from(cells, (k) => (r.detected[k] >= 0 ? r.detected[k] : Infinity)));
    const sites = coarse.sites.map((s) => [site(a, s.cells), site(b, s.cells)]);
    const crossCellYears = coarse.cellM / 1000 / (2 * Math.sqrt(0.8 * 0.3));
    console.log(`draw step ${stepYears.toFixed(3)} yr vs ${(stepYears / 4).toFixed(3)} yr on ${coarse.cellM} m cells: sites ${sites.map(([x, y]) => `${x.toFixed(3)}/${y.toFixed(3)}`).join(', ')}; a cell is crossed in ${crossCellYears.toFixed(2)} yr`);
    for (const [x, y] of sites) {
      expect(Number.isFinite(x)).toBe(true);
      expect(Math.abs(x - y)).toBeLessThan(0.5 * crossCellYears);
    }
  });
});
