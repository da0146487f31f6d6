import { describe, expect, it } from 'vitest';
import { makeGrid } from '../../server/numerics/grid.ts';
import { makeDiffusionOperator, makeDiffusionStepper } from '../../server/numerics/diffusion.ts';
import { LINEAR_BELOW, expSmall, makeReactionStepper } from '../../server/numerics/reaction.ts';
import { runSplitTimeLoop } from '../../server/numerics/time-loop.ts';
import { expectAllClose } from '../helpers/close.ts';

/**
 * Accuracy cost of the reaction speed-ups (README "Performance"): the polynomial exponential and the
 * linear update of cells below LINEAR_BELOW. Reference: the same scheme with Math.exp-equivalent accuracy
 * and the nonlinear step in every cell (linearBelow = 0) — an internal comparison that bounds what the
 * shortcut changes.
 */

describe('expSmall', () => {
  it('matches Math.exp to round-off on [−1/16, 1/16] and falls back to it outside', () => {
    let worst = 0;
    for (let k = -1000; k <= 1000; k++) {
      const x = (k / 1000) * 0.0625;
      worst = Math.max(worst, Math.abs(expSmall(x) - Math.exp(x)) / Math.exp(x));
    }
    // Taylor remainder ≤ (1/16)^10/10! ≈ 2.6e-19; what is left is double round-off of the Horner sum.
    expect(worst).toBeLessThan(4e-16);
    expect(expSmall(0.5)).toBe(Math.exp(0.5));
  });
});

/** 1-D run on [0, 40] km, 50 m cells, infested on [0, 2]; returns arrival times at 10, 20, 30 km and the final profile. */
function run(perCapita: (u: number, h: number) => number, hostKillRate: number, linearBelow: number) {
  const grid = makeGrid([0, 40], 0.05, 1);
  const n = grid.nCells;
  const D = new Float64Array(n).fill(1);
  const rho = new Float64Array(n).fill(1);
  const op = makeDiffusionOperator(grid, D, rho);
  const reaction = makeReactionStepper(
    { hostAtCells: new Uint8Array(n).fill(1), mortalityAtCells: new Float64Array(n), perCapita, hostKillRate, stiffness: 4 },
    { linearBelow },
  );
  const u = new Float64Array(n);
  const h = new Float64Array(n).fill(1);
  for (let i = 0; i < n; i++) if (grid.centersKm[i] < 2) u[i] = 1;
  const probes = [10, 20, 30].map((x) => Math.floor(x / 0.05));
  const arrival = probes.map(() => NaN);
  let lastT = 0;
  const last = probes.map(() => 0);
  runSplitTimeLoop(makeDiffusionStepper(op), reaction, u, h, {
    tEnd: 18,
    dt: 0.02,
    observers: [
      {
        handle(s) {
          probes.forEach((c, k) => {
            if (Number.isNaN(arrival[k]) && s.u[c] >= 0.01) arrival[k] = lastT + ((0.01 - last[k]) / (s.u[c] - last[k])) * (s.t - lastT);
            last[k] = s.u[c];
          });
          lastT = s.t;
        },
      },
    ],
  });
  return { arrival, u, linearUpdates: reaction.counters.linearUpdates ?? 0 };
}

describe('low-density linear path (LINEAR_BELOW)', () => {
  it('changes arrival times of a pulled (logistic, host-killing) front by less than 1e-9 yr', () => {
    // Pulled fronts are driven by their low-density tail, the worst case for the shortcut.
    const g = (u: number, h: number) => 1.0 * (h - u);
    const fast = run(g, 0.5, LINEAR_BELOW);
    const full = run(g, 0.5, 0);
    expect(fast.linearUpdates).toBeGreaterThan(0);
    expect(full.linearUpdates).toBe(0);
    expect(fast.arrival.every(Number.isFinite)).toBe(true);
    expectAllClose(fast.arrival, full.arrival, { atol: 1e-9 }); // measured 2e-12 yr
    // Profiles: relative change below 1e-9 where the density is at least the detection level.
    const rel = fast.u.reduce((m, x, i) => (full.u[i] >= 0.01 ? Math.max(m, Math.abs(x - full.u[i]) / full.u[i]) : m), 0);
    console.log(`linear-path cost, logistic: max |Δ arrival| ${Math.max(...fast.arrival.map((a, k) => Math.abs(a - full.arrival[k]))).toExponential(2)} yr, max relative Δu ${rel.toExponential(2)}`);
    expect(rel).toBeLessThan(1e-9); // measured 6e-12
  });

  it('changes arrival times of a pushed (strong Allee) front by less than 1e-9 yr', () => {
    const g = (u: number, h: number) => 1.0 * (h - u) * (u - 0.2 * h);
    const fast = run(g, 0.05, LINEAR_BELOW);
    const full = run(g, 0.05, 0);
    expect(fast.arrival.slice(0, 1).every(Number.isFinite)).toBe(true);
    expectAllClose(fast.arrival.filter(Number.isFinite), full.arrival.filter(Number.isFinite), { atol: 1e-9 });
  });
});
