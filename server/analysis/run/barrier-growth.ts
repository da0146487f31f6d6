/**
 * Growth-form facts the barrier analysis needs: the potential F(u) = ∫₀ᵘ f (first integral), the level
 * at which a population beyond a clearing counts as established, and the cell reaction for Newton.
 */
import { alleeThreshold, equilibria, lowDensityRate, perCapitaRate, type PointGrowth } from '../../model/growth.ts';
import type { CellReaction } from '../../numerics/steady.ts';
import { potentialZero } from '../../numerics/steady-blocking.ts';
import type { TransectProblem } from '../../problem/discretise.ts';

/** 10-point Gauss–Legendre nodes and weights on [−1, 1] (Abramowitz & Stegun 1964, Table 25.4). */
const GL_X = [
  -0.9739065285171717, -0.8650633666889845, -0.6794095682990244, -0.4333953941292472, -0.1488743389816312,
  0.1488743389816312, 0.4333953941292472, 0.6794095682990244, 0.8650633666889845, 0.9739065285171717,
];
const GL_W = [
  0.0666713443086881, 0.1494513491505806, 0.2190863625159820, 0.2692667193099963, 0.2955242247147529,
  0.2955242247147529, 0.2692667193099963, 0.2190863625159820, 0.1494513491505806, 0.0666713443086881,
];

/**
 * F(u) = ∫₀ᵘ s·g(s, h) ds at host fraction h. Closed form for the cubic
 * (`F = r(−u⁴/4 + (1+a)h u³/3 − a h² u²/2)`); composite Gauss–Legendre (8 panels × 10 points) otherwise,
 * exact to round-off for polynomial integrands of degree ≤ 19 and smooth enough for the mating forms.
 */
export function potential(g: PointGrowth, h: number): (u: number) => number {
  if (g.form === 'allee-cubic') {
    const r = g.rate;
    const a = g.alleeThreshold;
    return (u) => r * (-(u ** 4) / 4 + ((1 + a) * h * u ** 3) / 3 - (a * h * h * u * u) / 2);
  }
  const pc = perCapitaRate(g);
  return (u) => {
    if (u <= 0) return 0;
    const panels = 8;
    const w = u / panels;
    let s = 0;
    for (let p = 0; p < panels; p++) {
      const mid = (p + 0.5) * w;
      for (let j = 0; j < 10; j++) {
        const x = mid + 0.5 * w * GL_X[j];
        s += GL_W[j] * x * pc(x, h);
      }
    }
    return 0.5 * w * s;
  };
}

/**
 * Strong Allee effect with a carrying capacity at host fraction h: small groups fail and the density settles
 * at a capacity (what the bistable front, its potential F and the phase-plane criterion need).
 */
export function strongAllee(g: PointGrowth, h = 1): boolean {
  return lowDensityRate(g, h) < 0 && alleeThreshold(g, h) !== null && equilibria(g, h).capacity !== null;
}

/**
 * Zero of F above the Allee threshold at host fraction h: the largest density that the decaying
 * orbit beyond a blocking clearing can have. +∞ when F ≤ 0 up to capacity (the stand cannot be
 * invaded at all); null without a strong Allee effect.
 */
export function potentialThreshold(g: PointGrowth, h: number): number | null {
  // A bisection over a quadrature (some 50 potentials of 10-point rules): an analysis asks for the same few
  // (growth, stocking) pairs in each of its runs, so values are kept, keyed by the growth's numbers.
  const key = `${JSON.stringify(g)}|${h}`;
  const known = thresholdCache.get(key);
  if (known !== undefined) return known;
  if (thresholdCache.size >= THRESHOLD_CACHE_SIZE) thresholdCache.clear();
  const v = computePotentialThreshold(g, h);
  thresholdCache.set(key, v);
  return v;
}

/** Most (growth, stocking) pairs kept by potentialThreshold (a 1000-draw ensemble needs a few thousand). */
const THRESHOLD_CACHE_SIZE = 20_000;
const thresholdCache = new Map<string, number | null>();

function computePotentialThreshold(g: PointGrowth, h: number): number | null {
  if (!strongAllee(g, h)) return null;
  const { threshold, capacity } = equilibria(g, h);
  const F = potential(g, h);
  if (F(capacity!) <= 0) return Infinity;
  return potentialZero(F, threshold!, capacity!);
}

/**
 * Density at which a population in host forest at host fraction h counts as established beyond a
 * clearing: halfway between the potential threshold θ and the capacity (a pinned front's fringe
 * never exceeds θ); half the capacity without an Allee effect.
 */
export function establishedLevel(g: PointGrowth, h: number): number {
  const cap = equilibria(g, h).capacity;
  if (cap === null || !(h > 0)) return Infinity;
  const theta = potentialThreshold(g, h);
  if (theta === null) return 0.5 * cap;
  if (!Number.isFinite(theta)) return Infinity;
  return 0.5 * (theta + cap);
}

/**
 * Cell reaction f_i(u) and ∂f_i/∂u for Newton on the unsplit residual, with the host fraction frozen
 * at `h` (per cell). Host cells: u·g(u, h); others: −m u. The derivative uses a central difference with
 * a relative step (error ~1e-10 relative, ample for Newton and the Sturm count).
 */
export function cellReaction(problem: TransectProblem, h: Float64Array): CellReaction {
  const { hostAtCells, mortalityAtCells, perCapita } = problem;
  const n = hostAtCells.length;
  return (u, f, df) => {
    for (let i = 0; i < n; i++) {
      const x = u[i];
      if (!hostAtCells[i]) {
        f[i] = -mortalityAtCells[i] * x;
        df[i] = -mortalityAtCells[i];
        continue;
      }
      const hi = h[i];
      f[i] = x * perCapita(x, hi);
      const d = 1e-6 * Math.max(Math.abs(x), 1e-4);
      const up = x + d;
      const lo = x - d;
      df[i] = (up * perCapita(up, hi) - lo * perCapita(lo, hi)) / (2 * d);
    }
  };
}

/**
 * True when a front cannot advance through unbroken host forest at host fraction h: either the pest has
 * no positive equilibrium there and declines at every density, or it has a strong Allee effect with
 * F(capacity) ≤ 0 (the travelling front of the bistable equation moves backwards when ∫₀ᴷ u g du ≤ 0;
 * McKean 1970; Lewis & Kareiva 1993 for the cubic, where this is a ≥ ½).
 */
export function frontCannotAdvance(g: PointGrowth, h: number): boolean {
  if (!(h > 0)) return true;
  const { capacity } = equilibria(g, h);
  if (lowDensityRate(g, h) > 0) return false;
  if (capacity === null) return lowDensityRate(g, h) < 0 && alleeThreshold(g, h) === null;
  if (!strongAllee(g, h)) return false;
  const F = potential(g, h);
  const threshold = alleeThreshold(g, h)!;
  // A standing front (F(K) = 0, e.g. a = ½) does not advance either; the slack absorbs round-off in F(K).
  return F(capacity) <= 1e-10 * Math.abs(F(threshold));
}
