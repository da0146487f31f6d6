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
  /** Host-cell updates done by the low-density (linear) path, summed over calls. */
  linearUpdates?: number;
}

/**
 * Density below which a host cell is updated by its linearised growth (one multiplication per step)
 * instead of the nonlinear Heun step. The per-capita rate differs from its low-density value g(0, h) by at
 * most |∂g/∂u|·u, so this cut-off changes growth rates by about 1e-9/yr and densities by a relative
 * 1e-9 × (rate scale × time) — far below anything reported. Bounded by tests/numerics/reaction-fast-path.test.ts.
 */
export const LINEAR_BELOW = 1e-9;

/** Densities below this are set to 0: they can never matter, and subnormal numbers make arithmetic slow. */
const UNDERFLOW = 1e-280;

/**
 * e^x for |x| ≤ 1/16 by its Taylor polynomial of degree 9 (truncation error < x^10/10! ≤ 2.6e-19, i.e.
 * below double round-off), Math.exp elsewhere. The polynomial is several times cheaper than Math.exp and
 * covers nearly every call of the reaction step (|rate × substep| ≤ 1/16 for the automatic steps).
 */
export function expSmall(x: number): number {
  if (x > 0.0625 || x < -0.0625) return Math.exp(x);
  return (
    1 +
    x * (1 + x * (0.5 + x * (1 / 6 + x * (1 / 24 + x * (1 / 120 + x * (1 / 720 + x * (1 / 5040 + x * (1 / 40320 + x * (1 / 362880)))))))))
  );
}

export interface ReactionStepper {
  /** Advances u and h by dt [yr] in place (cells lo…hi, all by default; cells outside must hold u = 0). */
  step(u: Float64Array, h: Float64Array, dt: number, lo?: number, hi?: number): void;
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
export function makeReactionStepper(coeffs: ReactionCoefficients, options: { linearBelow?: number } = {}): ReactionStepper {
  const { hostAtCells, mortalityAtCells, perCapita, hostKillRate: c } = coeffs;
  const n = hostAtCells.length;
  const linearBelow = options.linearBelow ?? LINEAR_BELOW;
  const decay = new Float64Array(n);
  // Linear growth factor e^{g(0,h) dt} per host cell, cached; NaN = to be computed (dt changed or the
  // cell went through the nonlinear path, which may have changed h).
  const linear = new Float64Array(n).fill(NaN);
  let decayDt = NaN;
  const counters: ReactionCounters = { substeps: 0, linearUpdates: 0 };
  return {
    counters,
    step(u, h, dt, lo = 0, hi = n - 1) {
      if (dt !== decayDt) {
        for (let i = 0; i < n; i++) decay[i] = hostAtCells[i] ? 1 : Math.exp(-mortalityAtCells[i] * dt);
        linear.fill(NaN);
        decayDt = dt;
      }
      const nSub = Math.max(1, Math.ceil((coeffs.stiffness * dt) / MAX_RATE_STEP));
      const tau = dt / nSub;
      const halfTau = 0.5 * tau;
      counters.substeps += nSub;
      let nLinear = 0;
      for (let i = lo; i <= hi; i++) {
        let ui = u[i];
        if (ui === 0) continue;
        if (ui < UNDERFLOW) {
          u[i] = 0;
          continue;
        }
        if (!hostAtCells[i]) {
          u[i] = ui * decay[i];
          continue;
        }
        let hi_ = h[i];
        if (ui < linearBelow) {
          // Low density: u' = g(0,h) u exactly over dt; host loss c·u·h·dt is below 1e-9 relative.
          let f = linear[i];
          if (f !== f) {
            f = Math.exp(perCapita(0, hi_) * dt);
            linear[i] = f;
          }
          u[i] = ui * f;
          if (c > 0) h[i] = hi_ * (1 - c * ui * dt);
          nLinear++;
          continue;
        }
        linear[i] = NaN;
        for (let s = 0; s < nSub; s++) {
          const g0 = perCapita(ui, hi_);
          const u1 = ui * expSmall(g0 * tau);
          if (c > 0) {
            const h1 = hi_ * expSmall(-c * ui * tau);
            const g1 = perCapita(u1, h1);
            hi_ = hi_ * expSmall(-c * (ui + u1) * halfTau);
            ui = ui * expSmall((g0 + g1) * halfTau);
          } else {
            ui = ui * expSmall((g0 + perCapita(u1, hi_)) * halfTau);
          }
        }
        u[i] = ui;
        h[i] = hi_;
      }
      counters.linearUpdates = (counters.linearUpdates ?? 0) + nLinear;
    },
  };
}
