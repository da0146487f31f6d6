import { describe, expect, it } from 'vitest';
import { latinHypercube, makeRng } from '../../server/numerics/rng.ts';
import { hasPythonScipy, runPython } from '../helpers/python.ts';

const python = hasPythonScipy();
if (!python) console.warn('SKIPPED: python3 with scipy not found; the independent xoshiro128** check is skipped');

// Independent implementation of SplitMix64 seeding + xoshiro128** 1.1, written from the published
// algorithm descriptions (Steele, Lea & Flood 2014; Blackman & Vigna 2021) in Python's arbitrary-precision
// integers, so it shares no code with the TypeScript version.
const REFERENCE = `
import json, sys
M64 = (1 << 64) - 1
G = 0x9E3779B97F4A7C15
def mix(z):
    z &= M64
    z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & M64
    z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & M64
    return z ^ (z >> 31)
def rotl(x, k):
    x &= 0xFFFFFFFF
    return ((x << k) | (x >> (32 - k))) & 0xFFFFFFFF
def gen(key, n):
    a = mix(key + G); b = mix(key + 2 * G)
    s = [a & 0xFFFFFFFF, a >> 32, b & 0xFFFFFFFF, b >> 32]
    out = []
    for _ in range(n):
        out.append((rotl((s[1] * 5) & 0xFFFFFFFF, 7) * 9) & 0xFFFFFFFF)
        t = (s[1] << 9) & 0xFFFFFFFF
        s[2] ^= s[0]; s[3] ^= s[1]; s[1] ^= s[2]; s[0] ^= s[3]; s[2] ^= t; s[3] = rotl(s[3], 11)
    return out
req = json.load(sys.stdin)
root = mix(req['seed'])
child = mix(root + (req['child'] + 1) * G + 0x632BE59BD9B4E019)
print(json.dumps({'root': gen(root, 8), 'child': gen(child, 8)}))
`;

describe('seeded generator (xoshiro128** with SplitMix64 streams)', () => {
  it.skipIf(!python)('matches an independent Python implementation of the published algorithms', () => {
    const ref = runPython<{ root: number[]; child: number[] }>(REFERENCE, { seed: 2024, child: 3 });
    const r = makeRng(2024);
    const c = r.child(3);
    expect(Array.from({ length: 8 }, () => r.nextUint32())).toEqual(ref.root);
    expect(Array.from({ length: 8 }, () => c.nextUint32())).toEqual(ref.child);
  });

  it('is reproducible and child streams do not depend on the parent having been used', () => {
    const a = makeRng(42);
    const b = makeRng(42);
    const xs = Array.from({ length: 100 }, () => a.next());
    expect(Array.from({ length: 100 }, () => b.next())).toEqual(xs);
    const fresh = makeRng(42).child(5);
    const used = a.child(5);
    expect(Array.from({ length: 20 }, () => used.next())).toEqual(Array.from({ length: 20 }, () => fresh.next()));
    expect(makeRng(42).child(5).next()).not.toBe(makeRng(42).child(6).next());
    expect(makeRng(1).next()).not.toBe(makeRng(2).next());
  });

  it('gives uniform doubles: chi-square over 20 bins and no correlation between neighbouring child streams', () => {
    const r = makeRng(99);
    const n = 100_000;
    const bins = new Array(20).fill(0);
    for (let i = 0; i < n; i++) {
      const x = r.nextOpen();
      expect(x > 0 && x < 1).toBe(true);
      bins[Math.floor(x * 20)]++;
    }
    const e = n / 20;
    const chi2 = bins.reduce((s, o) => s + ((o - e) * (o - e)) / e, 0);
    // 19 degrees of freedom: the 99.9 % point is 43.8 (chi-square tables, e.g. Abramowitz & Stegun Table 26.8).
    expect(chi2).toBeLessThan(43.8);
    const s1 = makeRng(99).child(0);
    const s2 = makeRng(99).child(1);
    let sxy = 0;
    const m = 20_000;
    for (let i = 0; i < m; i++) sxy += (s1.next() - 0.5) * (s2.next() - 0.5);
    // Correlation of independent uniforms: mean 0, standard deviation 1/√m ≈ 0.007; 5 sd bound.
    expect(Math.abs((12 * sxy) / m)).toBeLessThan(5 / Math.sqrt(m));
  });

  it('int(n) is unbiased over a small range', () => {
    const r = makeRng(5);
    const counts = [0, 0, 0];
    for (let i = 0; i < 30_000; i++) counts[r.int(3)]++;
    // Binomial sd √(30000·1/3·2/3) ≈ 82; 5 sd bound.
    for (const c of counts) expect(Math.abs(c - 10_000)).toBeLessThan(410);
  });
});

describe('Latin hypercube (McKay, Beckman & Conover 1979)', () => {
  it('puts exactly one point in each of the n strata of every dimension, inside (0,1)', () => {
    const n = 50;
    const k = 4;
    const d = latinHypercube(n, k, makeRng(3).child(0));
    for (let j = 0; j < k; j++) {
      const strata = new Set<number>();
      for (let i = 0; i < n; i++) {
        const p = d[i * k + j];
        expect(p > 0 && p < 1).toBe(true);
        strata.add(Math.floor(p * n));
      }
      expect(strata.size).toBe(n);
    }
  });
  it('is reproducible from the seed', () => {
    expect(latinHypercube(10, 3, makeRng(8).child(0))).toEqual(latinHypercube(10, 3, makeRng(8).child(0)));
  });
});
