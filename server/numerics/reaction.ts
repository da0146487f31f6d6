/**
 * Local (per-cell) growth, mortality and host depletion, integrated over a time step.
 *
 * The numerics layer does not know the growth forms; it receives a per-capita rate function.
 */

/** Per-capita growth rate of the insect in host forest [1/yr] as a function of density u and host fraction h. */
export type PerCapitaRate = (u: number, h: number) => number;

export interface ReactionCoefficients {
  /** 1 where the cell is host forest (growth + depletion), 0 elsewhere (pure mortality). */
  readonly hostAtCells: Uint8Array;
  /** Per-capita mortality in cells without host [1/yr], ≥ 0; ignored in host cells. */
  readonly mortalityAtCells: Float64Array;
  /** Per-capita growth in host cells [1/yr]. */
  readonly perCapita: PerCapitaRate;
  /** Host kill rate c in dh/dt = -c u h [1/yr per unit relative density], ≥ 0. */
  readonly hostKillRate: number;
  /**
   * Bound on how fast the per-capita rates change with log-density [1/yr]; sets the number of
   * substeps so that `rate * substep ≤ 1` (Heun is stable to 2).
   */
  readonly stiffness: number;
}

export interface ReactionCounters {
  /** Substeps taken, summed over calls. */
  substeps: number;
}

export interface ReactionStepper {
  /** Advances u and h by dt [yr] in place. */
  step(u: Float64Array, h: Float64Array, dt: number): void;
  readonly counters: ReactionCounters;
}

/** Largest `stiffness × substep` allowed; the log-space Heun step is stable to 2 and accurate well below 1. */
const MAX_RATE_STEP = 1;

/**
 * Exponential (log-space) Heun integrator for `u' = u g(u,h)`, `h' = -c u h` in host cells and
 * `u' = -m u` (exact) elsewhere.
 *
 * @remarks
 * In log variables the system is `(ln u)' = g`, `(ln h)' = -c u`; Heun's method (explicit trapezoid) on
 * these is second order and keeps u, h ≥ 0 by construction, and u = 0 stays 0:
 * `u1 = u e^{g0 dt}`, `h1 = h e^{-c u dt}`, `u_new = u e^{(g0 + g1) dt/2}`, `h_new = h e^{-c (u + u1) dt/2}`.
 * Heun's method: e.g. Hairer, Nørsett & Wanner, Solving ODEs I, §II.1.
 */
export function makeReactionStepper(coeffs: ReactionCoefficients): ReactionStepper {
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: c } = coeffs;
  const n = hostAtCells.length;
  const decay = new Float64Array(n);
  let decayDt = NaN;
  const counters: ReactionCounters = { substeps: 0 };
  return {
    counters,
    step(u, h, dt) {
      if (dt !== decayDt) {
        for (let i = 0; i < n; i++) decay[i] = hostAtCells[i] ? 1 : Math.exp(-mortalityAtCells[i] * dt);
        decayDt = dt;
      }
      const nSub = Math.max(1, Math.ceil((coeffs.stiffness * dt) / MAX_RATE_STEP));
      const tau = dt / nSub;
      const halfTau = 0.5 * tau;
      counters.substeps += nSub;
      for (let i = 0; i < n; i++) {
        let ui = u[i];
        if (ui === 0) continue;
        if (!hostAtCells[i]) {
          u[i] = ui * decay[i];
          continue;
        }
        let hi = h[i];
        for (let s = 0; s < nSub; s++) {
          const g0 = perCapita(ui, hi);
          const u1 = ui * Math.exp(g0 * tau);
          if (c > 0) {
            const h1 = hi * Math.exp(-c * ui * tau);
            const g1 = perCapita(u1, h1);
            hi = hi * Math.exp(-c * (ui + u1) * halfTau);
            ui = ui * Math.exp((g0 + g1) * halfTau);
          } else {
            ui = ui * Math.exp((g0 + perCapita(u1, hi)) * halfTau);
          }
        }
        u[i] = ui;
        h[i] = hi;
      }
    },
  };
}
