/**
 * Seeded pseudo-random numbers with independent child streams, and Latin hypercube designs.
 *
 * Generator: xoshiro128** 1.1 (Blackman & Vigna 2021, "Scrambled linear pseudorandom number generators",
 * ACM Trans. Math. Softw. 47(4):36), 128-bit state, period 2^128 − 1, 32-bit outputs.
 * Seeding and stream splitting: SplitMix64 (Steele, Lea & Flood 2014, OOPSLA "Fast splittable
 * pseudorandom number generators"): a stream is identified by a 64-bit key; child k of a stream gets
 * the key mix64(key + (k + 1)·γ), γ = 0x9E3779B97F4A7C15, and its xoshiro state from the next SplitMix64
 * outputs. Children depend only on (seed, path of child indices), so ensemble member i gets the same
 * numbers whatever order or thread evaluates it.
 */

const MASK64 = (1n << 64n) - 1n;
/** SplitMix64 increment (the golden-ratio constant). */
const GAMMA64 = 0x9e3779b97f4a7c15n;

/** SplitMix64 output function (finaliser) of a 64-bit value. */
function mix64(z0: bigint): bigint {
  let z = z0 & MASK64;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return z ^ (z >> 31n);
}

/** Seeded generator. Not for cryptography. */
export interface Rng {
  /** Next 32-bit unsigned integer. */
  nextUint32(): number;
  /** Uniform double in [0, 1) with 53 random bits. */
  next(): number;
  /** Uniform double in the open interval (0, 1) (safe for inverse distribution functions). */
  nextOpen(): number;
  /** Uniform integer in [0, n) (unbiased, by rejection). */
  int(n: number): number;
  /** Independent child stream number k (k ≥ 0); does not advance this stream. */
  child(k: number): Rng;
  /** The 64-bit key identifying this stream (for records). */
  readonly key: bigint;
}

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

function makeFromKey(key: bigint): Rng {
  // State from two SplitMix64 outputs of the key (never all zero: SplitMix64 is a bijection on distinct inputs).
  const a = mix64(key + GAMMA64);
  const b = mix64(key + 2n * GAMMA64);
  let s0 = Number(a & 0xffffffffn) | 0;
  let s1 = Number(a >> 32n) | 0;
  let s2 = Number(b & 0xffffffffn) | 0;
  let s3 = Number(b >> 32n) | 0;
  if ((s0 | s1 | s2 | s3) === 0) s0 = 1;
  const nextUint32 = (): number => {
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0;
    const t = s1 << 9;
    s2 ^= s0;
    s3 ^= s1;
    s1 ^= s2;
    s0 ^= s3;
    s2 ^= t;
    s3 = rotl(s3, 11);
    return result;
  };
  const next = (): number => {
    const hi = nextUint32() >>> 5; // 27 bits
    const lo = nextUint32() >>> 6; // 26 bits
    return (hi * 67108864 + lo) / 9007199254740992;
  };
  return {
    key,
    nextUint32,
    next,
    nextOpen() {
      const hi = nextUint32() >>> 5;
      const lo = nextUint32() >>> 6;
      return (hi * 67108864 + lo + 0.5) / 9007199254740992;
    },
    int(n) {
      if (!(n >= 1 && n <= 4294967296 && Number.isInteger(n))) throw new RangeError(`int(n) needs a whole n in [1, 2^32], got ${n}`);
      // Rejection of the incomplete top block keeps every value equally likely.
      const limit = 4294967296 - (4294967296 % n);
      for (;;) {
        const x = nextUint32();
        if (x < limit) return x % n;
      }
    },
    child(k) {
      if (!(Number.isInteger(k) && k >= 0)) throw new RangeError(`child index must be a whole number ≥ 0, got ${k}`);
      return makeFromKey(mix64(key + BigInt(k + 1) * GAMMA64 + 0x632be59bd9b4e019n));
    },
  };
}

/**
 * A generator from a seed (a whole number 0 … 2^53). The same seed gives the same sequence on every
 * platform.
 */
export function makeRng(seed: number): Rng {
  if (!(Number.isInteger(seed) && seed >= 0 && seed <= Number.MAX_SAFE_INTEGER)) throw new RangeError(`seed must be a whole number ≥ 0, got ${seed}`);
  return makeFromKey(mix64(BigInt(seed)));
}

/**
 * Latin hypercube design on the unit cube: n points in k dimensions, row-major (`out[i*k + j]`).
 *
 * @remarks Each dimension is cut into n equal strata; a random permutation (Fisher–Yates) assigns one
 * stratum to each point and a uniform draw places it inside: `p_ij = (π_j(i) + U_ij)/n`, U in (0,1).
 * McKay, Beckman & Conover (1979), Technometrics 21(2):239–245. Values lie in the open interval (0, 1).
 */
export function latinHypercube(n: number, k: number, rng: Rng): Float64Array {
  if (!(Number.isInteger(n) && n >= 1)) throw new RangeError(`n must be a whole number ≥ 1, got ${n}`);
  const out = new Float64Array(n * k);
  const perm = new Int32Array(n);
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < n; i++) perm[i] = i;
    for (let i = n - 1; i > 0; i--) {
      const r = rng.int(i + 1);
      const t = perm[i];
      perm[i] = perm[r];
      perm[r] = t;
    }
    for (let i = 0; i < n; i++) out[i * k + j] = (perm[i] + rng.nextOpen()) / n;
  }
  return out;
}
