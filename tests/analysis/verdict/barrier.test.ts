import { describe, expect, it } from 'vitest';
import { expectAllClose } from '../../helpers/close.ts';
import { parseScenario, pointScenario, type ScenarioInput } from '../../../server/model/scenario.ts';
import { ScenarioError } from '../../../server/model/errors.ts';
import { analyseBaseline, analyseOption, checkOption } from '../../../server/analysis/verdict/barrier.ts';

/** A 30 km stand, infestation at its left end, sites 14 and 22 km in, one option at km 8. */
function synthetic(pest: Record<string, unknown>, widthM: number, horizonYears: number, extra: Partial<ScenarioInput> = {}) {
  return pointScenario(
    parseScenario({
      title: 'synthetic',
      pest: { name: 'synthetic pest', diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, hostKillRate: 0, mortalityOpen: 1, ...pest },
      transect: { segments: [{ habitat: 'host-forest', lengthKm: 30, stocking: 1, stemsPerHa: 400 }] },
      infestation: { fromKm: 0, toKm: 3 },
      sites: [
        { name: 'Near hamlet', atKm: 14 },
        { name: 'Far hamlet', atKm: 22 },
      ],
      horizonYears,
      barrier: { lengthKm: 2, costPerStem: 10, costUnit: 'credits', options: [{ name: 'cut', fromKm: 8, widthM }] },
      ...extra,
    }),
  );
}

// Cubic (Nagumo) growth, D = r = 1, a = 0.25, gap D = 1, m = 1, α = ½: W* = 596.1 m (methods note (server/numerics/README.md) §5.3, G1).
const cubic = { growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.25 } };

describe('barrier verdicts on synthetic cases (the four outcomes)', () => {
  it('holds: a cut well above the critical width pins the front; verified by Newton + Sturm count', () => {
    const s = synthetic(cubic, 800, 40);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, widthCurve: false });
    expect(r.verdict.kind).toBe('holds');
    expect(r.verdict.sentence).toMatch(/under this model it holds indefinitely/);
    expect(r.pinned).toBe(true);
    expect(r.pinning.verified).toBe(true);
    expect(r.pinning.method).toMatch(/Newton/);
    expect(r.pinning.detail).toMatch(/leading eigenvalue −?-?\d/);
    expect(r.sites.every((x) => x.kind === 'holds')).toBe(true);
  });

  it('not crossed within the horizon: just below the critical width the front lingers; the crossing is projected', () => {
    // 560 m is 6 % below W*: the front crosses, but only after lingering (saddle-node slowing).
    const s = synthetic(cubic, 560, 40);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, widthCurve: false });
    expect(r.verdict.kind).toBe('not-crossed');
    expect(r.pinned).toBe(false);
    expect(r.crossingYears.option).toBeNull();
    expect(r.crossingYears.projected).toBeGreaterThan(40);
    expect(r.verdict.sentence).toMatch(/Projected crossing: year/);
    expect(r.criticalWidth.marginal).toBe(false);
  });

  it('marginal: a width inside the critical-width bracket is not called either way', () => {
    const s = synthetic(cubic, 597, 40);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, widthCurve: false });
    expect(r.verdict.kind).toBe('marginal');
    expect(r.criticalWidth.marginal).toBe(true);
  });

  it('delays: logistic growth (no Allee effect) with edge avoidance and open mortality; no finite clearing pins', () => {
    const s = synthetic({ growth: { form: 'logistic', rate: 1 }, mortalityOpen: 3, edgePreferenceOpen: 0.7 }, 800, 30);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, curveWidthsM: [400, 800, 1600] });
    expect(r.verdict.kind).toBe('delays');
    expect(r.criticalWidth.applicable).toBe(false);
    expect(r.criticalWidth.note).toMatch(/No finite clearing pins a front in this model/);
    expect(r.criticalWidth.delayPer100mYears).toBeGreaterThan(0);
    const near = r.sites[0];
    expect(near.kind).toBe('delays');
    expect(near.delayYears).toBeGreaterThan(0);
    // Cost per year of delay = stems × cost per stem / delay.
    expectAllClose(near.costPerYearOfDelay!, r.trees.cost! / near.delayYears!, { rtol: 1e-12 });
    // Wider cuts buy more time (monotone curve).
    const d = r.widthDelay.map((row) => row.delayYearsBySite[0]!);
    expect(d[0]).toBeLessThan(d[1]);
    expect(d[1]).toBeLessThan(d[2]);
  });

  it('speeds up: 10× faster movement in the open, no edge avoidance, low open mortality; the reason is given in words', () => {
    const s = synthetic({ growth: { form: 'logistic', rate: 1 }, diffusionHost: 0.25, diffusionOpen: 2.5, mortalityOpen: 0.1 }, 2000, 30);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, widthCurve: false });
    expect(r.verdict.kind).toBe('speeds-up');
    expect(r.sites[0].delayYears).toBeLessThan(0);
    expect(r.verdict.why).toMatch(/10× faster in the open/);
    expect(r.verdict.why).toMatch(/do not avoid the edge/);
  });
});

describe('trees removed and cost', () => {
  it('stems = stem density × width × barrier length (stocking already in the stem density)', () => {
    // 400 stems/ha × 0.8 km × 2 km × 100 ha/km² = 64 000 stems; cost 10 per stem.
    const s = synthetic({ growth: { form: 'logistic', rate: 1 } }, 800, 5);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, widthCurve: false, criticalWidth: false });
    expectAllClose(r.trees.stemsRemoved, 64_000, { rtol: 1e-12 });
    expectAllClose(r.trees.cost!, 640_000, { rtol: 1e-12 });
    expect(r.trees.costUnit).toBe('credits');
  });
});

describe('bad options get clear errors', () => {
  const base = {
    title: 'bad',
    pest: { name: 'p', diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, hostKillRate: 0, mortalityOpen: 1, growth: { form: 'logistic', rate: 1 } },
    transect: { segments: [{ habitat: 'host-forest', lengthKm: 30, stocking: 1, stemsPerHa: 400 }] },
    infestation: { fromKm: 0, toKm: 3 },
    horizonYears: 10,
  };
  const problems = (input: unknown) => {
    try {
      parseScenario(input);
    } catch (e) {
      expect(e).toBeInstanceOf(ScenarioError);
      return (e as ScenarioError).problems;
    }
    throw new Error('expected a ScenarioError');
  };
  it('barrier outside the transect', () => {
    const p = problems({ ...base, barrier: { lengthKm: 1, options: [{ name: 'x', fromKm: 29.9, widthM: 500 }] } });
    expect(p[0].path).toBe('barrier.options[0].fromKm');
    expect(p[0].message).toMatch(/must lie within the transect \[0, 30\] km/);
  });
  it('width ≤ 0', () => {
    const p = problems({ ...base, barrier: { lengthKm: 1, options: [{ name: 'x', fromKm: 10, widthM: 0 }] } });
    expect(p[0].path).toBe('barrier.options[0].widthM');
    expect(p[0].message).toMatch(/≥ 1/);
  });
  it('site inside the initial infestation', () => {
    const p = problems({ ...base, sites: [{ name: 'Mill', atKm: 2 }] });
    expect(p[0].path).toBe('sites[0].atKm');
    expect(p[0].message).toMatch(/inside the current infestation/);
  });
  it('clearing over the infestation', () => {
    const p = problems({ ...base, barrier: { lengthKm: 1, options: [{ name: 'x', fromKm: 2, widthM: 500 }] } });
    expect(p[0].message).toMatch(/overlaps the current infestation/);
  });
  it('options built in code are checked the same way', () => {
    const s = pointScenario(parseScenario(base));
    expect(() => checkOption(s, { name: 'x', fromKm: 40, widthM: 100, cover: 'clearing' })).toThrow(/within the transect/);
    expect(() => checkOption(s, { name: 'x', fromKm: 10, widthM: -5, cover: 'clearing' })).toThrow(/must be > 0 m/);
    expect(() => analyseOption(s, { name: 'x', fromKm: 1, widthM: 100, cover: 'clearing' })).toThrow(/overlaps the current infestation/);
  });
});

describe('baseline shared between options', () => {
  it('gives the same option result as a baseline computed inside', () => {
    const s = synthetic({ growth: { form: 'logistic', rate: 1 }, mortalityOpen: 3 }, 600, 20);
    const o = s.barrier!.options[0];
    const shared = analyseBaseline(s, [o], { record: false });
    const a = analyseOption(s, o, { record: false, baseline: shared, widthCurve: false }).result;
    const b = analyseOption(s, o, { record: false, widthCurve: false }).result;
    expect(a.sites.map((x) => x.delayYears)).toEqual(b.sites.map((x) => x.delayYears));
  });
});

describe('critical width wherever the clearing lies', () => {
  // Regression: host forest "beyond" the clearing was judged by each segment's midpoint, so a cut beyond the
  // middle of a long single stand, or a front moving left, was told "no strong Allee effect".
  // Reference: the phase-plane criterion (methods note §5.3) for cubic growth, D = r = 1, a = 0.25, gap D = 1,
  // m = 1, α = ½ gives W* = 596.1 m (G1); the bisection bracket must contain it on either side.
  const s = synthetic(cubic, 800, 40, {
    title: 'outbreak in the middle',
    transect: { segments: [{ habitat: 'host-forest', lengthKm: 40, stocking: 1, stemsPerHa: 400 }] },
    infestation: { fromKm: 18, toKm: 22 },
    sites: [
      { name: 'West hamlet', atKm: 4 },
      { name: 'East hamlet', atKm: 36 },
    ],
    barrier: { lengthKm: 2, options: [{ name: 'west cut', fromKm: 12, widthM: 800 }, { name: 'east cut', fromKm: 27, widthM: 800 }] },
  });
  for (const k of [0, 1]) {
    it(`${k === 0 ? 'front moving left' : 'cut beyond the middle of the stand'}: bracket contains the phase-plane width`, () => {
      const { result: r } = analyseOption(s, s.barrier!.options[k], { record: false, widthCurve: false });
      expect(r.criticalWidth.applicable).toBe(true);
      const [lo, hi] = r.criticalWidth.bracketM!;
      expect(lo).toBeLessThanOrEqual(596.1);
      expect(hi).toBeGreaterThanOrEqual(596.1);
      expect(r.verdict.kind).toBe('holds');
    });
  }
});

describe('a pest whose front cannot advance is never "held"', () => {
  it('cubic with a = 0.6 (c = √(2rD)(½ − a) < 0: the front retreats; McKean 1970): not reached, with or without the clearing', () => {
    const s = synthetic({ growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.6 } }, 800, 20);
    const base = analyseBaseline(s, s.barrier!.options, { record: false });
    // The baseline shows the retreat: no site is reached and the front never passes the clearing.
    expect(base.summary.arrivals.every((a) => a.arrivalYears === null)).toBe(true);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { baseline: base, record: false, widthCurve: false });
    expect(r.verdict.kind).toBe('not-reached');
    expect(r.verdict.sentence).toMatch(/cannot advance even through unbroken host forest/);
    expect(r.sites.map((x) => x.kind)).toEqual(['not-reached', 'not-reached']);
  });
});

describe('mate-finding without crowding, hosts eaten: an Allee threshold without a carrying capacity', () => {
  // P(u) = 1 − e^(−u/θ), b = 3, m = 1, θ = 0.1, γ = 0: threshold −θ ln(1 − m/b) = 0.0405 (methods note §5.2, own
  // algebra) but no capacity; hosts eaten at c = 0.5 bound the population. Regression: this was reported as
  // "no strong Allee effect", so no width could ever hold.
  const mf = { growth: { form: 'mate-finding', birthRate: 3, deathRate: 1, crowding: 0, mating: 'exponential', mateScale: 0.1 }, hostKillRate: 0.5, mortalityOpen: 4, edgePreferenceOpen: 0.8 };
  it('a critical width is bracketed and a wider clearing holds (the pest dies out at it)', () => {
    const s = synthetic(mf, 1500, 40);
    const { result: r } = analyseOption(s, s.barrier!.options[0], { record: false, widthCurve: false });
    expect(r.criticalWidth.applicable).toBe(true);
    expect(r.criticalWidth.bracketM).not.toBeNull();
    expect(r.criticalWidth.phasePlaneM).toBeNull();
    expect(r.criticalWidth.phasePlaneNote).toMatch(/no carrying capacity/);
    expect(r.verdict.kind).toBe('holds');
    expect(r.pinning.method).toMatch(/die-out/);
    expect(r.verdict.why).toMatch(/strong Allee effect/);
  });
});
