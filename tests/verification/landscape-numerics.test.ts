/**
 * The 2-D engine's numerics on the square raster (server/numerics/raster/):
 * - conservation: without growth or mortality and with reflecting/impassable edges, Σ h² u is constant to
 *   round-off, also across habitat edges (residence-index form; a property of any conservative finite-volume
 *   scheme, LeVeque 2002, Finite Volume Methods for Hyperbolic Problems, §4 [MEM for the section]);
 * - positivity: a single occupied cell (the roughest start) run with D dt/h² ≫ 1 never goes negative;
 * - order in space: the cell averages of the exact solution u = e^{(g − 2Dk²)t} cos(kx) cos(ky) of
 *   u_t = DΔu + g u on a square with zero-flux sides (separation of variables) — error falls as h²;
 * - order in time: the same mode is an eigenvector of the discrete operator with eigenvalue
 *   −2·(2D/h²)(1 − cos kh) (the standard finite-difference symbol), so the semi-discrete solution is known
 *   exactly and the time-stepping error alone can be measured — second order (TR-BDF2, Bank et al. 1985,
 *   with the approximately factorised stages; see stepper.ts).
 */
import { describe, expect, it } from 'vitest';
import { makeLandscape } from '../helpers/landscape.ts';
import { orderTable, observedOrders } from '../helpers/close.ts';
import { landscapeProblem, problemStepper, type PointPest } from '../../server/analysis/landscape/problem.ts';

/** Constant per-capita rate g = b − m (mate-finding form without mate limitation or crowding). */
function linearPest(g: number, over: Partial<PointPest> = {}): PointPest {
  return {
    name: 'verification pest (invented)',
    illustrative: true,
    diffusionHost: 1,
    diffusionOpen: 4,
    edgePreferenceOpen: 0.7,
    growth: { form: 'mate-finding', birthRate: 1 + g, deathRate: 1, crowding: 0, mating: 'none' },
    hostKillRate: 0,
    mortalityOpen: 0,
    ...over,
  } as PointPest;
}

describe('2-D engine: conservation and positivity', () => {
  it('conserves Σ h² u to round-off across habitat edges and impassable cells, and stays non-negative', () => {
    const pest = linearPest(0);
    const L = makeLandscape({
      nx: 40,
      ny: 30,
      cellM: 100,
      classAt: (x, y) => (x > 1500 && x < 2200 ? 'open' : Math.hypot(x - 3000, y - 800) < 300 ? 'outside' : 'host'),
      infestedAt: (x, y) => (Math.abs(x - 1000) < 60 && Math.abs(y - 1500) < 60 ? 1 : 0),
    });
    const p = landscapeProblem(L, pest, { mapEdges: 'reflecting', infestedDensity: 1, stepYears: 0.2, horizonYears: 10 });
    const stepper = problemStepper(p);
    stepper.activateAll();
    const u = Float64Array.from(p.u0);
    const h = Float64Array.from(p.stockingAtCells);
    const sum = (a: Float64Array) => a.reduce((s, x) => s + x, 0);
    const m0 = sum(u);
    let drift = 0;
    let min = 0;
    for (let i = 0; i < 50; i++) {
      stepper.step(u, h, 0.2);
      drift = Math.max(drift, Math.abs(sum(u) - m0) / m0);
      for (const x of u) min = Math.min(min, x);
    }
    console.log(`mass drift over 50 steps (D dt/h² = 20 in forest, 80 in the open): ${drift.toExponential(2)}; min u ${min}`);
    // Round-off: each step sums ~1200 terms a few times; 1e-12 leaves a margin of ~100 over what is seen.
    expect(drift).toBeLessThan(1e-12);
    expect(min).toBeGreaterThanOrEqual(0);
  });
});

/** Exact cell average of cos(kx) over [a, a + h]. */
const cosAverage = (k: number, a: number, h: number) => (Math.sin(k * (a + h)) - Math.sin(k * a)) / (k * h);

function modeRun(n: number, dt: number, T: number, g: number) {
  const side = 4; // km
  const hKm = side / n;
  const k = Math.PI / side;
  const pest = linearPest(g);
  const L = makeLandscape({ nx: n, ny: n, cellM: hKm * 1000, infestedAt: () => 0 });
  const p = landscapeProblem(L, pest, { mapEdges: 'reflecting', infestedDensity: 1, stepYears: dt, horizonYears: T });
  const u = new Float64Array(n * n);
  const exactAvg = new Float64Array(n * n);
  const semiDiscrete = new Float64Array(n * n);
  const lambdaH = -2 * ((2 * 1) / (hKm * hKm)) * (1 - Math.cos(k * hKm));
  for (let r = 0; r < n; r++) {
    for (let q = 0; q < n; q++) {
      // Row 0 is north: y measured from the north edge; cos(k y) is as smooth either way.
      const avg = cosAverage(k, q * hKm, hKm) * cosAverage(k, r * hKm, hKm);
      u[r * n + q] = 1 + 0.5 * avg;
      exactAvg[r * n + q] = Math.exp(g * T) * (1 + 0.5 * avg * Math.exp(-2 * k * k * T));
      semiDiscrete[r * n + q] = Math.exp(g * T) * (1 + 0.5 * avg * Math.exp(lambdaH * T));
    }
  }
  const stepper = problemStepper(p);
  stepper.activateAll();
  const h = Float64Array.from(p.stockingAtCells);
  const steps = Math.round(T / dt);
  for (let i = 0; i < steps; i++) stepper.step(u, h, dt);
  let eSpace = 0;
  let eTime = 0;
  for (let i = 0; i < n * n; i++) {
    eSpace = Math.max(eSpace, Math.abs(u[i] - exactAvg[i]));
    eTime = Math.max(eTime, Math.abs(u[i] - semiDiscrete[i]));
  }
  return { eSpace, eTime };
}

describe('2-D engine: observed orders on an exact smooth solution', () => {
  it('space: error against exact cell averages falls as h² (observed order ≥ 1.8 on the finest pairs)', () => {
    const ns = [8, 16, 32, 64];
    const hs = ns.map((n) => 4 / n);
    // dt ∝ h² keeps the (second-order) time error a fixed small share of the spatial error.
    const errors = ns.map((n) => modeRun(n, 0.02 * (8 / n) ** 2, 0.5, 0.3).eSpace);
    orderTable('2-D space order (max-norm, exact cell averages, T = 0.5 yr)', hs, errors);
    const orders = observedOrders(errors);
    expect(orders[orders.length - 1]).toBeGreaterThan(1.8);
    expect(orders[orders.length - 2]).toBeGreaterThan(1.8);
  });

  it('time: error against the semi-discrete solution falls as dt² (observed order ≥ 1.8), with D dt/h² up to 400', () => {
    const dts = [0.4, 0.2, 0.1, 0.05];
    const errors = dts.map((dt) => modeRun(40, dt, 2, 0.3).eTime);
    orderTable('2-D time order (max-norm against the exact semi-discrete mode, 40×40 cells, T = 2 yr)', dts, errors);
    const orders = observedOrders(errors);
    expect(orders[orders.length - 1]).toBeGreaterThan(1.8);
    expect(orders[orders.length - 2]).toBeGreaterThan(1.8);
  });
});

/**
 * u' = r u (h − u), h' = −c u h on a uniform map with reflecting edges: the movement terms vanish, so the run is
 * the ODE pair in every cell. For c = 0 it is the logistic equation with the closed form
 * u = 1 / (1 + (1/u₀ − 1) e^{−rt}) (Verhulst 1838); for c > 0 the reference is a classical fourth-order
 * Runge–Kutta run of the pair with a step 1000 times smaller (an independent computation).
 */
function uniformGrowthRun(dt: number, c: number) {
  const r = 1;
  const T = 6;
  const u0 = 0.02;
  const pest = { ...linearPest(0), growth: { form: 'logistic', rate: r }, hostKillRate: c } as PointPest;
  const L = makeLandscape({ nx: 6, ny: 5, cellM: 500, infestedAt: () => 1 });
  const p = landscapeProblem(L, pest, { mapEdges: 'reflecting', infestedDensity: u0, stepYears: dt, horizonYears: T });
  const stepper = problemStepper(p);
  const u = Float64Array.from(p.u0);
  const h = Float64Array.from(p.stockingAtCells);
  for (let i = 0; i < Math.round(T / dt); i++) stepper.step(u, h, dt);
  let ref: [number, number];
  if (c === 0) {
    ref = [1 / (1 + (1 / u0 - 1) * Math.exp(-r * T)), 1];
  } else {
    const f = ([a, b]: number[]) => [r * a * (b - a), -c * a * b];
    let y = [u0, 1];
    const s = dt / 1000;
    for (let i = 0; i < Math.round(T / s); i++) {
      const k1 = f(y);
      const k2 = f(y.map((v, j) => v + 0.5 * s * k1[j]));
      const k3 = f(y.map((v, j) => v + 0.5 * s * k2[j]));
      const k4 = f(y.map((v, j) => v + s * k3[j]));
      y = y.map((v, j) => v + (s / 6) * (k1[j] + 2 * k2[j] + 2 * k3[j] + k4[j]));
    }
    ref = [y[0], y[1]];
  }
  let e = 0;
  for (let k = 0; k < u.length; k++) e = Math.max(e, Math.abs(u[k] - ref[0]), Math.abs(h[k] - ref[1]));
  return e;
}

describe('2-D engine: time order with growth and host loss (mid-step rates from the previous step)', () => {
  for (const c of [0, 0.5]) {
    it(`${c === 0 ? 'logistic closed form (Verhulst 1838)' : 'host loss c = 0.5/yr against a fine RK4 run'}: error falls as dt² (observed order ≥ 1.8)`, () => {
      const dts = [0.4, 0.2, 0.1, 0.05];
      const errors = dts.map((dt) => uniformGrowthRun(dt, c));
      orderTable(`2-D time order with growth, c = ${c} (max-norm of u and h at T = 6 yr, r = 1/yr)`, dts, errors);
      const orders = observedOrders(errors);
      expect(orders[orders.length - 1]).toBeGreaterThan(1.8);
      expect(orders[orders.length - 2]).toBeGreaterThan(1.8);
    });
  }

  it('a stepper handed another state does not extrapolate from the trajectory it stepped before', () => {
    const pest = { ...linearPest(0), growth: { form: 'logistic', rate: 1 }, hostKillRate: 0.3 } as PointPest;
    const L = makeLandscape({ nx: 12, ny: 9, cellM: 500, infestedAt: (x, y) => (Math.hypot(x - 3000, y - 2000) < 1200 ? 1 : 0) });
    const p = landscapeProblem(L, pest, { mapEdges: 'reflecting', infestedDensity: 1, stepYears: 0.2, horizonYears: 5 });
    const used = problemStepper(p);
    used.activateAll();
    const a = Float64Array.from(p.u0);
    const ha = Float64Array.from(p.stockingAtCells);
    for (let i = 0; i < 3; i++) used.step(a, ha, 0.2);
    const b = Float64Array.from(p.u0, (v) => 0.5 * v);
    const hb = Float64Array.from(p.stockingAtCells);
    used.step(b, hb, 0.2);
    const fresh = problemStepper(p);
    fresh.activateAll();
    const c = Float64Array.from(p.u0, (v) => 0.5 * v);
    const hc = Float64Array.from(p.stockingAtCells);
    fresh.step(c, hc, 0.2);
    expect(Array.from(b)).toEqual(Array.from(c));
    expect(Array.from(hb)).toEqual(Array.from(hc));
  });
});
