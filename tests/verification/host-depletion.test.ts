/**
 * Host depletion: consumer–resource growth with P ≡ 1 and no crowding,
 *   u_t = D u_xx + u (b h − m),   h_t = −c u h,
 * is the diffusive S–I–removal structure (h plays "susceptible"). Published results used here:
 * - a travelling pulse in u with a monotone host front; its speed is linearly determined,
 *   c* = 2√(D (b h0 − m)) (Diekmann 1978, J. Math. Biol. 6:109–130; Källén, Arcuri & Murray 1985,
 *   J. Theor. Biol. 116:377–393 for the rabies analogue) [MEM for the exact statements; methods note (server/numerics/README.md) §6];
 * - the host fraction left behind, z = h∞/h0, solves the Kermack–McKendrick final-size relation
 *   R0 (1 − z) = −ln z with R0 = b h0 / m (Kermack & McKendrick 1927, Proc. R. Soc. A 115:700–721),
 *   independent of c and D. methods note §6.2 check values (computed): c* = 2, z = 0.203188 for D = 1, b = 2,
 *   h0 = 1, m = 1, c = 1.
 */
import { describe, expect, it } from 'vitest';
import { spreadRate } from '../../server/analysis/speed.ts';
import { expectAllClose, relErr } from '../helpers/close.ts';
import { hostSegment, runScenario, testPest, testScenario } from '../helpers/scenario.ts';

/** Root of R0 (1 − z) = −ln z in (0, 1) by bisection (independent of the engine). */
function finalSize(R0: number): number {
  let lo = 1e-300;
  let hi = 1 - 1e-12;
  const f = (z: number) => R0 * (1 - z) + Math.log(z);
  for (let k = 0; k < 200; k++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) < 0) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}

interface Case {
  label: string;
  D: number;
  b: number;
  m: number;
  c: number;
  h0: number;
  years: number;
}

function runCase(k: Case) {
  const net = k.b * k.h0 - k.m;
  const speed = 2 * Math.sqrt(k.D * net);
  const lengthKm = 1.1 * speed * k.years + 20;
  const s = testScenario({
    pest: testPest({
      diffusionHost: k.D,
      growth: { form: 'mate-finding', birthRate: k.b, deathRate: k.m, crowding: 0, mating: 'none' },
      hostKillRate: k.c,
    }),
    transect: { segments: [hostSegment(lengthKm, k.h0)] },
    infestation: { fromKm: 0, toKm: 2, density: 0.1 },
    horizonYears: k.years,
  });
  const out = runScenario(s);
  const g = out.problem.grid;
  const front = out.front.rightKm[out.front.rightKm.length - 1];
  let peak = 0;
  let peakAt = 0;
  for (let i = 0; i < g.nCells; i++) if (out.u[i] > peak) [peak, peakAt] = [out.u[i], g.centersKm[i]];
  // Behind the pulse (from 15 km to 40 km behind the front) the insects have gone and h has its final value.
  const behind: number[] = [];
  let uBehind = 0;
  for (let i = 0; i < g.nCells; i++) {
    const x = g.centersKm[i];
    if (x > 15 && x < front - 40) {
      behind.push(out.h[i] / k.h0);
      uBehind = Math.max(uBehind, out.u[i]);
    }
  }
  return { speed, decay: Math.sqrt(net / k.D), out, lengthKm, peak, peakAt, front, z: median(behind), uBehind };
}

describe('host depletion: travelling pulse, linear speed 2√(D(b·h0 − m)), Kermack–McKendrick final size', () => {
  it('the final-size root used below reproduces the methods note §6.2 check value z = 0.203188 for R0 = 2', () => {
    expectAllClose(finalSize(2), 0.203188, { rtol: 3e-6 });
  });

  const cases: Case[] = [
    { label: 'D = 1, b = 2, m = 1, c = 1, h0 = 1 (methods note §6.2: c* = 2, z = 0.203188)', D: 1, b: 2, m: 1, c: 1, h0: 1, years: 120 },
    { label: 'D = 0.5, b = 3, m = 1, c = 2, h0 = 0.8 (R0 = 2.4)', D: 0.5, b: 3, m: 1, c: 2, h0: 0.8, years: 100 },
  ];
  for (const k of cases) {
    it(`${k.label}: pulse with dead hosts behind, speed and host left`, () => {
      const r = runCase(k);
      const fitWindow = { lowKm: 2, highKm: r.lengthKm - 5 };
      const raw = spreadRate(r.out.front.times, r.out.front.rightKm, fitWindow, 1)!;
      const corrected = spreadRate(r.out.front.times, r.out.front.rightKm, fitWindow, 1, r.decay)!;
      const z = finalSize((k.b * k.h0) / k.m);
      console.log(
        `host depletion ${k.label}: c* = ${r.speed.toFixed(6)}, raw ${raw.kmPerYear.toFixed(6)} (${(100 * (raw.kmPerYear / r.speed - 1)).toFixed(3)} %), ` +
          `log-corrected ${corrected.kmPerYear.toFixed(6)} (${(100 * (corrected.kmPerYear / r.speed - 1)).toFixed(3)} %); ` +
          `host left ${r.z.toFixed(7)} vs z = ${z.toFixed(7)} (${(100 * (r.z / z - 1)).toExponential(2)} %); pulse peak ${r.peak.toFixed(4)} at ${r.peakAt.toFixed(1)} km, ` +
          `max u behind ${r.uBehind.toExponential(2)}; ${r.out.problem.grid.nCells} cells, dt ${r.out.problem.resolution.stepYears.toPrecision(3)}`,
      );
      // A pulse: density rises at the front and falls back towards 0 behind it, where hosts are dead.
      expect(r.peak).toBeLessThan(k.h0);
      expect(r.peakAt).toBeGreaterThan(r.front - 30);
      expect(r.uBehind).toBeLessThan(1e-3 * r.peak);
      // Final size: exact relation, only the spatial/temporal discretisation of the pulse enters (measured < 1e-5).
      expectAllClose(r.z, z, { rtol: 1e-4 });
      // Pulled front: raw fit within 2 % (Bramson lag), log-corrected within 0.3 %.
      expectAllClose(raw.kmPerYear, r.speed, { rtol: 0.02 });
      expect(relErr(corrected.kmPerYear, r.speed)).toBeLessThan(0.003);
    });
  }

  it('the host fraction left does not depend on the kill rate c (final-size relation has no c)', () => {
    const base = { D: 1, b: 2, m: 1, h0: 1, years: 50, label: '' };
    const slow = runCase({ ...base, c: 0.5 });
    const fast = runCase({ ...base, c: 3 });
    console.log(`host left with c = 0.5: ${slow.z.toFixed(7)}, with c = 3: ${fast.z.toFixed(7)}, z = ${finalSize(2).toFixed(7)}`);
    expectAllClose([slow.z, fast.z], [finalSize(2), finalSize(2)], { rtol: 1e-4 });
  });
});
