/**
 * Critical width of a host-free gap that blocks a bistable front: the first-integral (phase-plane)
 * criterion.
 *
 * Setting (x in km): host forest for x < 0 and x > W, `D1 u'' + f(u) = 0` with F(u) = ∫₀ᵘ f; a gap
 * 0 < x < W with `D2 U'' − m U = 0`; at both edges flux continuity `D1 u' = D2 U'` and the density jump
 * `U = k u` (k = ρ_gap/ρ_forest, the edge-behaviour jump; k = 1 is continuous density).
 * A blocking steady state comes from the capacity K_L at −∞ (`D1 u'²/2 = F_L(K_L) − F_L(u)`, u' < 0),
 * enters the gap at p = u(0⁻), crosses it linearly, and leaves at q = u(W⁺) on the orbit that decays to 0
 * (`D1 u'²/2 = −F_R(u)`, which needs 0 < q ≤ θ_R, the zero of F_R above the Allee threshold). Across the gap
 * the "energy" `E = D2 U'²/2 − m U²/2` is conserved, so q solves `−(D1/D2) F_R(q) − (m/2) k² q² = E(p)`
 * and `W(p) = (1/β) ln[(β U1 + V1)/(β U0 + V0)]`, β = √(m/D2). The critical width is W* = min_p W(p):
 * there two steady states (stable and saddle) merge in a saddle-node, and for W < W* the front passes.
 *
 * Background: first integrals of `D u'' + f(u) = 0` (e.g. Fife 1979, Mathematical Aspects of
 * Reacting and Diffusing Systems, Lecture Notes in Biomathematics 28); blocking of fronts by gaps with
 * interface conditions: Hamel, Lutscher & Zhang, "Propagation and blocking in a two-patch
 * reaction-diffusion model". Edge condition: Ovaskainen & Cornell (2003); Maciel & Lutscher (2013).
 */
import { goldenSectionMin } from './minimise.ts';

export interface BlockingProblem {
  /** D in the forest on both sides [km²/yr]. */
  diffusionForest: number;
  /** F_L(u) = ∫₀ᵘ f_L for the forest the front comes from. */
  potentialLeft: (u: number) => number;
  /** Capacity of the forest the front comes from (stable state behind the front). */
  capacityLeft: number;
  /** F_R(u) = ∫₀ᵘ f_R for the forest beyond the gap. */
  potentialRight: (u: number) => number;
  /** Zero of F_R above the Allee threshold (largest density the exit orbit can have). */
  thetaRight: number;
  /** D in the gap [km²/yr]. */
  diffusionGap: number;
  /** Per-capita death rate in the gap [1/yr], ≥ 0. */
  mortalityGap: number;
  /** Density jump u_gap/u_forest at the edges (ρ_gap/ρ_forest). */
  jump: number;
}

export interface BlockingResult {
  /** Critical width [km]; null when no blocking steady state exists for any width tried. */
  criticalKm: number | null;
  /** Density at the near edge, forest side, of the critical steady state. */
  pAtCritical: number | null;
  /** Density at the far edge, forest side, of the critical steady state. */
  qAtCritical: number | null;
  note: string;
}

/**
 * Widths W(p) of all blocking steady states with near-edge density p [km] (empty when none).
 * By default only states that fall monotonically beyond the gap (u'(W⁺) < 0); with `rising` also those
 * that rise beyond the gap to θ and then decay (a bump: these are the unstable, saddle-type states, and
 * they never give a smaller width).
 */
export function blockingWidths(pr: BlockingProblem, p: number, rising = false): { widthKm: number; q: number; rising: boolean }[] {
  const { diffusionForest: d1, diffusionGap: d2, mortalityGap: m, jump: k } = pr;
  const drop = pr.potentialLeft(pr.capacityLeft) - pr.potentialLeft(p);
  if (!(drop >= 0)) return [];
  const slope = -Math.sqrt((2 * drop) / d1); // u'(0−)
  const u0 = k * p;
  const v0 = (d1 / d2) * slope; // U'(0+) from flux continuity
  const energy = 0.5 * d2 * v0 * v0 - 0.5 * m * u0 * u0;
  const h = (q: number) => -(d1 / d2) * pr.potentialRight(q) - 0.5 * m * k * k * q * q - energy;
  const roots = rootsOn(h, 0, pr.thetaRight, 400);
  const out: { widthKm: number; q: number; rising: boolean }[] = [];
  for (const q of roots) for (const sign of rising ? [-1, 1] : [-1]) {
    if (!(q > 0)) continue;
    const fr = pr.potentialRight(q);
    const v1 = sign * (d1 / d2) * Math.sqrt(Math.max(0, (-2 * fr) / d1));
    const u1 = k * q;
    let w: number;
    if (m > 0) {
      const beta = Math.sqrt(m / d2);
      const a0 = beta * u0 + v0;
      const a1 = beta * u1 + v1;
      // β U + U' = 2βA e^{βx} keeps its sign across the gap and grows by e^{βW}; U is positive at
      // both ends and convex or monotone in between, hence positive throughout.
      if (!(a0 * a1 > 0)) continue;
      w = Math.log(a1 / a0) / beta;
    } else {
      // No mortality: U is linear and U' constant, so the energy match means v1 = v0.
      w = (u1 - u0) / v0;
    }
    if (w > 0 && Number.isFinite(w)) out.push({ widthKm: w, q, rising: sign > 0 });
  }
  return out;
}

/** Sign changes of h on (a, b] on a uniform scan, refined by bisection; includes a root at b itself. */
function rootsOn(h: (x: number) => number, a: number, b: number, n: number): number[] {
  const roots: number[] = [];
  let xPrev = a + (b - a) * 1e-9;
  let hPrev = h(xPrev);
  for (let j = 1; j <= n; j++) {
    const x = a + ((b - a) * j) / n;
    const hx = h(x);
    if (hx === 0) roots.push(x);
    else if ((hPrev < 0 && hx > 0) || (hPrev > 0 && hx < 0)) {
      let lo = xPrev;
      let hi = x;
      let hLo = hPrev;
      for (let it = 0; it < 100 && hi - lo > 1e-15 * Math.max(1, hi); it++) {
        const mid = 0.5 * (lo + hi);
        const hm = h(mid);
        if ((hm < 0) === (hLo < 0)) {
          lo = mid;
          hLo = hm;
        } else hi = mid;
      }
      roots.push(0.5 * (lo + hi));
    }
    xPrev = x;
    hPrev = hx;
  }
  return roots;
}

function minWidth(pr: BlockingProblem, p: number): { widthKm: number; q: number } | null {
  let best: { widthKm: number; q: number } | null = null;
  for (const r of blockingWidths(pr, p)) if (!best || r.widthKm < best.widthKm) best = r;
  return best;
}

/**
 * W* = min over p ∈ (0, K_L) of W(p): a scan of `nScan` points, then golden-section refinement around
 * the smallest value.
 */
export function criticalGapWidth(pr: BlockingProblem, nScan = 1200): BlockingResult {
  if (!(pr.potentialLeft(pr.capacityLeft) > 0)) {
    return { criticalKm: 0, pAtCritical: null, qAtCritical: null, note: 'the front does not advance even in unbroken forest (F(capacity) ≤ 0), so no clearing is needed to stop it' };
  }
  if (!(pr.thetaRight > 0)) {
    return { criticalKm: null, pAtCritical: null, qAtCritical: null, note: 'the forest beyond has no Allee threshold: any insects that cross found a growing population, so no width blocks' };
  }
  const K = pr.capacityLeft;
  let bestJ = -1;
  let bestW = Infinity;
  const ws: number[] = [];
  for (let j = 1; j < nScan; j++) {
    const r = minWidth(pr, (K * j) / nScan);
    const w = r ? r.widthKm : Infinity;
    ws.push(w);
    if (w < bestW) {
      bestW = w;
      bestJ = j;
    }
  }
  if (bestJ < 0) return { criticalKm: null, pAtCritical: null, qAtCritical: null, note: 'no blocking steady state found' };
  // Golden section on [p_{j−1}, p_{j+1}] (W(p) is smooth near its minimum on one branch).
  const w = (p: number) => minWidth(pr, p)?.widthKm ?? Infinity;
  const pStar = goldenSectionMin(w, (K * Math.max(bestJ - 1, 1e-6)) / nScan, (K * Math.min(bestJ + 1, nScan - 1e-6)) / nScan, 1e-14 * K, 120).x;
  const r = minWidth(pr, pStar);
  const wStar = Math.min(bestW, r?.widthKm ?? Infinity);
  return {
    criticalKm: wStar,
    pAtCritical: r && r.widthKm <= bestW ? pStar : (K * bestJ) / nScan,
    qAtCritical: r?.q ?? null,
    note: 'first-integral (phase-plane) criterion: smallest gap width with a blocking steady state',
  };
}

/** Zero of F in (lo, hi) by bisection, F(lo) < 0 < F(hi) assumed; null if there is no sign change. */
export function potentialZero(potential: (u: number) => number, lo: number, hi: number): number | null {
  let fa = potential(lo);
  const fb = potential(hi);
  if (!(fa < 0 && fb >= 0)) return fb < 0 ? null : fa >= 0 ? lo : null;
  let a = lo;
  let b = hi;
  for (let it = 0; it < 200 && b - a > 1e-15 * hi; it++) {
    const m = 0.5 * (a + b);
    const fm = potential(m);
    if (fm < 0) {
      a = m;
      fa = fm;
    } else b = m;
  }
  return 0.5 * (a + b);
}
