/**
 * Spreading speed in a periodic landscape of uniform patches: the dispersion relation from transfer
 * matrices, an independent principal-eigenvalue check on the discretised twisted-periodic operator,
 * and the homogenised (two-scale average) estimate.
 *
 * Model in each patch i (residence-index form, u = ρ v): ρ_i v_t = (A_i v_x)_x + ρ_i ε_i v, A_i = D_i ρ_i,
 * with v and the flux A v_x continuous at every edge (which is the edge-jump condition u_R/u_L = ρ_R/ρ_L).
 * Bloch modes u = e^{−s x + λ t} φ(x), φ periodic, give cosh(sL) = tr M(λ)/2 with M = Π T_i,
 * T_i = [[C_i, S_i/(A_i κ_i)], [A_i κ_i S_i, C_i]] acting on (v, A v_x), κ_i = √((λ − ε_i)/D_i),
 * C_i = cosh(κ_i l_i), S_i = sinh(κ_i l_i). λ(s) is the largest root; the pest persists iff λ(0) > 0 and,
 * for growth without an Allee effect, spreads at c* = min_{s>0} λ(s)/s (linear determinacy).
 * Sources: Shigesada, Kawasaki & Teramoto (1986) Theor. Popul. Biol. 30:143–160 (continuous density,
 * ρ constant); edge condition: Ovaskainen & Cornell (2003), Maciel & Lutscher (2013); spreading speed in
 * periodic patchy landscapes with interface conditions: Hamel, Lutscher & Zhang.
 */
import { goldenSectionMin } from './minimise.ts';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

/** One uniform patch of the period. */
export interface Patch {
  /** Length [km], > 0. */
  lengthKm: number;
  /** Diffusion D [km²/yr], > 0. */
  diffusion: number;
  /** Residence index ρ (any common factor), > 0. */
  residence: number;
  /** Per-capita growth rate at low density ε [1/yr] (negative = mortality). */
  rate: number;
}

/** cosh, sinh/κ and κ·sinh of κ l with κ² = z, valid for z of either sign (entire in z). */
function hyper(z: number, l: number): { c: number; sk: number; ks: number } {
  if (z > 0) {
    const k = Math.sqrt(z);
    const x = k * l;
    const sh = Math.sinh(x);
    return { c: Math.cosh(x), sk: x < 1e-8 ? l : sh / k, ks: k * sh };
  }
  if (z < 0) {
    const w = Math.sqrt(-z);
    const x = w * l;
    const sn = Math.sin(x);
    return { c: Math.cos(x), sk: x < 1e-8 ? l : sn / w, ks: -w * sn };
  }
  return { c: 1, sk: l, ks: 0 };
}

/** Half the trace of the period's transfer matrix at growth rate λ: tr M(λ)/2. */
export function halfTrace(patches: readonly Patch[], lambda: number): number {
  // M = T_n ⋯ T_1 applied to (v, A v_x); 2×2 products kept in scalars.
  let m11 = 1;
  let m12 = 0;
  let m21 = 0;
  let m22 = 1;
  for (const p of patches) {
    const a = p.diffusion * p.residence;
    const { c, sk, ks } = hyper((lambda - p.rate) / p.diffusion, p.lengthKm);
    const t11 = c;
    const t12 = sk / a;
    const t21 = a * ks;
    const t22 = c;
    const n11 = t11 * m11 + t12 * m21;
    const n12 = t11 * m12 + t12 * m22;
    const n21 = t21 * m11 + t22 * m21;
    const n22 = t21 * m12 + t22 * m22;
    m11 = n11;
    m12 = n12;
    m21 = n21;
    m22 = n22;
  }
  return 0.5 * (m11 + m22);
}

/**
 * Principal Bloch eigenvalue λ(s) [1/yr]: the largest root of tr M(λ)/2 = cosh(sL).
 *
 * @remarks Above every ε_i all κ are real and tr M/2 ≥ cosh(κ_min L) grows without bound, so a bracket
 * [λ_lo, λ_hi] with a sign change exists; the scan goes down from λ_hi in small steps so that the first
 * sign change met is the largest root, then bisection refines it to round-off.
 */
export function blochEigenvalue(patches: readonly Patch[], s: number): number {
  const period = patches.reduce((a, p) => a + p.lengthKm, 0);
  const target = Math.cosh(s * period);
  const f = (lam: number) => halfTrace(patches, lam) - target;
  const epsMax = Math.max(...patches.map((p) => p.rate));
  const epsMin = Math.min(...patches.map((p) => p.rate));
  const dMax = Math.max(...patches.map((p) => p.diffusion));
  let hi = epsMax + dMax * s * s + 1;
  let grow = 1;
  while (!(f(hi) > 0)) {
    grow *= 2;
    hi = epsMax + dMax * s * s + grow;
    if (grow > 1e12) throw new RangeError('blochEigenvalue: no upper bracket');
  }
  // Scale of λ over which the trace can oscillate: the largest (ε_max − ε_min) + D_max (π/l_min)².
  const lMin = Math.min(...patches.map((p) => p.lengthKm));
  const scale = hi - epsMin + (dMax * Math.PI * Math.PI) / (lMin * lMin);
  const step = scale / 4000;
  let lo = hi - step;
  let fHi = f(hi);
  for (let k = 0; k < 400_000; k++) {
    const fLo = f(lo);
    if (fLo <= 0) break;
    hi = lo;
    fHi = fLo;
    lo -= step;
  }
  void fHi;
  for (let it = 0; it < 200 && hi - lo > 1e-15 * Math.max(1, Math.abs(hi)); it++) {
    const mid = 0.5 * (lo + hi);
    if (f(mid) > 0) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

export interface SpreadSpeed {
  /** c* = min_{s>0} λ(s)/s [km/yr]; null when λ(0) ≤ 0 (the pest does not persist). */
  speed: number | null;
  /** Minimising decay rate s* [1/km]. */
  decayRate: number | null;
  /** λ(0) [1/yr]. */
  lambda0: number;
}

/** c* = min λ(s)/s by a log-spaced scan and golden-section refinement (λ(s)/s is unimodal for λ(0) > 0). */
export function spreadingSpeed(patches: readonly Patch[]): SpreadSpeed {
  const lambda0 = blochEigenvalue(patches, 0);
  if (!(lambda0 > 0)) return { speed: null, decayRate: null, lambda0 };
  const ratio = (s: number) => blochEigenvalue(patches, s) / s;
  // Homogeneous guess s ≈ √(ε/D) sets the scan range.
  const dMean = patches.reduce((a, p) => a + p.diffusion * p.lengthKm, 0) / patches.reduce((a, p) => a + p.lengthKm, 0);
  const s0 = Math.sqrt(lambda0 / dMean);
  let best = s0;
  let bestV = ratio(s0);
  for (let k = -40; k <= 40; k++) {
    const s = s0 * Math.pow(10, k / 20);
    const v = ratio(s);
    if (v < bestV) {
      bestV = v;
      best = s;
    }
  }
  const m = goldenSectionMin(ratio, best / Math.pow(10, 1 / 20), best * Math.pow(10, 1 / 20), 1e-10 * best);
  return { speed: m.value, decayRate: m.x, lambda0 };
}

/**
 * λ(s) as the principal eigenvalue of the finite-volume operator on one period with the twisted-periodic
 * condition u(x + L) = e^{−sL} u(x) (an independent check of the dispersion relation).
 *
 * @remarks `cellsPerPatch` equal cells in each patch; face conductance G = 1/(dx_i/(2A_i) + dx_j/(2A_j));
 * row i: dx_i du_i/dt = G_{i+½}(v_{i+1} − v_i) − G_{i−½}(v_i − v_{i−1}) + dx_i ε_i u_i, v = u/ρ, with
 * u_{−1} = e^{sL} u_{n−1} and u_n = e^{−sL} u_0. The matrix is Metzler, so its eigenvalue of largest real
 * part is real (Perron–Frobenius) and is the principal one. Dense eigen-decomposition with ml-matrix;
 * keep n to a few hundred. Second order in the cell size (methods note (server/numerics/README.md) §2.2, §9.4).
 */
export function twistedPeriodicEigenvalue(patches: readonly Patch[], s: number, cellsPerPatch: number): number {
  const dx: number[] = [];
  const a: number[] = [];
  const rho: number[] = [];
  const eps: number[] = [];
  for (const p of patches) {
    for (let j = 0; j < cellsPerPatch; j++) {
      dx.push(p.lengthKm / cellsPerPatch);
      a.push(p.diffusion * p.residence);
      rho.push(p.residence);
      eps.push(p.rate);
    }
  }
  const n = dx.length;
  const period = patches.reduce((acc, p) => acc + p.lengthKm, 0);
  const face = (i: number, j: number) => 1 / (dx[i] / (2 * a[i]) + dx[j] / (2 * a[j]));
  const m = Matrix.zeros(n, n);
  const twistRight = Math.exp(-s * period);
  const twistLeft = Math.exp(s * period);
  for (let i = 0; i < n; i++) {
    const right = (i + 1) % n;
    const left = (i - 1 + n) % n;
    const gR = face(i, right);
    const gL = face(left, i);
    m.set(i, i, m.get(i, i) - (gR + gL) / (dx[i] * rho[i]) + eps[i]);
    m.set(i, right, m.get(i, right) + (gR / (dx[i] * rho[right])) * (i === n - 1 ? twistRight : 1));
    m.set(i, left, m.get(i, left) + (gL / (dx[i] * rho[left])) * (i === 0 ? twistLeft : 1));
  }
  const e = new EigenvalueDecomposition(m);
  let best = -Infinity;
  e.realEigenvalues.forEach((re, k) => {
    if (Math.abs(e.imaginaryEigenvalues[k]) < 1e-9 * Math.max(1, Math.abs(re)) && re > best) best = re;
  });
  return best;
}

export interface Homogenised {
  /** D_eff = 1/(⟨1/A⟩⟨ρ⟩) [km²/yr]. */
  diffusion: number;
  /** r_eff = ⟨ρ ε⟩/⟨ρ⟩ [1/yr]. */
  rate: number;
  /** 2√(D_eff r_eff) [km/yr]; null when r_eff ≤ 0. */
  speed: number | null;
}

/**
 * Homogenised estimate (fine-grained limit; residence-index weighting of growth): length-weighted averages
 * ⟨·⟩ over a period. Yurk & Cobbold (2018), J. Math. Biol., doi 10.1007/s00285-017-1186-6; classical
 * k = 1 case: harmonic mean of D and arithmetic mean of ε (Shigesada & Kawasaki 1997).
 */
export function homogenised(patches: readonly Patch[]): Homogenised {
  const L = patches.reduce((acc, p) => acc + p.lengthKm, 0);
  let invA = 0;
  let rho = 0;
  let rhoEps = 0;
  for (const p of patches) {
    invA += p.lengthKm / (p.diffusion * p.residence);
    rho += p.lengthKm * p.residence;
    rhoEps += p.lengthKm * p.residence * p.rate;
  }
  invA /= L;
  rho /= L;
  rhoEps /= L;
  const diffusion = 1 / (invA * rho);
  const rate = rhoEps / rho;
  return { diffusion, rate, speed: rate > 0 ? 2 * Math.sqrt(diffusion * rate) : null };
}
