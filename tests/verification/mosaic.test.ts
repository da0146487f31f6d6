import { describe, expect, it } from 'vitest';
import { relErr } from '../helpers/close.ts';
import { parseScenario, pointScenario } from '../../server/model/scenario.ts';
import { analyseMosaic, mosaicPatches } from '../../server/analysis/mosaic.ts';
import { blochEigenvalue, spreadingSpeed } from '../../server/numerics/dispersion.ts';
import { runLayout } from '../../server/analysis/simulate.ts';
import type { Piece } from '../../server/analysis/layout.ts';
import { fitLine } from '../../server/analysis/speed.ts';

/** A scenario carrying only the pest (mosaic runs build their own layout). */
function pestScenario(pest: Record<string, unknown>) {
  return pointScenario(
    parseScenario({
      title: 'mosaic check',
      pest: { name: 'mosaic test pest', diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, hostKillRate: 0, mortalityOpen: 0.5, growth: { form: 'logistic', rate: 1 }, ...pest },
      transect: { segments: [{ habitat: 'host-forest', lengthKm: 10, stocking: 1, stemsPerHa: 400 }] },
      infestation: { fromKm: 0, toKm: 1 },
      horizonYears: 10,
    }),
  );
}

describe('simulated front speed in a long mosaic vs the dispersion relation (within 2 %)', () => {
  // S1–S4 (methods note (server/numerics/README.md) §2.2): forest 1 km (D 1, r 1, logistic), gap 1 km (mortality 0.5). Dispersion relation:
  // Shigesada, Kawasaki & Teramoto (1986) with the edge condition; log-corrected fit (Bramson 1983; methods note §9.3).
  const cases: [string, number, number, number][] = [
    ['S1', 4, 0.2, 1.366076],
    ['S2', 4, 0.8, 1.747394],
    ['S3', 4, 0.5, 2.11683],
    ['S4', 1, 0.5, 1.080335],
  ];
  for (const [name, d2, alpha, cStar] of cases) {
    it(`${name}: measured vs c* = ${cStar}`, () => {
      const r = analyseMosaic(pestScenario({ diffusionOpen: d2, edgePreferenceOpen: alpha }), { name, forestM: 1000, gapM: 1000, cover: 'clearing' });
      console.log(`${name}: exact ${r.exactKmPerYear!.toFixed(5)}, measured ${r.measuredKmPerYear!.toFixed(5)} (${(100 * (r.measuredKmPerYear! / cStar - 1)).toFixed(2)} %), homogenised ${r.homogenisedKmPerYear!.toFixed(5)}`);
      expect(relErr(r.exactKmPerYear!, cStar)).toBeLessThan(2e-6);
      expect(r.measuredLogCorrected).toBe(true);
      expect(relErr(r.measuredKmPerYear!, cStar)).toBeLessThan(0.02);
    });
  }

  it('consumer–resource with host depletion in a forest/gap pattern (methods note §6.2): c* = 3.46516', () => {
    // u' = u(b h − m), h' = −c u h in forest (b = 2, m = 0.2); gap D = 10, mortality 0.2, α = ½.
    const s = pestScenario({
      growth: { form: 'mate-finding', birthRate: 2, deathRate: 0.2, crowding: 0, mating: 'none' },
      hostKillRate: 1,
      diffusionOpen: 10,
      mortalityOpen: 0.2,
      edgePreferenceOpen: 0.5,
    });
    const r = analyseMosaic(s, { name: 'consumer–resource', forestM: 1000, gapM: 1000, cover: 'clearing' });
    console.log(`consumer–resource: exact ${r.exactKmPerYear}, measured ${r.measuredKmPerYear}, homogenised ${r.homogenisedKmPerYear}, intact ${r.intactKmPerYear}`);
    expect(relErr(r.exactKmPerYear!, 3.46516)).toBeLessThan(2e-6);
    expect(relErr(r.measuredKmPerYear!, 3.46516)).toBeLessThan(0.02);
    expect(r.kind).toBe('speeds-up');
  });
});

describe('persistence threshold λ(0) = 0 matches simulation', () => {
  // Forest 1 km (D 1, r 1), open strips with mortality 1, α = ½: find the open-strip length at which λ(0) = 0,
  // then simulate a small population on a domain of whole periods cut at mid-forest (a symmetry line of the
  // periodic eigenfunction, so reflecting ends keep λ(0) as the domain's principal eigenvalue). Its growth
  // rate must equal λ(0), with the sign changing at the threshold.
  const s = pestScenario({ mortalityOpen: 1 });
  const lambda0 = (gapKm: number) => blochEigenvalue(mosaicPatches(s, { name: 'x', forestM: 1000, gapM: 1000 * gapKm, cover: 'clearing' }), 0);
  let lo = 0.01;
  let hi = 20;
  for (let i = 0; i < 100; i++) {
    const mid = 0.5 * (lo + hi);
    if (lambda0(mid) > 0) lo = mid;
    else hi = mid;
  }
  const threshold = 0.5 * (lo + hi);

  const growthRate = (gapKm: number) => {
    const periods = 8;
    const pieces: Piece[] = [];
    let x = 0;
    const push = (len: number, forest: boolean, k: number) => {
      pieces.push({ fromKm: x, toKm: x + len, habitat: forest ? 'host-forest' : 'clearing', stocking: forest ? 1 : 0, stemsPerHa: 0, segment: k, barrier: false });
      x += len;
    };
    push(0.5, true, 0);
    for (let k = 0; k < periods; k++) {
      push(gapKm, false, 2 * k + 1);
      push(k === periods - 1 ? 0.5 : 1, true, 2 * k + 2);
    }
    const sm = { ...s, infestation: { fromKm: 0, toKm: x, density: 1e-9 }, horizonYears: 150, transect: { ...s.transect, segments: pieces.map((p) => (p.habitat === 'host-forest' ? { habitat: 'host-forest' as const, lengthKm: p.toKm - p.fromKm, stocking: 1, stemsPerHa: 0 } : { habitat: 'clearing' as const, lengthKm: p.toKm - p.fromKm })) } };
    const out = runLayout({ scenario: sm, pieces, record: false, resolution: { cellKm: 0.02, stepYears: 0.02, autoCell: false, autoStep: false } });
    // Slope of ln(total) over the last third (transients gone).
    const t = out.front.times;
    const idx = t.map((_, i) => i).filter((i) => t[i] > 100);
    return fitLine(idx.map((i) => t[i]), idx.map((i) => Math.log(out.front.total[i]))).slope;
  };

  it(`threshold open-strip length ≈ ${threshold.toFixed(4)} km; simulated growth rate equals λ(0) on both sides`, () => {
    for (const gap of [0.8 * threshold, 1.25 * threshold]) {
      const l0 = lambda0(gap);
      const g = growthRate(gap);
      console.log(`open strips ${gap.toFixed(4)} km: λ(0) = ${l0.toFixed(6)} /yr, simulated growth rate ${g.toFixed(6)} /yr`);
      expect(Math.sign(g)).toBe(Math.sign(l0));
      // dx = 20 m, dt = 0.02 yr: O(dx², dt²) errors ~1e-4 /yr on rates of order 0.05 /yr.
      expect(Math.abs(g - l0)).toBeLessThan(1e-3);
    }
  });
});

describe('clearing mosaics can speed spread up (Lutscher & Musgrave 2017, Ecology 98:1229, qualitative)', () => {
  // 50 % clearing strips (1 km forest / 1 km open), movement 4× faster in the open, low open mortality 0.1.
  const pattern = { name: 'strips', forestM: 1000, gapM: 1000, cover: 'clearing' as const };
  it('with no edge preference (α = ½) the pattern spreads faster than unbroken host forest', () => {
    const r = analyseMosaic(pestScenario({ diffusionOpen: 4, edgePreferenceOpen: 0.5, mortalityOpen: 0.1 }), pattern);
    console.log(`α = 0.5: exact ${r.exactKmPerYear}, measured ${r.measuredKmPerYear}, homogenised ${r.homogenisedKmPerYear}, intact ${r.intactKmPerYear}`);
    expect(r.kind).toBe('speeds-up');
    expect(r.exactKmPerYear!).toBeGreaterThan(r.intactKmPerYear * 1.05);
    expect(r.measuredKmPerYear!).toBeGreaterThan(r.intactKmPerYear * 1.05);
    expect(r.sentence).toMatch(/FASTER/);
  });
  it('with strong edge preference for forest (α = 0.9) the effect disappears', () => {
    const r = analyseMosaic(pestScenario({ diffusionOpen: 4, edgePreferenceOpen: 0.9, mortalityOpen: 0.1 }), pattern);
    console.log(`α = 0.9: exact ${r.exactKmPerYear}, measured ${r.measuredKmPerYear}, homogenised ${r.homogenisedKmPerYear}, intact ${r.intactKmPerYear}`);
    expect(r.kind).toBe('slows');
    expect(r.exactKmPerYear!).toBeLessThan(r.intactKmPerYear);
    expect(r.measuredKmPerYear!).toBeLessThan(r.intactKmPerYear);
  });
  it('a pattern the pest cannot persist in is reported as stopping it', () => {
    const r = analyseMosaic(pestScenario({ mortalityOpen: 5, edgePreferenceOpen: 0.5 }), { ...pattern, forestM: 300, gapM: 2000, measure: false });
    expect(r.lambda0).toBeLessThan(0);
    expect(r.persists).toBe(false);
    expect(r.kind).toBe('stops');
    expect(spreadingSpeed(mosaicPatches(pestScenario({ mortalityOpen: 5 }), { ...pattern, forestM: 300, gapM: 2000 })).speed).toBeNull();
  });
});
