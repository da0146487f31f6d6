/**
 * Regression tests for wrong answers of the barrier analysis found by trying unusual but legitimate
 * scenarios (a sceptical analyst's checks). Each test failed before its fix. Runs use coarse user-set
 * cells (numerics.cellM) to stay cheap: every property here is qualitative (a verdict, a bracket's kind),
 * so it does not depend on the last digit of the resolution.
 *
 * Reference values: the cubic (Nagumo) pest D = r = 1, a = 0.25 with a gap of D = 1, m = 1, α = ½ has
 * the phase-plane critical width W* = 596.1 m (methods note (server/numerics/README.md) §5.3, G1); its front speed in unbroken forest is
 * c = √(2rD)(½ − a) = 0.354 km/yr (Lewis & Kareiva 1993).
 */
import { describe, expect, it } from 'vitest';
import { parseScenario, pointScenario } from '../../server/model/scenario.ts';
import { analyseBaseline, analyseOption } from '../../server/analysis/barrier.ts';
import { evaluatePoint } from '../../server/analysis/ensemble.ts';
import { expectAllClose } from '../helpers/close.ts';

const cubicPest = {
  name: 'synthetic pest (invented)',
  diffusionHost: 1,
  diffusionOpen: 1,
  edgePreferenceOpen: 0.5,
  hostKillRate: 0,
  mortalityOpen: 1,
  growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.25 },
};
/** Mate-finding without crowding, hosts eaten: pinned means the pest dies out at the clearing (die-out check). */
const mateLimitedPest = {
  ...cubicPest,
  edgePreferenceOpen: 0.8,
  hostKillRate: 0.5,
  mortalityOpen: 4,
  growth: { form: 'mate-finding', birthRate: 3, deathRate: 1, crowding: 0, mating: 'exponential', mateScale: 0.1 },
};
const host = (lengthKm: number) => ({ habitat: 'host-forest', lengthKm, stocking: 1, stemsPerHa: 400 });

function scenario(input: Record<string, unknown>) {
  return pointScenario(parseScenario({ title: 'edge case (invented)', numerics: { cellM: 100 }, ...input } as never));
}

function analyseAll(s: ReturnType<typeof scenario>, settings: Parameters<typeof analyseOption>[2] = {}) {
  const options = s.barrier!.options;
  const baseline = analyseBaseline(s, options, { record: false });
  return options.map((o) => analyseOption(s, o, { baseline, record: false, widthCurve: false, ...settings }));
}

describe('a front that has not reached the clearing by the horizon is never "held"', () => {
  // Regression: the run past the horizon (to verify pinning) used a window around the clearing that did not
  // contain the distant front; the empty window is a stable steady state (or "dies out"), so a 100 m cut, a
  // sixth of W*, was reported to hold indefinitely. The front from km 4 needs ~100 years to reach km 40.
  for (const [label, pest] of [
    ['cubic, no host loss (steady-state check)', cubicPest],
    ['mate-limited, hosts eaten (die-out check)', mateLimitedPest],
  ] as const) {
    it(label, () => {
      const s = scenario({
        pest,
        transect: { segments: [host(60)] },
        infestation: { fromKm: 0, toKm: 4 },
        sites: [{ name: 'Far farm', atKm: 55 }],
        horizonYears: 5,
        barrier: { lengthKm: 1, options: [{ name: 'thin cut far ahead', fromKm: 40, widthM: 100 }] },
      });
      const [{ result: r }] = analyseAll(s);
      expect(r.pinned).toBe(false);
      expect(r.pinning.verified).toBe(false);
      expect(r.verdict.kind).toBe('not-reached');
      expect(r.sites[0].kind).toBe('not-reached');
    });
  }
});

describe('the run past the horizon looks for the crossing even when every site already sees the fringe', () => {
  // Regression: the extension stopped as soon as every site had reached the detection level. With the
  // cubic pest the detection level (1 %) runs ~6 km ahead of the breeding front, so both sites were reached
  // at once and a 400 m cut (two thirds of W*) was reported "the extended run neither crossed nor settled".
  const s = scenario({
    pest: cubicPest,
    transect: { segments: [host(20)] },
    infestation: { fromKm: 0, toKm: 2 },
    sites: [
      { name: 'Near lodge', atKm: 5 },
      { name: 'Far lodge', atKm: 12 },
    ],
    horizonYears: 30,
    barrier: { lengthKm: 1, curveWidthsM: [100, 800], options: [{ name: 'narrow cut', fromKm: 7, widthM: 400 }] },
  });
  it('projects the crossing of a cut narrower than the critical width', () => {
    const [{ result: r }] = analyseAll(s, { criticalWidth: false });
    expect(r.verdict.kind).toBe('not-crossed');
    expect(r.crossingYears.option).toBeNull();
    expect(r.crossingYears.projected).toBeGreaterThan(30);
    expect(r.verdict.sentence).toMatch(/Projected crossing: year/);
  });
  it('the width–delay curve sees the crossing below W* and the pinning above it (no delay behind a pinned front)', () => {
    const [{ result: r }] = analyseAll(s, { criticalWidth: false, widthCurve: true });
    const [narrow, wide] = r.widthDelay;
    expect(narrow.widthM).toBe(100);
    expect(narrow.pinned).toBe(false);
    expect(narrow.crossingYears).not.toBeNull();
    expect(wide.widthM).toBe(800);
    expect(wide.pinned).toBe(true);
    // The far lodge lies in the pinned front's fringe (detection level without a breeding population): held, not delayed.
    expect(wide.delayYearsBySite[1]).toBeNull();
  });
});

describe('a clearing is not credited with holding a front that is stopped without it', () => {
  it('an existing 1 km clearing (wider than W*) already holds the front: the cut beyond it is "not reached", critical width 0', () => {
    // Regression: the option 500 m beyond the existing clearing was "holds" with a critical-width bracket of [0, 8] m.
    const s = scenario({
      pest: cubicPest,
      transect: { segments: [host(6), { habitat: 'clearing', lengthKm: 1 }, host(13)] },
      infestation: { fromKm: 0, toKm: 2 },
      sites: [{ name: 'Orchard', atKm: 15 }],
      horizonYears: 30,
      barrier: { lengthKm: 1, options: [{ name: 'cut beyond the corridor', fromKm: 7.5, widthM: 200 }] },
    });
    const [{ result: r }] = analyseAll(s);
    expect(r.verdict.kind).toBe('not-reached');
    expect(r.verdict.sentence).toMatch(/does not get past this point, with or without the clearing: even without this clearing the front is held before it/);
    expect(r.criticalWidth.bracketM).toEqual([0, 0]);
    expect(r.sites[0].kind).toBe('not-reached');
  });

  it('an infestation too small to establish dies out on its own: no option "holds" and no critical width is bracketed', () => {
    // 2 km infested around a 200 m corridor in the middle of the stand: below the critical nucleus of the cubic
    // (the baseline's insects fall from 1.8 to 0.06 km in 30 years). Regression: every option "held", with
    // critical widths of a few metres.
    const s = scenario({
      pest: cubicPest,
      transect: { segments: [host(9), { habitat: 'clearing', lengthKm: 0.2 }, host(7), host(8)] },
      infestation: { fromKm: 9, toKm: 11 },
      sites: [{ name: 'East hamlet', atKm: 21 }],
      horizonYears: 30,
      barrier: { lengthKm: 1, options: [{ name: 'east cut', fromKm: 14, widthM: 500 }] },
    });
    const [{ result: r, critical }] = analyseAll(s);
    expect(r.verdict.kind).toBe('not-reached');
    expect(r.pinned).toBe(false);
    expect(r.criticalWidth.bracketM).toBeNull();
    expect(critical.withoutClearing).toBe('open');
    // Per ensemble draw: no critical width (nothing reached the clearing), not "no width holds" (+∞).
    const draw = evaluatePoint(s);
    expect(draw.options[0].criticalWidthM).toBeNull();
    expect(draw.options[0].crossingYears).toBeNull();
  });
});

describe('the detection level does not move the critical width', () => {
  // The detection level says when a place counts as reached; the critical width is a property of the
  // model. Regression: the window runs started when the detection level arrived a few movement lengths
  // before the clearing, and the window beyond the clearing ended where the fringe fell below it. At 0.001
  // (within the typical range) the breeding front was still outside the window when the runs started, and
  // no width was "verified to pin"; at 0.5 the window ended 6 km beyond the clearing and its reflecting
  // end moved the bracket to 676–686 m. Reference: W* = 596.1 m (phase plane, methods note §5.3, G1).
  for (const detectionLevel of [0.001, 0.5]) {
    it(`detection level ${detectionLevel}: the bracket still contains W*`, () => {
      const s = scenario({
        pest: cubicPest,
        detectionLevel,
        transect: { segments: [host(50)] },
        infestation: { fromKm: 0, toKm: 3 },
        horizonYears: 80,
        barrier: { lengthKm: 1, options: [{ name: 'cut', fromKm: 25, widthM: 700 }] },
      });
      const [{ result: r }] = analyseAll(s, { bracketChecks: false });
      const [lo, hi] = r.criticalWidth.bracketM!;
      expect(lo).toBeLessThanOrEqual(596.1);
      expect(hi).toBeGreaterThanOrEqual(596.1);
      expect(r.verdict.kind).toBe('holds');
    });
  }
});

describe('a site exactly on a habitat edge', () => {
  // Regression: a position on the face between two pieces read the cell to its right, so a site at the
  // clearing's near edge read the open ground in one drawing of the transect and the forest in its mirror
  // image; with edge avoidance (α = 0.8: the density in the open is a quarter of the forest's) the verdict
  // flipped between "delays" and "speeds up". It now reads the larger density of the two sides.
  const pest = { ...cubicPest, growth: { form: 'logistic', rate: 1 }, edgePreferenceOpen: 0.8, mortalityOpen: 2 };
  const input = (mirrored: boolean) => {
    const at = (x: number) => (mirrored ? 20.3 - x : x);
    const segs = [host(10), { habitat: 'clearing', lengthKm: 0.3 }, host(10)];
    return scenario({
      pest,
      transect: { segments: mirrored ? [...segs].reverse() : segs },
      infestation: mirrored ? { fromKm: 18.3, toKm: 20.3 } : { fromKm: 0, toKm: 2 },
      sites: [
        { name: 'At the corridor', atKm: at(10) },
        { name: 'At the cut', atKm: at(14) },
      ],
      horizonYears: 20,
      numerics: { cellM: 50 },
      barrier: { lengthKm: 1, options: [{ name: 'cut', fromKm: mirrored ? at(14.4) : 14, widthM: 400 }] },
    });
  };
  it('gets the same arrivals and verdicts in the transect and its mirror image', () => {
    const [{ result: a }] = analyseAll(input(false));
    const [{ result: b }] = analyseAll(input(true));
    expect(b.sites.map((x) => x.kind)).toEqual(a.sites.map((x) => x.kind));
    // Same cells in mirror image: equal to round-off.
    for (let k = 0; k < a.sites.length; k++) {
      expectAllClose(b.sites[k].baselineArrivalYears!, a.sites[k].baselineArrivalYears!, { rtol: 1e-9 });
      expectAllClose(b.sites[k].optionArrivalYears!, a.sites[k].optionArrivalYears!, { rtol: 1e-9 });
    }
  });
});
