/** Verification of a pinned front: the steady state next to the clearing (Newton, stability) or die-out beyond it. */
import { solveSteadyState, linearStability } from '../../numerics/steady.ts';
import { alleeThreshold, equilibria, lowDensityRate } from '../../model/growth.ts';
import type { PointScenario } from '../../model/scenario.ts';
import { growthRateScale } from '../../problem/discretise.ts';
import { cellReaction, potentialThreshold, strongAllee } from './barrier-growth.ts';
import { hasStrongAllee } from '../../model/growth.ts';

import { isBeyond, type BarrierGeometry } from '../../problem/geometry.ts';
import { approachCells, isPresent } from './watches.ts';
import { type WindowSolver } from './window-solver.ts';

/** How a pinned front was (or could be) verified. */
export type PinningMode = 'steady-state' | 'dies-out' | 'none';

export interface Judgement {
  verified: boolean;
  mode: PinningMode;
  method: string;
  detail: string;
  /** Year of verification. */
  atYears: number | null;
  /** The verified steady state (cells of the judge's problem), when one was computed. */
  steady: Float64Array | null;
  leadingEigenvalue: number | null;
}

/** Which verification applies: exact steady state (hosts not depleted), die-out (hosts depleted), or none. */
export function pinningMode(s: PointScenario, hBeyond: number): PinningMode {
  const g = s.pest.growth;
  // With host loss the test is die-out, which needs only an Allee threshold (a population without crowding
  // is still bounded by the hosts it eats); a steady front needs a carrying capacity as well.
  if (s.pest.hostKillRate > 0) return hasStrongAllee(g, hBeyond) ? 'dies-out' : 'none';
  return strongAllee(g, hBeyond) ? 'steady-state' : 'none';
}

/** Shortest guarantee [yr] the cubic die-out bound must give before the pest counts as gone. */
export const DIE_OUT_GUARANTEE_YEARS = 1e6;

export const PINNING_METHODS: Record<PinningMode, string> = {
  'steady-state':
    "Newton on the unsplit finite-volume steady-state equations from the run's state, then a Sturm count on the symmetrised Jacobian (no unstable mode)",
  'dies-out':
    'die-out check: with hosts being consumed there is no steady front, so the pest must die out at the clearing; a comparison (upper-solution) bound on the density everywhere in the computational window shows it cannot regrow',
  none: 'a clearing cannot stop this pest for good: small groups do not die out in the forest beyond (no strong Allee effect), so any insects that cross start a growing population',
};

/**
 * Verifies pinning during a run (called every few steps).
 *
 * - steady-state (no host depletion): Newton on the unsplit residual from the run's state must converge to
 *   a state that is linearly stable (Sturm count 0), keeps the density beyond the clearing below the
 *   potential threshold θ (front on the near side), and that the run is close to and not moving away from
 *   (checked again one interval later).
 * - dies-out (host depletion): w = max_i u_i ρ_max/ρ_i bounds the density by the upper solution
 *   W ρ/ρ_max (constant in the residence-index variable, so diffusion leaves it unchanged). For growth that
 *   does not rise as hosts fall (logistic, mate-finding), W = w is an upper solution for ever once w lies
 *   below every cell's Allee threshold. For the cubic, whose threshold a·h falls with the hosts, the per-capita
 *   rate never exceeds k w² with k = r(1−a)²/(4a) whatever the hosts do, so W(t) = w/√(1 − 2k w² t) is an
 *   upper solution; it stays below 2w for 3/(8 k w²) years, and the check requires that to exceed
 *   {@link DIE_OUT_GUARANTEE_YEARS}.
 */
export class PinningJudge {
  readonly mode: PinningMode;
  private candidate: { t: number; u: Float64Array; distance: number } | null = null;
  private readonly beyondHost: number[] = [];
  private readonly thetaAtCells: Float64Array;
  private readonly capScale: number;
  private readonly rScale: number;
  /** Host cells just before the clearing (see {@link approachCells}) and the density that counts as a population there. */
  private readonly approach: { cells: number[]; level: Float64Array };
  /** True once a population was seen at the clearing's near side (die-out mode needs it to have arrived); callers may set it from an earlier run. */
  arrived = false;
  attempts = 0;
  constructor(
    private readonly solver: WindowSolver,
    geometry: BarrierGeometry,
  ) {
    const s = solver.scenario;
    const { grid, hostAtCells, stockingAtCells } = solver.problem;
    this.approach = approachCells(s, solver.problem, geometry);
    let hBeyond = 0;
    this.thetaAtCells = new Float64Array(grid.nCells).fill(Infinity);
    let capMax = 0;
    // Cells share a few stocking values: each equilibrium and threshold (a bisection over a quadrature) is
    // computed once per value, the same numbers as per cell.
    const capacityAt = new Map<number, number>();
    const thetaAt = new Map<number, number>();
    for (let i = 0; i < grid.nCells; i++) {
      if (!hostAtCells[i]) continue;
      const h = stockingAtCells[i];
      let cap = capacityAt.get(h);
      if (cap === undefined) capacityAt.set(h, (cap = equilibria(s.pest.growth, h).capacity ?? 0));
      capMax = Math.max(capMax, cap);
      if (isBeyond(geometry, grid.centersKm[i]) && h > 0) {
        this.beyondHost.push(i);
        hBeyond = Math.max(hBeyond, h);
        let theta = thetaAt.get(h);
        if (theta === undefined) thetaAt.set(h, (theta = potentialThreshold(s.pest.growth, h) ?? 0));
        this.thetaAtCells[i] = theta;
      }
    }
    this.mode = this.beyondHost.length ? pinningMode(s, hBeyond) : 'none';
    this.capScale = capMax > 0 ? capMax : 1;
    this.rScale = growthRateScale(s.pest.growth);
  }

  /** True when some cell just before the clearing holds a population (density at its level). */
  private present(u: Float64Array): boolean {
    return isPresent(this.approach, u);
  }

  /** Notes whether the pest has reached the clearing (call every step; checks run only every few). */
  note(u: Float64Array): void {
    if (!this.arrived && this.present(u)) this.arrived = true;
  }

  /** Returns a verified judgement, or null when pinning is not (yet) shown. */
  check(t: number, u: Float64Array, h: Float64Array): Judgement | null {
    this.note(u);
    switch (this.mode) {
      case 'none':
        return null;
      case 'dies-out':
        // Dying out is only "held at the clearing" once the pest has arrived there; before that (a window
        // ahead of a distant front, or a pest dying out on its own) nothing was held.
        if (!this.arrived) return null;
        return this.checkDiesOut(t, u, h);
      default:
        return this.checkSteady(t, u, h);
    }
  }

  private checkDiesOut(t: number, u: Float64Array, h: Float64Array): Judgement | null {
    const s = this.solver.scenario;
    const g = s.pest.growth;
    const { hostAtCells, residenceAtCells } = this.solver.problem;
    const n = u.length;
    let rhoMax = 0;
    for (let i = 0; i < n; i++) rhoMax = Math.max(rhoMax, residenceAtCells[i]);
    let w = 0;
    for (let i = 0; i < n; i++) w = Math.max(w, (u[i] * rhoMax) / residenceAtCells[i]);
    const base = { verified: true, mode: 'dies-out' as const, method: PINNING_METHODS['dies-out'], atYears: t, steady: null, leadingEigenvalue: null };
    if (g.form === 'allee-cubic') {
      const k = (g.rate * (1 - g.alleeThreshold) ** 2) / (4 * g.alleeThreshold);
      const guarantee = w > 0 ? 3 / (8 * k * w * w) : Infinity;
      if (!(guarantee >= DIE_OUT_GUARANTEE_YEARS)) return null;
      return {
        ...base,
        detail:
          `at year ${t.toFixed(1)} the density is at most ${w.toExponential(2)} everywhere in the computational window; ` +
          `whatever the hosts do, it cannot exceed twice that for ${guarantee === Infinity ? 'ever' : `${guarantee.toExponential(1)} years`} (comparison bound)`,
      };
    }
    let minThreshold = Infinity;
    for (let i = 0; i < n; i++) {
      if (!hostAtCells[i]) continue;
      const hi = h[i];
      if (lowDensityRate(g, hi) > 0) return null;
      const th = alleeThreshold(g, hi);
      if (th !== null) minThreshold = Math.min(minThreshold, th);
      if (w >= minThreshold) return null;
    }
    return {
      ...base,
      detail:
        `at year ${t.toFixed(1)} the density is at most ${w.toExponential(2)} everywhere in the computational window, below the smallest Allee threshold ` +
        `${Number.isFinite(minThreshold) ? minThreshold.toExponential(2) : '(none: the hosts left cannot support growth)'}; growth does not rise as hosts are consumed, so it can only decline`,
    };
  }

  private checkSteady(t: number, u: Float64Array, h: Float64Array): Judgement | null {
    const closeTol = 0.05 * this.capScale;
    const distance = (a: Float64Array) => {
      let d = 0;
      for (let i = 0; i < u.length; i++) d = Math.max(d, Math.abs(u[i] - a[i]));
      return d;
    };
    const reaction = cellReaction(this.solver.problem, h);
    if (this.candidate) {
      // Second look: the run must not be moving away from the candidate (a saddle or a slow crossing would).
      const c = this.candidate;
      this.candidate = null;
      const d2 = distance(c.u);
      if (d2 <= 1.05 * c.distance + 1e-9 * this.capScale) {
        const st = linearStability(this.solver.op, reaction, c.u);
        return {
          verified: true,
          mode: 'steady-state',
          method: PINNING_METHODS['steady-state'],
          detail:
            `steady state found at year ${c.t.toFixed(1)} and confirmed at year ${t.toFixed(1)} (run within ${d2.toExponential(1)} of it and not moving away); ` +
            `leading eigenvalue ${st.leadingEigenvalue.toExponential(2)} /yr, so every perturbation decays`,
          atYears: t,
          steady: c.u,
          leadingEigenvalue: st.leadingEigenvalue,
        };
      }
    }
    this.attempts++;
    const r = solveSteadyState(this.solver.op, reaction, u, { tolerance: 1e-9 * this.rScale * this.capScale });
    if (!r.converged) return null;
    for (const i of this.beyondHost) if (!(r.u[i] < this.thetaAtCells[i])) return null;
    // A pinned front has a population standing before the clearing; the empty state (no front in the
    // window yet, or a pest that died out on its own) is steady and stable too, but holds nothing.
    if (!this.present(r.u)) return null;
    const d = distance(r.u);
    if (d > closeTol) return null;
    if (!linearStability(this.solver.op, reaction, r.u).stable) return null;
    this.candidate = { t, u: r.u, distance: d };
    return null;
  }
}
