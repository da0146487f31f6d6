/**
 * Tridiagonal solves split into four independent chains run in lockstep (a four-block SPIKE partition),
 * with the plain Thomas algorithm as fallback.
 *
 * @remarks
 * Why: the Thomas recurrences are latency-bound (each row waits for the previous one). Cutting the matrix
 * into P = 4 diagonal blocks gives four independent recurrences that one loop advances together, so the
 * processor overlaps them. Partitioned algorithm (SPIKE; Sameh & Kuck 1978, J. ACM 25:81–91; Polizzi &
 * Sameh 2006, Parallel Computing 32:177–194), exact form (no truncation):
 * - block j (rows s_j … e_j − 1) with the local tridiagonal matrix A_j; the coupling entries are
 *   a_{s_j} (to the last unknown of block j − 1) and c_{e_j − 1} (to the first of block j + 1);
 * - factor: Thomas factors of each A_j, and the spikes w_j = A_j⁻¹ (a_{s_j} e_first),
 *   v_j = A_j⁻¹ (c_{e_j−1} e_last);
 * - solve: g_j = A_j⁻¹ f_j (four chains in lockstep); the 2P first/last unknowns from the small reduced
 *   system t_j + w_j[0] b_{j−1} + v_j[0] t_{j+1} = g_j[0], b_j + w_j[−1] b_{j−1} + v_j[−1] t_{j+1} = g_j[−1]
 *   (dense elimination with partial pivoting, 8 × 8); then x_j = g_j − w_j b_{j−1} − v_j t_{j+1}.
 * Stability: the partition is Gaussian elimination of a symmetrically permuted matrix without pivoting.
 * For a Z-matrix (off-diagonals ≤ 0) with positive pivots, that matrix is a nonsingular M-matrix (a
 * Z-matrix is one iff all leading principal minors are positive; Berman & Plemmons 1994, Nonnegative
 * Matrices in the Mathematical Sciences, ch. 6, condition (A1)) and elimination without pivoting is stable.
 * So the lockstep path is used only when the matrix is a Z-matrix and every block pivot is positive and
 * the reduced system is well conditioned; otherwise (and for small systems) the Thomas algorithm runs.
 */

/** Number of blocks (independent chains). Four measured best on a Fisher–KPP prototype (≈ 4.5× over Thomas at N = 4000). */
const BLOCKS = 4;
/** Below this many unknowns per block the partition costs more than it saves: Thomas. */
const MIN_ROWS_PER_BLOCK = 32;
/** A reduced-system pivot below this (relative to 1: its diagonal is 1) counts as ill conditioned: Thomas. */
const REDUCED_PIVOT_FLOOR = 1e-8;
/** Solution values below this are flushed to 0 in the sweeps (see solve). */
const TINY = 1e-150;
/**
 * Spike entries below this are set to 0: their share of the solution is below 1e-20 × the interface
 * values, far under round-off of O(1) densities and any tolerance; the correction pass then only runs where
 * a spike is nonzero, and no product of two tiny numbers falls into the (slow) subnormal range.
 */
const SPIKE_FLOOR = 1e-20;

export interface LockstepTridiagonal {
  /**
   * Factorises the m × m matrix with sub-diagonal `lower[i]` (row i, column i − 1; lower[0] unused),
   * diagonal `diag[i]`, super-diagonal `upper[i]` (row i, column i + 1; upper[m − 1] unused).
   * Returns which path will solve: 'lockstep' or 'thomas'.
   */
  factor(lower: Float64Array, diag: Float64Array, upper: Float64Array, m: number): 'lockstep' | 'thomas';
  /** Solves with the last factorisation: reads rhs[0..m), writes out[0..m) (may alias rhs). */
  solve(rhs: Float64Array, out: Float64Array): Float64Array;
  /** Counts of factorisations by path. */
  readonly counters: { lockstep: number; thomas: number };
}

/**
 * Makes a solver for systems of up to `capacity` unknowns; all scratch is allocated here, once.
 *
 * Longer than 80 lines on purpose: the closure owns the scratch of both paths (the four-block lockstep
 * partition and the Thomas fallback) and the factorisation that `solve` reuses; its two long inner
 * functions are the hand-unrolled hot loops.
 * @param capacity - largest m a factorisation may use
 * @param options.forceThomas - always use the Thomas path (for comparisons and tests)
 */
export function makeLockstepTridiagonal(capacity: number, options: { forceThomas?: boolean } = {}): LockstepTridiagonal {
  const sub = new Float64Array(capacity);
  const inv = new Float64Array(capacity);
  const cp = new Float64Array(capacity);
  const wSpike = new Float64Array(capacity);
  const vSpike = new Float64Array(capacity);
  const P = BLOCKS;
  const start = new Int32Array(P + 1);
  // Nonzero extent of each block's spikes: w from the block start, v up to the block end.
  const wLen = new Int32Array(P);
  const vLen = new Int32Array(P);
  // Reduced system (2P unknowns: t_0, b_0, t_1, b_1, …), LU with partial pivoting.
  const R = 2 * P;
  const red = new Float64Array(R * R);
  const perm = new Int32Array(R);
  const rr = new Float64Array(R);
  let m = 0;
  let path: 'lockstep' | 'thomas' = 'thomas';
  let blockLen = 0;
  const counters = { lockstep: 0, thomas: 0 };

  function factorThomas(lower: Float64Array, diag: Float64Array, upper: Float64Array): void {
    let c = 0;
    for (let i = 0; i < m; i++) {
      const a = i > 0 ? lower[i] : 0;
      const ip = 1 / (diag[i] - a * c);
      sub[i] = a;
      inv[i] = ip;
      c = i < m - 1 ? upper[i] * ip : 0;
      cp[i] = c;
    }
  }

  function solveThomas(rhs: Float64Array, out: Float64Array): Float64Array {
    let y = 0;
    for (let i = 0; i < m; i++) {
      y = (rhs[i] - sub[i] * y) * inv[i];
      if (Math.abs(y) < TINY) y = 0;
      out[i] = y;
    }
    let x = 0;
    for (let i = m - 1; i >= 0; i--) {
      x = out[i] - cp[i] * x;
      if (Math.abs(x) < TINY) x = 0;
      out[i] = x;
    }
    return out;
  }

  /**
   * Lockstep factorisation; false when a pivot is not positive (then the caller falls back).
   * Longer than 80 lines on purpose: four independent elimination chains are unrolled by hand and run in
   * one loop (that is where the speed comes from: the chains' recurrences overlap), followed by the small
   * reduced system that couples the blocks.
   */
  function factorLockstep(lower: Float64Array, diag: Float64Array, upper: Float64Array): boolean {
    const L = blockLen;
    const s0 = 0;
    const s1 = L;
    const s2 = 2 * L;
    const s3 = 3 * L;
    const e3 = m;
    // Forward sweep of the four local factorisations together (the last block is the longest: it may
    // have up to P − 1 extra rows, done after the lockstep loop).
    let c0 = 0;
    let c1 = 0;
    let c2 = 0;
    let c3 = 0;
    let minPivot = Infinity;
    for (let k = 0; k < L; k++) {
      const i0 = s0 + k;
      const i1 = s1 + k;
      const i2 = s2 + k;
      const i3 = s3 + k;
      const a0 = k > 0 ? lower[i0] : 0;
      const a1 = k > 0 ? lower[i1] : 0;
      const a2 = k > 0 ? lower[i2] : 0;
      const a3 = k > 0 ? lower[i3] : 0;
      const p0 = diag[i0] - a0 * c0;
      const p1 = diag[i1] - a1 * c1;
      const p2 = diag[i2] - a2 * c2;
      const p3 = diag[i3] - a3 * c3;
      const q = Math.min(p0, p1, p2, p3);
      if (q < minPivot) minPivot = q;
      const ip0 = 1 / p0;
      const ip1 = 1 / p1;
      const ip2 = 1 / p2;
      const ip3 = 1 / p3;
      sub[i0] = a0;
      sub[i1] = a1;
      sub[i2] = a2;
      sub[i3] = a3;
      inv[i0] = ip0;
      inv[i1] = ip1;
      inv[i2] = ip2;
      inv[i3] = ip3;
      // The last row of blocks 0–2 has its super-diagonal entry outside the block: cp = 0 there.
      c0 = k < L - 1 ? upper[i0] * ip0 : 0;
      c1 = k < L - 1 ? upper[i1] * ip1 : 0;
      c2 = k < L - 1 ? upper[i2] * ip2 : 0;
      c3 = i3 < e3 - 1 ? upper[i3] * ip3 : 0;
      cp[i0] = c0;
      cp[i1] = c1;
      cp[i2] = c2;
      cp[i3] = c3;
    }
    for (let i = s3 + L; i < e3; i++) {
      const a = lower[i];
      const p = diag[i] - a * c3;
      if (p < minPivot) minPivot = p;
      const ip = 1 / p;
      sub[i] = a;
      inv[i] = ip;
      c3 = i < e3 - 1 ? upper[i] * ip : 0;
      cp[i] = c3;
    }
    if (!(minPivot > 0)) return false;
    // Spikes. Left spike of block j (j ≥ 1): forward sweep from y_0 = a_{s_j}/p_0 with zero right side,
    // then back substitution. Right spike of block j (j ≤ 2): y = 0 except the last row, then back substitution.
    for (let j = 1; j < P; j++) {
      const s = start[j];
      const e = start[j + 1];
      let y = lower[s] * inv[s];
      wSpike[s] = y;
      for (let i = s + 1; i < e; i++) {
        y = -sub[i] * y * inv[i];
        if (Math.abs(y) < SPIKE_FLOOR) y = 0;
        wSpike[i] = y;
      }
      let x = 0;
      let len = 0;
      for (let i = e - 1; i >= s; i--) {
        x = wSpike[i] - cp[i] * x;
        if (Math.abs(x) < SPIKE_FLOOR) x = 0;
        else if (len === 0) len = i - s + 1;
        wSpike[i] = x;
      }
      wLen[j] = len;
    }
    for (let i = start[0]; i < start[1]; i++) wSpike[i] = 0;
    for (let j = 0; j < P - 1; j++) {
      const s = start[j];
      const e = start[j + 1];
      let x = upper[e - 1] * inv[e - 1];
      vSpike[e - 1] = x;
      let len = 1;
      for (let i = e - 2; i >= s; i--) {
        x = -cp[i] * x;
        if (Math.abs(x) < SPIKE_FLOOR) x = 0;
        else len = e - i;
        vSpike[i] = x;
      }
      vLen[j] = len;
    }
    for (let i = start[P - 1]; i < m; i++) vSpike[i] = 0;
    // Reduced system in the unknowns z = (t_0, b_0, …, t_{P−1}, b_{P−1}).
    red.fill(0);
    for (let j = 0; j < P; j++) {
      const s = start[j];
      const e = start[j + 1] - 1;
      const rt = 2 * j;
      const rb = 2 * j + 1;
      red[rt * R + rt] = 1;
      red[rb * R + rb] += 1;
      if (j > 0) {
        red[rt * R + (2 * (j - 1) + 1)] += wSpike[s];
        red[rb * R + (2 * (j - 1) + 1)] += wSpike[e];
      }
      if (j < P - 1) {
        red[rt * R + 2 * (j + 1)] += vSpike[s];
        red[rb * R + 2 * (j + 1)] += vSpike[e];
      }
    }
    for (let r = 0; r < R; r++) perm[r] = r;
    for (let k = 0; k < R; k++) {
      let piv = k;
      for (let r = k + 1; r < R; r++) if (Math.abs(red[r * R + k]) > Math.abs(red[piv * R + k])) piv = r;
      if (!(Math.abs(red[piv * R + k]) > REDUCED_PIVOT_FLOOR)) return false;
      if (piv !== k) {
        for (let c = 0; c < R; c++) {
          const t = red[k * R + c];
          red[k * R + c] = red[piv * R + c];
          red[piv * R + c] = t;
        }
        const t = perm[k];
        perm[k] = perm[piv];
        perm[piv] = t;
      }
      const d = red[k * R + k];
      for (let r = k + 1; r < R; r++) {
        const f = red[r * R + k] / d;
        red[r * R + k] = f;
        for (let c = k + 1; c < R; c++) red[r * R + c] -= f * red[k * R + c];
      }
    }
    return true;
  }

  /**
   * Solve with the lockstep factorisation. Longer than 80 lines on purpose: the forward and backward sweeps
   * of the four chains are unrolled by hand in lockstep, as in the factorisation.
   */
  function solveLockstep(rhs: Float64Array, out: Float64Array): Float64Array {
    const L = blockLen;
    const s1 = L;
    const s2 = 2 * L;
    const s3 = 3 * L;
    const e3 = m;
    let y0 = 0;
    let y1 = 0;
    let y2 = 0;
    let y3 = 0;
    for (let k = 0; k < L; k++) {
      const i1 = s1 + k;
      const i2 = s2 + k;
      const i3 = s3 + k;
      y0 = (rhs[k] - sub[k] * y0) * inv[k];
      y1 = (rhs[i1] - sub[i1] * y1) * inv[i1];
      y2 = (rhs[i2] - sub[i2] * y2) * inv[i2];
      y3 = (rhs[i3] - sub[i3] * y3) * inv[i3];
      // Flush values that would decay into subnormal numbers (far ahead of a front), whose arithmetic is
      // tens of times slower; below 1e-150 nothing in this engine can matter (densities are O(1)), and squares in the error norms stay normal numbers.
      if (Math.abs(y0) < TINY) y0 = 0;
      if (Math.abs(y1) < TINY) y1 = 0;
      if (Math.abs(y2) < TINY) y2 = 0;
      if (Math.abs(y3) < TINY) y3 = 0;
      out[k] = y0;
      out[i1] = y1;
      out[i2] = y2;
      out[i3] = y3;
    }
    for (let i = s3 + L; i < e3; i++) {
      y3 = (rhs[i] - sub[i] * y3) * inv[i];
      if (Math.abs(y3) < TINY) y3 = 0;
      out[i] = y3;
    }
    let x3 = 0;
    for (let i = e3 - 1; i >= s3 + L; i--) {
      x3 = out[i] - cp[i] * x3;
      if (Math.abs(x3) < TINY) x3 = 0;
      out[i] = x3;
    }
    let x0 = 0;
    let x1 = 0;
    let x2 = 0;
    for (let k = L - 1; k >= 0; k--) {
      const i1 = s1 + k;
      const i2 = s2 + k;
      const i3 = s3 + k;
      x0 = out[k] - cp[k] * x0;
      x1 = out[i1] - cp[i1] * x1;
      x2 = out[i2] - cp[i2] * x2;
      x3 = out[i3] - cp[i3] * x3;
      if (Math.abs(x0) < TINY) x0 = 0;
      if (Math.abs(x1) < TINY) x1 = 0;
      if (Math.abs(x2) < TINY) x2 = 0;
      if (Math.abs(x3) < TINY) x3 = 0;
      out[k] = x0;
      out[i1] = x1;
      out[i2] = x2;
      out[i3] = x3;
    }
    // Reduced system: right side = first/last local solutions, permuted; forward and back substitution.
    for (let r = 0; r < R; r++) {
      const q = perm[r];
      const j = q >> 1;
      rr[r] = q & 1 ? out[start[j + 1] - 1] : out[start[j]];
    }
    for (let r = 1; r < R; r++) {
      let acc = rr[r];
      for (let c = 0; c < r; c++) acc -= red[r * R + c] * rr[c];
      rr[r] = acc;
    }
    for (let r = R - 1; r >= 0; r--) {
      let acc = rr[r];
      for (let c = r + 1; c < R; c++) acc -= red[r * R + c] * rr[c];
      rr[r] = acc / red[r * R + r];
    }
    // rr now holds z = (t_0, b_0, t_1, b_1, …) in natural order. Correction x_j = g_j − w_j b_{j−1} − v_j t_{j+1}.
    for (let j = 0; j < P; j++) {
      const bPrev = j > 0 ? rr[2 * (j - 1) + 1] : 0;
      const tNext = j < P - 1 ? rr[2 * (j + 1)] : 0;
      // Only where the spikes are nonzero (they decay geometrically away from the block ends).
      const s = start[j];
      const e = start[j + 1];
      if (j > 0) for (let i = s, end = s + wLen[j]; i < end; i++) out[i] -= wSpike[i] * bPrev;
      if (j < P - 1) for (let i = e - vLen[j]; i < e; i++) out[i] -= vSpike[i] * tNext;
    }
    return out;
  }

  return {
    factor(lower, diag, upper, size) {
      if (!(size >= 1 && size <= capacity)) throw new RangeError(`system size ${size} outside 1…${capacity}`);
      m = size;
      path = 'thomas';
      if (!options.forceThomas && m >= P * MIN_ROWS_PER_BLOCK) {
        let zMatrix = true;
        for (let i = 1; i < m; i++) if (lower[i] > 0 || upper[i - 1] > 0) zMatrix = false;
        if (zMatrix) {
          blockLen = Math.floor(m / P);
          for (let j = 0; j < P; j++) start[j] = j * blockLen;
          start[P] = m;
          if (factorLockstep(lower, diag, upper)) path = 'lockstep';
        }
      }
      if (path === 'thomas') factorThomas(lower, diag, upper);
      counters[path]++;
      return path;
    },
    solve(rhs, out) {
      return path === 'lockstep' ? solveLockstep(rhs, out) : solveThomas(rhs, out);
    },
    counters,
  };
}
