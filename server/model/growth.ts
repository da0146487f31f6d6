import type { Growth } from './pest.ts';
import type { Resolved } from './quantity.ts';

/**
 * Growth forms of the insect in host forest. u = density relative to the capacity of fully stocked
 * host forest; h = remaining host fraction (stocking at the start, falling as trees die).
 *
 * - logistic:      du/dt = r u (h − u)                          (h = 1: Fisher 1937; Kolmogorov, Petrovsky & Piskunov 1937)
 * - allee-cubic:   du/dt = r u (h − u)(u − a h)                 (h = 1: Nagumo form; Lewis & Kareiva 1993)
 * - mate-finding:  du/dt = u (b h P(u) − m − γ u),  P ∈ {1, u/(θ+u), 1 − e^(−u/θ)}   (Dennis 1989; McCarthy 1997)
 */
export type PointGrowth = Resolved<Growth>;

/** Per-capita growth rate g(u, h) [1/yr]. */
export function perCapitaRate(g: PointGrowth): (u: number, h: number) => number {
  switch (g.form) {
    case 'logistic': {
      const r = g.rate;
      return (u, h) => r * (h - u);
    }
    case 'allee-cubic': {
      const r = g.rate;
      const a = g.alleeThreshold;
      return (u, h) => r * (h - u) * (u - a * h);
    }
    case 'mate-finding': {
      const { birthRate: b, deathRate: m, crowding: gam } = g;
      const theta = g.mateScale ?? 1;
      switch (g.mating) {
        case 'none':
          return (u, h) => b * h - m - gam * u;
        case 'saturating':
          return (u, h) => (b * h * u) / (theta + u) - m - gam * u;
        case 'exponential':
          // -expm1(-x) = 1 - e^{-x} without cancellation at small densities.
          return (u, h) => -b * h * Math.expm1(-u / theta) - m - gam * u;
      }
    }
  }
}

/** Mating probability P(u) (1 for forms without mate limitation). */
export function matingProbability(g: PointGrowth, u: number): number {
  if (g.form !== 'mate-finding' || g.mating === 'none') return 1;
  const theta = g.mateScale ?? 1;
  return g.mating === 'saturating' ? u / (theta + u) : -Math.expm1(-u / theta);
}

/** Per-capita rate as density tends to 0 [1/yr] at host fraction h: the linear growth rate that sets pulled front speeds. */
export function lowDensityRate(g: PointGrowth, h = 1): number {
  switch (g.form) {
    case 'logistic':
      return g.rate * h;
    case 'allee-cubic':
      return -g.rate * g.alleeThreshold * h * h;
    case 'mate-finding':
      return (g.mating === 'none' ? g.birthRate * h : 0) - g.deathRate;
  }
}

/** True when small founding groups decline (per-capita rate negative at low density yet positive higher up). */
export function hasStrongAllee(g: PointGrowth, h = 1): boolean {
  return lowDensityRate(g, h) < 0 && alleeThreshold(g, h) !== null;
}

/**
 * Positive equilibria of the per-capita rate at host fraction h: the Allee threshold (unstable, lower)
 * and the carrying capacity (stable, upper). Null entries where they do not exist.
 *
 * @remarks Cubic: a·h and h. Mate-finding, saturating: roots of γu² + (m + γθ − b h)u + mθ = 0.
 * Exponential mating and general cases: bracketing on a fine log grid plus bisection.
 */
export function equilibria(g: PointGrowth, h = 1): { threshold: number | null; capacity: number | null } {
  switch (g.form) {
    case 'logistic':
      return { threshold: null, capacity: h > 0 ? h : null };
    case 'allee-cubic':
      return h > 0 ? { threshold: g.alleeThreshold * h, capacity: h } : { threshold: null, capacity: null };
    case 'mate-finding': {
      const { birthRate: b, deathRate: m, crowding: gam } = g;
      if (g.mating === 'none') {
        const net = b * h - m;
        if (gam === 0) return { threshold: null, capacity: null };
        return { threshold: null, capacity: net > 0 ? net / gam : null };
      }
      const theta = g.mateScale ?? 1;
      if (g.mating === 'saturating') {
        if (gam === 0) {
          const net = b * h - m;
          return net > 0 ? { threshold: (theta * m) / net, capacity: null } : { threshold: null, capacity: null };
        }
        const B = m + gam * theta - b * h;
        const disc = B * B - 4 * gam * m * theta;
        if (disc < 0 || B >= 0) return { threshold: null, capacity: null };
        const sq = Math.sqrt(disc);
        // Stable form of the quadratic roots.
        const q = -0.5 * (B - sq);
        const big = q / gam;
        const small = (m * theta) / q;
        return { threshold: m > 0 ? small : null, capacity: big };
      }
      return scanRoots(perCapitaRate(g), h);
    }
  }
}

/** Sign changes of g(u, h) on u ∈ (1e-9, 1e3), refined by bisection. */
function scanRoots(f: (u: number, h: number) => number, h: number): { threshold: number | null; capacity: number | null } {
  let threshold: number | null = null;
  let capacity: number | null = null;
  let uPrev = 1e-9;
  let fPrev = f(uPrev, h);
  for (let k = 1; k <= 1200; k++) {
    const u = 1e-9 * Math.pow(1e12, k / 1200);
    const fu = f(u, h);
    if ((fPrev < 0 && fu >= 0) || (fPrev > 0 && fu <= 0)) {
      let lo = uPrev;
      let hi = u;
      for (let it = 0; it < 200 && hi - lo > 1e-15 * hi; it++) {
        const mid = 0.5 * (lo + hi);
        if (Math.sign(f(mid, h)) === Math.sign(f(lo, h))) lo = mid;
        else hi = mid;
      }
      const root = 0.5 * (lo + hi);
      if (fPrev < 0) threshold ??= root;
      else capacity ??= root;
    }
    uPrev = u;
    fPrev = fu;
  }
  return { threshold, capacity };
}

/** Allee threshold at host fraction h, or null when small groups grow (no strong Allee effect). */
export function alleeThreshold(g: PointGrowth, h = 1): number | null {
  return equilibria(g, h).threshold;
}

/**
 * Bound on |d g / d ln u| plus the depletion rate scale [1/yr] at densities up to `uMax`; the reaction
 * integrator takes substeps so that this times the substep is at most 0.5.
 */
export function reactionStiffness(g: PointGrowth, hostKillRate: number, uMax = 2): number {
  let s: number;
  switch (g.form) {
    case 'logistic':
      s = g.rate * uMax;
      break;
    case 'allee-cubic':
      s = g.rate * uMax * (2 * uMax + 1 + g.alleeThreshold);
      break;
    case 'mate-finding':
      s = g.birthRate + g.crowding * uMax;
      break;
  }
  return s + hostKillRate * uMax;
}

/** Growth-rate scale of the pest [1/yr]: the rate parameter that sets how fast local dynamics run. */
export function growthRateScale(g: PointGrowth): number {
  switch (g.form) {
    case 'logistic':
    case 'allee-cubic':
      return g.rate;
    case 'mate-finding':
      return Math.max(g.birthRate, g.deathRate, 1e-6);
  }
}
