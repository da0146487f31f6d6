/**
 * Thinning mosaics: periodic patterns of host forest and host-free strips. Exact asymptotic spread rate
 * from the dispersion relation (transfer matrices with the edge-jump condition), the homogenised estimate,
 * the persistence test λ(0) > 0, and a measured speed from a simulated long pattern.
 */
import type { PointScenario } from '../model/scenario.ts';
import { habitatCoefficients } from '../model/habitat.ts';
import { lowDensityRate } from '../model/growth.ts';
import { blochEigenvalue, homogenised, spreadingSpeed, type Patch } from '../numerics/dispersion.ts';
import { LevelCrossings, type Observer, type FieldState } from '../numerics/time-loop.ts';
import { cellIndexAt } from '../numerics/grid.ts';
import type { MosaicResult } from './result.ts';
import type { Piece } from './layout.ts';
import { chooseResolution, discretise, growthRateScale } from './discretise.ts';
import { runLayout } from './simulate.ts';
import { spreadRate } from './speed.ts';
import { strongAllee } from './barrier-growth.ts';

/** A periodic forest/gap pattern (strip thinning). */
export interface MosaicSpec {
  name: string;
  /** Host-forest strip width along the direction of spread [m]. */
  forestM: number;
  /** Host-free strip width [m]. */
  gapM: number;
  cover: 'clearing' | 'non-host-forest';
  /** Host stocking of the forest strips (default 1). */
  stocking?: number;
  /** Simulate a long pattern and measure the speed (default true). */
  measure?: boolean;
}

/** The period's patches (forest then gap) for the linearised model at low density. */
export function mosaicPatches(s: PointScenario, m: MosaicSpec): Patch[] {
  const h = m.stocking ?? 1;
  const host = habitatCoefficients(s.pest, 'host-forest');
  const gap = habitatCoefficients(s.pest, m.cover);
  return [
    { lengthKm: m.forestM / 1000, diffusion: host.diffusion, residence: host.residence, rate: lowDensityRate(s.pest.growth, h) },
    { lengthKm: m.gapM / 1000, diffusion: gap.diffusion, residence: gap.residence, rate: -gap.mortality },
  ];
}

/** Density whose passage at mid-forest probes times the front (5 % of capacity; methods note (server/numerics/README.md) §9.3). */
export const PASSAGE_LEVEL = 0.05;

/** Passage times of a density level at chosen cells (dense output between step ends); stops the run once all have passed. */
class PassageRecorder implements Observer {
  private readonly crossings: LevelCrossings;
  constructor(
    private readonly cells: number[],
    level: number,
  ) {
    this.crossings = new LevelCrossings(cells.length, level);
  }
  get times(): (number | null)[] {
    return this.crossings.times;
  }
  initialize(st: FieldState): void {
    // A cell already at the level at the start is dated by its first step, as a passage would be.
    this.crossings.start(st.t, (k) => st.u[this.cells[k]], false);
  }
  handle(st: FieldState): boolean {
    this.crossings.update(st.t, (k) => st.u[this.cells[k]]);
    return this.crossings.allPassed();
  }
}

export interface MeasuredMosaicSpeed {
  kmPerYear: number | null;
  /** Passage times [yr] at the middle of each forest strip, and their positions [km]. */
  probesKm: number[];
  passageYears: (number | null)[];
  /** Fit window (years) and whether the Bramson log correction was used. */
  fromYears: number | null;
  toYears: number | null;
  logCorrected: boolean;
}

/**
 * Speed measured in a simulated pattern of `periods` periods, starting from the first forest strip fully
 * infested: passage times of the detection level at mid-forest probes, straight-line fit over the later
 * half. For growth without an Allee effect (pulled fronts) the fit includes the Bramson term −(3/(2s*)) ln t
 * (Bramson 1983; periodic media: Hamel, Nolen, Roquejoffre & Ryzhik 2013), methods note §9.3.
 */
export function measureMosaicSpeed(s: PointScenario, m: MosaicSpec, opts: { level?: number; periods?: number; decayRate?: number | null; guessKmPerYear?: number | null; shouldCancel?: () => boolean } = {}): MeasuredMosaicSpeed {
  const periods = opts.periods ?? 100;
  const lf = m.forestM / 1000;
  const lg = m.gapM / 1000;
  const L = lf + lg;
  const h = m.stocking ?? 1;
  const pieces: Piece[] = [];
  for (let k = 0; k < periods; k++) {
    pieces.push({ fromKm: k * L, toKm: k * L + lf, habitat: 'host-forest', stocking: h, stemsPerHa: 0, segment: 2 * k, barrier: false });
    pieces.push({ fromKm: k * L + lf, toKm: (k + 1) * L, habitat: m.cover, stocking: 0, stemsPerHa: 0, segment: 2 * k + 1, barrier: false });
  }
  const total = periods * L;
  const guess = opts.guessKmPerYear && opts.guessKmPerYear > 0 ? opts.guessKmPerYear : 2 * Math.sqrt(s.pest.diffusionHost * growthRateScale(s.pest.growth));
  const horizon = Math.min(1.5 * (total / guess), 2000);
  const sm: PointScenario = {
    ...s,
    transect: {
      originKm: 0,
      ends: { left: 'reflecting', right: 'reflecting' },
      segments: pieces.map((p) =>
        p.habitat === 'host-forest'
          ? { habitat: 'host-forest' as const, lengthKm: p.toKm - p.fromKm, stocking: h, stemsPerHa: 0 }
          : { habitat: p.habitat as 'clearing' | 'non-host-forest', lengthKm: p.toKm - p.fromKm },
      ),
    },
    infestation: { fromKm: 0, toKm: lf, density: 1 },
    sites: [],
    horizonYears: horizon,
  };
  const probesKm = Array.from({ length: periods }, (_, k) => k * L + 0.5 * lf);
  const resolution = chooseResolution(sm, pieces);
  // Probes read cell values (mid-forest cells); the recorder stops the run once the last probe is passed.
  const problem = discretise(sm, pieces, resolution);
  const grid = problem.grid;
  const cells = probesKm.map((x) => cellIndexAt(grid, x));
  const lastProbe = Math.max(0, periods - 3);
  const recorder = new PassageRecorder(cells.slice(0, lastProbe + 1), opts.level ?? PASSAGE_LEVEL);
  runLayout({ scenario: sm, pieces, resolution, problem, record: false, observers: [recorder], shouldCancel: opts.shouldCancel });
  const times = recorder.times;
  const pulled = !strongAllee(s.pest.growth, h) && opts.decayRate != null && opts.decayRate > 0;
  const t: number[] = [];
  const x: number[] = [];
  times.forEach((tt, k) => {
    if (tt !== null && k >= 1) {
      t.push(tt);
      x.push(probesKm[k]);
    }
  });
  const fit = spreadRate(t, x, { lowKm: -Infinity, highKm: Infinity }, 1, pulled ? opts.decayRate! : undefined);
  return {
    kmPerYear: fit ? fit.kmPerYear : null,
    probesKm: probesKm.slice(0, lastProbe + 1),
    passageYears: times,
    fromYears: fit ? fit.fromYears : null,
    toYears: fit ? fit.toYears : null,
    logCorrected: pulled,
  };
}

/** Speed in unbroken host forest at the same stocking [km/yr]: 2√(D r0) without an Allee effect, else measured. */
function intactSpeed(s: PointScenario, m: MosaicSpec, measure: boolean): number | null {
  const h = m.stocking ?? 1;
  const r0 = lowDensityRate(s.pest.growth, h);
  if (!strongAllee(s.pest.growth, h)) return r0 > 0 ? 2 * Math.sqrt(s.pest.diffusionHost * r0) : 0;
  if (!measure) return null;
  // Strong Allee effect: pushed front, measured in a pattern with vanishing gaps (1 m of host forest).
  const r = measureMosaicSpeed(s, { ...m, gapM: 0.001, forestM: Math.max(m.forestM + m.gapM, 100) });
  return r.kmPerYear;
}

/** Dispersion curve for charts: λ(s) on s ∈ [0, 3 s*] (or a default range). */
function dispersionCurve(patches: Patch[], sStar: number | null): { s: number[]; lambda: number[] } {
  const top = sStar && sStar > 0 ? 3 * sStar : 3 * Math.sqrt(Math.max(Math.abs(patches[0].rate), 1e-3) / patches[0].diffusion);
  const s = Array.from({ length: 41 }, (_, k) => (top * k) / 40);
  return { s: s.map((v) => Number(v.toPrecision(6))), lambda: s.map((v) => Number(blochEigenvalue(patches, v).toPrecision(6))) };
}

/** Full result for one mosaic, as in the result document. */
export function analyseMosaic(s: PointScenario, m: MosaicSpec, opts: { shouldCancel?: () => boolean } = {}): MosaicResult {
  const patches = mosaicPatches(s, m);
  const h = m.stocking ?? 1;
  const allee = strongAllee(s.pest.growth, h);
  const exact = spreadingSpeed(patches);
  const hom = homogenised(patches);
  const measure = m.measure ?? true;
  const lambda0 = exact.lambda0;
  const linearPersists = lambda0 > 0;
  const measured = measure && (linearPersists || allee) ? measureMosaicSpeed(s, m, { decayRate: exact.decayRate, guessKmPerYear: exact.speed, shouldCancel: opts.shouldCancel }) : null;
  const intact = intactSpeed(s, m, measure) ?? 0;
  const exactKmPerYear = allee ? null : exact.speed;
  const best = exactKmPerYear ?? measured?.kmPerYear ?? null;
  const persists = allee ? best !== null && best > 0 : linearPersists;
  let kind: MosaicResult['kind'];
  if (!persists || best === null || best <= 0) kind = 'stops';
  else kind = best > intact * (1 + 1e-3) ? 'speeds-up' : 'slows';
  const fmt = (x: number | null) => (x === null ? '—' : `${x.toFixed(2)} km/yr`);
  const pattern = `${m.forestM} m host forest / ${m.gapM} m ${m.cover === 'clearing' ? 'open' : 'non-host forest'}`;
  const sentence =
    kind === 'stops'
      ? allee
        ? `${m.name} (${pattern}): the pest does not spread through this pattern in the simulation.`
        : `${m.name} (${pattern}): the pest cannot persist in this pattern (principal growth rate λ(0) = ${lambda0.toFixed(3)} /yr ≤ 0).`
      : `${m.name} (${pattern}): spreads at ${fmt(best)} (${allee ? 'measured, strong Allee effect: no linear formula' : 'exact, dispersion relation'}) against ${fmt(intact)} in unbroken host forest — ${kind === 'speeds-up' ? 'FASTER than without thinning' : 'slower'}.`;
  return {
    name: m.name,
    forestM: m.forestM,
    gapM: m.gapM,
    cover: m.cover,
    lambda0,
    persists,
    exactKmPerYear,
    homogenisedKmPerYear: allee ? null : hom.speed,
    intactKmPerYear: intact,
    measuredKmPerYear: measured?.kmPerYear ?? null,
    kind,
    sentence,
    curve: dispersionCurve(patches, exact.decayRate),
    decayRate: allee ? null : exact.decayRate,
    homogenisedNote: 'fine-grained limit (residence-index weighting); reported beside the exact value, not asserted equal: it is accurate only when strips are much narrower than √(D/|ε|)',
    measuredLogCorrected: measured?.logCorrected ?? false,
  };
}
