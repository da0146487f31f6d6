import { describe, expect, it } from 'vitest';
import { expectAllClose, orderTable } from '../helpers/close.ts';
import { blockingWidths, criticalGapWidth, type BlockingProblem } from '../../server/numerics/steady-blocking.ts';
import { linearStability, solveSteadyState } from '../../server/numerics/steady.ts';
import { makeGrid } from '../../server/numerics/grid.ts';
import { makeDiffusionOperator } from '../../server/numerics/diffusion.ts';

// Cubic (Nagumo) growth f(u) = r u (1 − u)(u − a), D1 = r = 1, a = 0.25 (Lewis & Kareiva 1993 form).
const a = 0.25;
const f = (u: number) => u * (1 - u) * (u - a);
const F = (u: number) => -(u ** 4) / 4 + ((1 + a) * u ** 3) / 3 - (a * u * u) / 2;
// Zero of F in (a, 1): F/u² = −u²/4 + (1+a)u/3 − a/2 = 0.
const theta = 2 * ((1 + a) / 3 - Math.sqrt(((1 + a) / 3) ** 2 - a / 2));

function problem(d2: number, m: number, alpha: number): BlockingProblem {
  // Jump k = ρ_gap/ρ_forest = ((1 − α)/α)(D1/D2), α = probability of stepping into forest at the edge.
  return { diffusionForest: 1, potentialLeft: F, capacityLeft: 1, potentialRight: F, thetaRight: theta, diffusionGap: d2, mortalityGap: m, jump: ((1 - alpha) / alpha) / d2 };
}

describe('phase-plane (first-integral) critical gap width', () => {
  // Check values G1–G4: the methods note (server/numerics/README.md) §5.3, computed independently (first-integral criterion by two
  // root-finding routes; PDE brackets). Method: first integrals of D u'' + f = 0 with the edge
  // conditions of Ovaskainen & Cornell (2003) / Maciel & Lutscher (2013).
  const cases: [string, number, number, number, number][] = [
    ['G1', 1, 1, 0.5, 0.596095],
    ['G2', 4, 0.25, 0.5, 3.837489],
    ['G3', 4, 0.25, 0.2, 2.384379], // α = D1/(D1 + D2): continuous density (k = 1)
    ['G4', 4, 0.25, 0.8, 2.073929],
  ];
  for (const [name, d2, m, alpha, expected] of cases) {
    it(`${name}: W* = ${expected} km`, () => {
      const r = criticalGapWidth(problem(d2, m, alpha));
      // Check values are given to 6 decimals: rtol 2e-6.
      expectAllClose(r.criticalKm!, expected, { rtol: 2e-6 });
    });
  }

  it('agrees with direct shooting across the gap (the linear gap map instead of the conserved energy)', () => {
    // At (p, W(p)) the state leaving the gap must sit on the orbit decaying to 0:
    // G(p, W) = (D1/2)((D2/D1) V(W))² + F(q) = 0 with U(W), V(W) from the cosh/sinh map.
    for (const [d2, m, alpha] of [[1, 1, 0.5], [4, 0.25, 0.8]]) {
      const pr = problem(d2, m, alpha);
      const k = pr.jump;
      for (const p of [0.3, 0.6, 0.9]) {
        for (const { widthKm: w, q } of blockingWidths(pr, p)) {
          const beta = Math.sqrt(m / d2);
          const u0 = k * p;
          const v0 = (1 / d2) * -Math.sqrt(2 * (F(1) - F(p)));
          const uW = u0 * Math.cosh(beta * w) + (v0 / beta) * Math.sinh(beta * w);
          const vW = u0 * beta * Math.sinh(beta * w) + v0 * Math.cosh(beta * w);
          expectAllClose(uW / k, q, { rtol: 1e-9 });
          expectAllClose(0.5 * (d2 * vW) ** 2 + F(uW / k), 0, { atol: 1e-12 });
        }
      }
    }
  });

  it('is 0 when the front cannot advance in unbroken forest (a ≥ ½), and null without an Allee effect beyond', () => {
    const Fr = (u: number) => -(u ** 4) / 4 + (1.6 * u ** 3) / 3 - (0.6 * u * u) / 2; // a = 0.6: F(1) < 0
    expect(criticalGapWidth({ ...problem(1, 1, 0.5), potentialLeft: Fr }).criticalKm).toBe(0);
    expect(criticalGapWidth({ ...problem(1, 1, 0.5), thetaRight: 0 }).criticalKm).toBeNull();
  });
});

/**
 * Exact steady profile (forest–gap–forest) for near-edge density p, tabulated by RK4 on the first-integral
 * ODEs with step 1e-3 km and interpolated linearly (error ~1e-7, far below the FV errors measured).
 */
function exactProfile(pr: BlockingProblem, p: number, w: number, q: number, rising: boolean, xMin: number, xMax: number): (x: number) => number {
  const k = pr.jump;
  const beta = Math.sqrt(pr.mortalityGap / pr.diffusionGap);
  const step = 1e-3;
  const leftRhs = (u: number) => Math.sqrt(Math.max(0, 2 * (F(1) - F(u)))); // du/d(−x) on the left
  const rightRhs = (u: number) => -Math.sqrt(Math.max(0, -2 * F(u))); // du/dx on the monotone exit orbit
  const tabulate = (u0: number, span: number, rhs: (u: number) => number) => {
    const n = Math.ceil(span / step);
    const out = new Float64Array(n + 1);
    let u = u0;
    out[0] = u;
    for (let i = 1; i <= n; i++) {
      const k1 = rhs(u);
      const k2 = rhs(u + 0.5 * step * k1);
      const k3 = rhs(u + 0.5 * step * k2);
      const k4 = rhs(u + step * k3);
      u += (step / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
      out[i] = u;
    }
    return out;
  };
  const at = (table: Float64Array, s: number) => {
    const j = Math.min(table.length - 2, Math.floor(s / step));
    const t = s / step - j;
    return (1 - t) * table[j] + t * table[j + 1];
  };
  const left = tabulate(p, -xMin, leftRhs);
  // A rising state climbs from q to θ over s_θ = ∫_q^θ du/√(−2F(u)) (substitution u = θ − t² removes the
  // 1/√ singularity), then follows the monotone orbit down from θ.
  let sTheta = 0;
  if (rising) {
    const n = 4000;
    const tMax = Math.sqrt(theta - q);
    for (let i = 0; i < n; i++) {
      const t = ((i + 0.5) * tMax) / n;
      sTheta += (2 * t * (tMax / n)) / Math.sqrt(Math.max(1e-300, -2 * F(theta - t * t)));
    }
  }
  const fromTheta = tabulate(theta * (1 - 1e-9), xMax - w + sTheta + 1, rightRhs);
  const monotone = tabulate(q, xMax - w + 1, rightRhs);
  return (x) => {
    if (x < 0) return at(left, -x);
    if (x <= w) {
      const u0 = k * p;
      const v0 = -Math.sqrt(2 * (F(1) - F(p))) / pr.diffusionGap;
      return u0 * Math.cosh(beta * x) + (v0 / beta) * Math.sinh(beta * x);
    }
    return rising ? at(fromTheta, Math.abs(x - w - sTheta)) : at(monotone, x - w);
  };
}

describe('Newton steady states of the finite-volume model match the phase-plane solutions', () => {
  // G1 with a gap of 0.7 km > W*: two blocking steady states (a stable one and a saddle), found from the
  // first integrals. Newton on the FV system started from each must converge next to it, with Sturm
  // count 0 (stable) and 1 (saddle), and the near-edge density must converge at second order.
  const pr = problem(1, 1, 0.5);
  const W = 0.7;
  // The stable state falls monotonically beyond the gap; the saddle rises to θ beyond it and then decays.
  const solveP = (rising: boolean) => {
    const wOf = (p: number) => Math.min(...blockingWidths(pr, p, true).filter((b) => b.rising === rising).map((b) => b.widthKm));
    let best = 0.3;
    for (let p = 0.2; p < 0.46; p += 1e-4) if (Math.abs(wOf(p) - W) < Math.abs(wOf(best) - W)) best = p;
    // Secant refinement.
    let p0 = best - 1e-4;
    let p1 = best;
    for (let i = 0; i < 50 && Math.abs(p1 - p0) > 1e-15; i++) {
      const f0 = wOf(p0) - W;
      const f1 = wOf(p1) - W;
      if (f1 === f0) break;
      [p0, p1] = [p1, p1 - (f1 * (p1 - p0)) / (f1 - f0)];
    }
    const hit = blockingWidths(pr, p1, true).find((b) => b.rising === rising && Math.abs(b.widthKm - W) < 1e-9);
    if (!hit) throw new Error(`no ${rising ? 'rising' : 'monotone'} state at W = ${W}`);
    return { p: p1, q: hit.q, rising };
  };
  const branches = [solveP(true), solveP(false)];

  it('finds each branch, classifies its stability, and converges at second order in the cell size', () => {
    const errors: number[][] = [[], []];
    const unstable: number[][] = [[], []];
    const hs = [0.04, 0.02, 0.01];
    for (const dx of hs) {
      const grid = makeGrid([-12, 0, W, W + 30], dx, 4);
      const n = grid.nCells;
      const gapAt = (i: number) => grid.centersKm[i] > 0 && grid.centersKm[i] < W;
      const D = new Float64Array(n).fill(1);
      const rho = Float64Array.from({ length: n }, (_, i) => (gapAt(i) ? pr.jump : 1));
      const op = makeDiffusionOperator(grid, D, rho);
      const reaction = (u: Float64Array, fo: Float64Array, df: Float64Array) => {
        for (let i = 0; i < n; i++) {
          if (gapAt(i)) {
            fo[i] = -pr.mortalityGap * u[i];
            df[i] = -pr.mortalityGap;
          } else {
            fo[i] = f(u[i]);
            df[i] = (1 - u[i]) * (u[i] - a) - u[i] * (u[i] - a) + u[i] * (1 - u[i]);
          }
        }
      };
      branches.forEach(({ p, q, rising }, b) => {
        const profile = exactProfile(pr, p, W, q, rising, -12, W + 30);
        const start = Float64Array.from(grid.centersKm, profile);
        const r = solveSteadyState(op, reaction, start);
        expect(r.converged).toBe(true);
        // Near-edge density: linear extrapolation of the last two forest cells to the face at x = 0.
        const i0 = grid.firstCellOfSegment[1] - 1;
        const pH = 1.5 * r.u[i0] - 0.5 * r.u[i0 - 1];
        errors[b].push(Math.abs(pH - p));
        unstable[b].push(linearStability(op, reaction, r.u).unstableModes);
      });
    }
    orderTable('near-edge density of the stable blocking state (G1, W = 0.7 km)', hs, errors[1]);
    orderTable('near-edge density of the saddle (G1, W = 0.7 km)', hs, errors[0]);
    expect(unstable[1]).toEqual([0, 0, 0]);
    expect(unstable[0]).toEqual([1, 1, 1]);
    for (const e of errors) {
      const order = Math.log2(e[1] / e[2]);
      // Interfaces on faces: second order expected (methods note §9.1); allow 1.7–2.5.
      expect(order).toBeGreaterThan(1.7);
      expect(order).toBeLessThan(2.5);
    }
  });
});
