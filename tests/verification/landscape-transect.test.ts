/**
 * Transect equivalence: a map that is uniform across (a strip three cells wide with reflecting sides, the
 * band spanning its whole width) is the 1-D transect problem, and the 2-D engine must reproduce the transect
 * engine — an independent 1-D implementation (server/numerics/coupled.ts with exact tridiagonal stage
 * solves) — to within one cell in front position and 1 % in arrival times, give the same verdicts, and
 * pin the front at the transect's critical width within 2 %. The edge conditions behind both are those of
 * Ovaskainen & Cornell (2003) and Maciel & Lutscher (2013), applied across every face.
 */
import { describe, expect, it } from 'vitest';
import { makeLandscape } from '../helpers/landscape.ts';
import { hostSegment, testPest, testScenario } from '../helpers/scenario.ts';
import { buildLayout } from '../../server/problem/layout.ts';
import { chooseResolution } from '../../server/problem/discretise.ts';
import { runLayout } from '../../server/analysis/run/simulate.ts';
import { rightFrontKm } from '../../server/analysis/run/trackers.ts';
import { analyseOption, criticalWidth } from '../../server/analysis/verdict/barrier.ts';
import { evaluateLandscape } from '../../server/analysis/landscape/evaluate.ts';
import { landscapeProblem, problemStepper } from '../../server/analysis/landscape/problem.ts';

const ROWS = 3;

describe('transect equivalence: a strip map uniform across is the transect', () => {
  // Logistic pest that moves faster in the open, avoids it at edges and dies there: a 400 m cut delays it.
  const s = testScenario({
    pest: testPest({ diffusionHost: 0.25, diffusionOpen: 1, edgePreferenceOpen: 0.8, mortalityOpen: 2, growth: { form: 'logistic', rate: 1 } }),
    transect: { segments: [hostSegment(12), { habitat: 'clearing', lengthKm: 0.4 }, hostSegment(11.6)] },
    infestation: { fromKm: 0, toKm: 1 },
    sites: [{ name: 'far stand', atKm: 18.025 }],
    barrier: { lengthKm: 1, options: [] },
    horizonYears: 20,
    numerics: { cellM: 50 },
  });
  const option = { name: 'cut', fromKm: 12, widthM: 400, cover: 'clearing' as const };
  const base = testScenario({
    pest: testPest({ diffusionHost: 0.25, diffusionOpen: 1, edgePreferenceOpen: 0.8, mortalityOpen: 2, growth: { form: 'logistic', rate: 1 } }),
    transect: { segments: [hostSegment(24)] },
    infestation: { fromKm: 0, toKm: 1 },
    sites: [{ name: 'far stand', atKm: 18.025 }],
    barrier: { lengthKm: 1, options: [option] },
    horizonYears: 20,
    numerics: { cellM: 50 },
  });
  const strip = makeLandscape({
    nx: 480,
    ny: ROWS,
    cellM: 50,
    infestedAt: (x) => (x < 1000 ? 1 : 0),
    sites: [{ name: 'far stand', at: (x) => Math.abs(x - 18025) < 1 }],
    bands: [{ id: 'cut', inside: (x) => x > 12000 && x < 12400, widthM: 400 }],
  });

  it('front positions within one cell and arrivals within 1 % of the transect engine, same verdict', () => {
    const pieces = buildLayout(s);
    const resolution = chooseResolution(s, pieces);
    const out1 = runLayout({ scenario: s, pieces, resolution, record: false });
    const grid = out1.problem.grid;
    const p = landscapeProblem(strip, s.pest, { mapEdges: 'reflecting', infestedDensity: 1, stepYears: resolution.stepYears, horizonYears: 20, band: 0 });
    const stepper = problemStepper(p);
    const u = Float64Array.from(p.u0);
    const h = Float64Array.from(p.stockingAtCells);
    let worst = 0;
    const nSteps = out1.front.times.length - 1;
    for (let i = 1; i <= nSteps; i++) {
      stepper.step(u, h, out1.front.times[i] - out1.front.times[i - 1]);
      for (let row = 0; row < ROWS; row++) {
        const x2 = rightFrontKm(grid, u.subarray(row * 480, (row + 1) * 480), s.detectionLevel);
        const x1 = out1.front.rightKm[i];
        worst = Math.max(worst, Math.abs(x2 - x1));
      }
    }
    console.log(`largest front-position difference over ${nSteps} steps: ${(worst * 1000).toFixed(4)} m (cell 50 m)`);
    expect(worst).toBeLessThan(0.05);

    const one = analyseOption(base, option, { record: false, criticalWidth: false, widthCurve: false });
    const two = evaluateLandscape(strip, s.pest, { horizonYears: 20, crossSection: false, stepYears: resolution.stepYears });
    const site1 = one.result.sites[0];
    const site2 = two.options[0].sites[0];
    console.log(
      `arrival at the far stand: transect baseline ${site1.baselineArrivalYears?.toFixed(4)} / option ${site1.optionArrivalYears?.toFixed(4)} yr; ` +
        `map ${site2.baselineArrivalYears?.toFixed(4)} / ${site2.optionArrivalYears?.toFixed(4)} yr; verdicts ${one.result.verdict.kind} / ${two.options[0].verdict.kind}`,
    );
    expect(Math.abs(site2.baselineArrivalYears! - site1.baselineArrivalYears!) / site1.baselineArrivalYears!).toBeLessThan(0.01);
    expect(Math.abs(site2.optionArrivalYears! - site1.optionArrivalYears!) / site1.optionArrivalYears!).toBeLessThan(0.01);
    expect(two.options[0].verdict.kind).toBe(one.result.verdict.kind);
    expect(two.options[0].wayPast).toBe('through');
  });
});

describe('transect equivalence: critical width of a strip', () => {
  // Cubic Allee pest of check set G1 in server/numerics/README.md (D1 = D2 = r = m = 1, a = 0.25, no edge preference): W* = 596 m
  // (first-integral criterion, computed independently there).
  const pest = testPest({ diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, mortalityOpen: 1, growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.25 } });
  const s = testScenario({
    pest,
    transect: { segments: [hostSegment(60)] },
    infestation: { fromKm: 0, toKm: 3 },
    barrier: { lengthKm: 1, options: [{ name: 'cut', fromKm: 20, widthM: 600 }] },
    horizonYears: 60,
  });

  it('the strip crosses at 0.98× and holds (verified 2-D steady state) at 1.02× the transect critical width', () => {
    const cw = criticalWidth(s, { fromKm: 20, widthM: 600, cover: 'clearing' }, { phasePlane: false, bracketChecks: false });
    expect(cw.bracketM).not.toBeNull();
    const wStar = 0.5 * (cw.bracketM![0] + cw.bracketM![1]);
    const outcome = (widthM: number) => {
      // 12 cells across the band, so its width is exact on the grid.
      const cellM = widthM / 12;
      // The band 12 km (12 movement lengths) ahead of the infestation, so that the front meets it as a
      // travelling front and not as the start's diffusive spill (which would carry density across), and
      // 14 km of forest beyond (seven fringe lengths √(D/|g(0)|)): a reflecting end close behind the fringe
      // lets density pile up there and moves the threshold.
      const nx = Math.round((15000 + widthM + 14000) / cellM);
      const from = Math.round(15000 / cellM) * cellM;
      const L = makeLandscape({
        nx,
        ny: ROWS,
        cellM,
        infestedAt: (x) => (x < 3000 ? 1 : 0),
        sites: [{ name: 'beyond', at: (x) => Math.abs(x - (from + widthM + 3000)) < cellM / 2 }],
        bands: [{ id: 'cut', inside: (x) => x > from && x < from + widthM }],
      });
      return evaluateLandscape(L, s.pest, { horizonYears: 400, crossSection: false }).options[0];
    };
    const lo = outcome(0.98 * wStar);
    const hi = outcome(1.02 * wStar);
    console.log(`transect bracket [${cw.bracketM!.map((w) => w.toFixed(1)).join(', ')}] m (W* 596.1 m by the first integral); strip at ${(0.98 * wStar).toFixed(1)} m: ${lo.verdict.kind}, ${lo.wayPast}; at ${(1.02 * wStar).toFixed(1)} m: ${hi.verdict.kind} — ${hi.pinning.detail}`);
    expect(Math.abs(wStar - 596.095) / 596.095).toBeLessThan(0.02);
    expect(lo.wayPast).toBe('through');
    expect(lo.sites[0].optionArrivalYears).not.toBeNull();
    expect(hi.verdict.kind).toBe('holds');
    expect(hi.pinning.verified).toBe(true);
  });
});
