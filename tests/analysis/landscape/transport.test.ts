/**
 * People carrying the pest past a band on the map (server/analysis/landscape/transport.ts), against
 * - the closed form for an isotropic exponential kernel: from a small infested patch at the centre of a ring
 *   band of outer radius R, the share of trips landing beyond R is e^(−R/μ) (minus the share leaving the
 *   map, integrated here by quadrature), so Λ = σ p T A e^(−R/μ) (exponential survival of the distance;
 *   stratified-dispersal Poisson thinning, Shigesada, Kawasaki & Takeda 1995);
 * - a Monte Carlo simulation of the introductions themselves (random source point, uniform direction,
 *   exponential or table distance) for a straight band across part of the map and a growing infestation.
 */
import { describe, expect, it } from 'vitest';
import { behindBand, mapTransportRisk } from '../../../server/analysis/landscape/transport.ts';
import { makeSurvivalKernel } from '../../../server/analysis/bypass/bypass.ts';
import { makeRng } from '../../../server/numerics/rng.ts';

const N = 400;
const CELL = 0.1; // km
const centre = (k: number) => [((k % N) + 0.5) * CELL - 20, (Math.floor(k / N) + 0.5) * CELL - 20];

function ringMap(R1: number, R2: number, a: number) {
  const host = new Uint8Array(N * N).fill(1);
  const band = new Uint8Array(N * N);
  const u0 = new Float64Array(N * N);
  const detected = new Float32Array(N * N).fill(NaN);
  let area = 0;
  for (let k = 0; k < N * N; k++) {
    const [x, y] = centre(k);
    const r = Math.hypot(x, y);
    if (r >= R1 && r < R2) (band[k] = 1), (host[k] = 0);
    if (r < a) (u0[k] = 1), (detected[k] = 0), (area += CELL * CELL);
  }
  return { host, band, u0, detected, area };
}

describe('people carrying the pest past a band on the map', () => {
  it('ring band, small static patch, exponential kernel: Λ = σ p T A e^(−R/μ) within 3 %', () => {
    const mu = 4;
    const R2 = 3.4;
    const m = ringMap(3.0, R2, 0.15);
    const T = 10;
    const r = mapTransportRisk({ nx: N, ny: N, cellKm: CELL, hostAtCells: m.host, bandAtCells: m.band, detected: m.detected, u0: m.u0, infestedAtCells: m.u0, horizonYears: T, ratePerKm2Year: 0.2, establishmentProbability: 0.5, kernel: makeSurvivalKernel({ shape: 'exponential', meanKm: mu }) });
    // Share leaving the 40 × 40 km map from its centre: (1/2π) ∫ e^(−ρ(θ)/μ) dθ, ρ(θ) = 20 / max(|cos θ|, |sin θ|).
    let out = 0;
    const M = 20000;
    for (let i = 0; i < M; i++) {
      const th = ((i + 0.5) / M) * 2 * Math.PI;
      out += Math.exp(-20 / Math.max(Math.abs(Math.cos(th)), Math.abs(Math.sin(th))) / mu) / M;
    }
    const exact = 0.2 * 0.5 * T * m.area * (Math.exp(-R2 / mu) - out);
    console.log(`ring: Λ ${r.expectedColonies.toFixed(5)} vs closed form ${exact.toFixed(5)} (blocks ${r.blockKm} km); P ${r.probability.toFixed(4)}`);
    expect(Math.abs(r.expectedColonies / exact - 1)).toBeLessThan(0.03);
    expect(r.probability).toBeCloseTo(1 - Math.exp(-r.expectedColonies), 12);
    // Constant infested area: Λ grows linearly, so each year adds the same.
    const l = r.byYear.map((b) => -Math.log(1 - b.probability));
    expect(l[4] / l[9]).toBeCloseTo(0.5, 6);
  });

  it('behind the band is the protected side only: cells past the ends of a short band are not behind', () => {
    const host = new Uint8Array(N * N).fill(1);
    const band = new Uint8Array(N * N);
    const u0 = new Float64Array(N * N);
    for (let k = 0; k < N * N; k++) {
      const [x, y] = centre(k);
      if (x > 5 && x < 5.4 && Math.abs(y) < 4) (band[k] = 1), (host[k] = 0);
      if (Math.hypot(x + 10, y) < 0.5) u0[k] = 1;
    }
    const behind = behindBand(N, N, host, band, u0);
    const at = (x: number, y: number) => behind[Math.floor((y + 20) / CELL) * N + Math.floor((x + 20) / CELL)];
    expect(at(10, 0)).toBe(1); // straight behind
    expect(at(18, 5)).toBe(1); // the shadow widens with distance (the line from x = −10 crosses the band)
    expect(at(10, 10)).toBe(0); // past the band's end
    expect(at(0, 0)).toBe(0); // on the near side
    // A band cut across the infestation (x = −10) from y = −4 to 4 km: its cells inside the infested disc
    // shield nothing, so the ground straight ahead is not behind; its arms still shadow the land beyond them.
    const across = new Uint8Array(N * N);
    const infested = new Float32Array(N * N);
    for (let k = 0; k < N * N; k++) {
      const [x, y] = centre(k);
      if (Math.abs(x + 10) < 0.2 && Math.abs(y) < 4) across[k] = 1;
      if (Math.hypot(x + 10, y) < 0.5) infested[k] = 1;
    }
    const b2 = behindBand(N, N, host, across, u0, infested);
    const at2 = (x: number, y: number) => b2[Math.floor((y + 20) / CELL) * N + Math.floor((x + 20) / CELL)];
    expect(at2(10, 0)).toBe(0);
    expect(at2(-10, 8)).toBe(1);
  });

  it('straight band, growing infestation, table kernel: matches a Monte Carlo simulation of the introductions within 4 %', () => {
    const host = new Uint8Array(N * N).fill(1);
    const band = new Uint8Array(N * N);
    const u0 = new Float64Array(N * N);
    const detected = new Float32Array(N * N).fill(NaN);
    const c = 0.6; // km/yr, infestation growing as a disc from (−8, 0)
    for (let k = 0; k < N * N; k++) {
      const [x, y] = centre(k);
      if (x > -2 && x < -1.5 && Math.abs(y) < 9) (band[k] = 1), (host[k] = 0);
      const r = Math.hypot(x + 8, y);
      if (r < 0.5) u0[k] = 1;
      if (!band[k] && x < -1.5 && r < 0.5 + c * 10) detected[k] = Math.max(0, (r - 0.5) / c);
    }
    const kernel = { shape: 'table' as const, points: [{ distanceKm: 0, shareBeyond: 1 }, { distanceKm: 5, shareBeyond: 0.4 }, { distanceKm: 15, shareBeyond: 0.05 }, { distanceKm: 30, shareBeyond: 0 }] };
    const T = 10;
    const r = mapTransportRisk({ nx: N, ny: N, cellKm: CELL, hostAtCells: host, bandAtCells: band, detected, u0, infestedAtCells: u0, horizonYears: T, ratePerKm2Year: 0.05, establishmentProbability: 0.3, kernel: makeSurvivalKernel(kernel) });
    const behind = behindBand(N, N, host, band, u0);
    // Monte Carlo: time uniform on [0, T]; a source cell uniform among the near-side infested host cells then;
    // a point uniform in it; direction uniform; distance by inverting the table's survival function.
    const rng = makeRng(11);
    const invS = (q: number) => {
      const p = kernel.points;
      for (let i = 1; i < p.length; i++) if (q >= p[i].shareBeyond) return p[i - 1].distanceKm + ((p[i - 1].shareBeyond - q) / (p[i - 1].shareBeyond - p[i].shareBeyond)) * (p[i].distanceKm - p[i - 1].distanceKm);
      return p[p.length - 1].distanceKm;
    };
    const sources: number[][] = [];
    const byTime = (t: number) => {
      const out: number[] = [];
      for (let k = 0; k < N * N; k++) if (host[k] && !behind[k] && detected[k] <= t) out.push(k);
      return out;
    };
    const TIMES = 40;
    for (let i = 0; i < TIMES; i++) sources.push(byTime(((i + 0.5) / TIMES) * T));
    let sum = 0;
    const n = 400_000;
    for (let j = 0; j < n; j++) {
      const ti = Math.floor(rng.next() * TIMES);
      const tm = ((ti + 0.5) / TIMES) * T;
      const s = sources[ti];
      const k = s[Math.floor(rng.next() * s.length)];
      const [x0, y0] = centre(k);
      const th = 2 * Math.PI * rng.next();
      const d = invS(rng.next());
      const x = x0 + (rng.next() - 0.5) * CELL + d * Math.cos(th);
      const y = y0 + (rng.next() - 0.5) * CELL + d * Math.sin(th);
      const q = Math.floor((x + 20) / CELL);
      const row = Math.floor((y + 20) / CELL);
      if (q < 0 || q >= N || row < 0 || row >= N) continue;
      const landed = row * N + q;
      const notYet = !(detected[landed] <= tm);
      if (host[landed] && behind[landed] && notYet) sum += s.length * CELL * CELL;
    }
    const mc = (0.05 * 0.3 * T * sum) / n;
    console.log(`straight band: Λ ${r.expectedColonies.toFixed(4)} vs Monte Carlo ${mc.toFixed(4)} (blocks ${r.blockKm} km; ${n} trips)`);
    expect(Math.abs(r.expectedColonies / mc - 1)).toBeLessThan(0.04);
    expect(r.halfYears === null || r.halfYears <= T).toBe(true);
  });
});
