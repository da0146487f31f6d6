/**
 * Variable-order, variable-step numerical differentiation formulas (NDF, orders 1–5) with error control,
 * step-size and order selection, Jacobian and factorisation reuse, dense output and a positivity check.
 *
 * @remarks
 * Method: the Klopfenstein–Shampine NDFs in backward-difference form, as in Shampine & Reichelt (1997),
 * "The MATLAB ODE Suite", SIAM J. Sci. Comput. 18:1–22 (§2: κ = −0.1850, −1/9, −0.0823, −0.0415, 0 for
 * orders 1–5; order 5 is BDF5). With backward differences ∇ʲ of the history, order k, step h,
 * γ_k = Σ_{j≤k} 1/j and α_k = (1 − κ_k) γ_k, one step solves for y = y_{n+1}:
 *   y⁽⁰⁾ = Σ_{j=0..k} ∇ʲ y_n (predictor),  ψ = (1/α_k) Σ_{j=1..k} γ_j ∇ʲ y_n,
 *   (y − y⁽⁰⁾) + ψ = (h/α_k) f(t_{n+1}, y),
 * by a simplified Newton iteration with the matrix I − (h/α_k) J (J and its factorisation kept across
 * steps while the iteration converges). The local error is (κ_k γ_k + 1/(k+1)) ∇^{k+1} y_{n+1}, and the
 * errors of orders k ± 1 come from the neighbouring differences, which selects the next order.
 * The step size changes by re-expressing the difference table on the new grid (the interpolating
 * polynomial is unchanged): quasi-constant step size, as in ode15s and in scipy's `solve_ivp(method='BDF')`
 * (the open reference implementation whose control constants — Newton iterations 4, step factors
 * 0.2…10, Newton tolerance max(10 ε/rtol, min(0.03, √rtol)) — are used here). Differences and step change:
 * Byrne & Hindmarsh (1975), ACM TOMS 1:71–96; Shampine (1994), Numerical Solution of ODEs, ch. 8.
 *
 * Positivity (densities and host fractions cannot be negative, and u = 0 is unstable for growth forms
 * without an Allee effect): a step that ends with a component below −atol is rejected and retried with
 * half the step; smaller negatives are set to 0 and the difference table is updated with the clipped value.
 *
 * Active window: all vector work runs over the components lo…hi−1 of {@link ActiveWindow}; outside it the
 * history is constant (higher differences 0), which every operation here preserves, so a component can
 * join or leave the window between steps without touching the table.
 *
 * Longer than 400 lines on purpose: one integrator whose step, Newton iteration, error estimate, order and
 * step-size change and dense output share the difference table and the factorisation in one closure; the
 * unrolled accumulation kernels at the end are the hot loops.
 */
import type { ActiveWindow, StepperCounters, StiffSystem } from './stiff-system.ts';

const MAX_ORDER = 5;
const NEWTON_MAXITER = 4;
const MIN_FACTOR = 0.2;
const MAX_FACTOR = 10;
/** NDF coefficients κ_k, k = 0…5 (Shampine & Reichelt 1997, Table 1; k = 5 is BDF5). */
const KAPPA = [0, -0.185, -1 / 9, -0.0823, -0.0415, 0];
const GAMMA = [0];
for (let k = 1; k <= MAX_ORDER; k++) GAMMA.push(GAMMA[k - 1] + 1 / k);
const ALPHA = KAPPA.map((kap, k) => (1 - kap) * GAMMA[k]);
/** Error constants: ERROR_CONST[k] ∇^{k+1} y is the local error of order k. */
const ERROR_CONST = KAPPA.map((kap, k) => kap * GAMMA[k] + 1 / (k + 1));
/** Magnitude below which differences are flushed to 0 (far below any tolerance; avoids subnormal numbers). */
const TINY = 1e-150;
/**
 * Weighted errors below this add nothing to a norm (their squares would underflow into subnormal numbers,
 * which made a whole run 10× slower ahead of a front: products of two tiny numbers are the one place where
 * this engine's arithmetic leaves the normal range).
 */
const NORM_FLOOR = 1e-100;

export interface NdfOptions {
  /** Relative tolerance (> 0). */
  rtol: number;
  /** Absolute tolerance (> 0), in the units of y. */
  atol: number;
  /** Largest step (default Infinity). */
  maxStep?: number;
  /** First step (default: chosen from the derivatives, as in Hairer, Nørsett & Wanner I, §II.4). */
  firstStep?: number;
  /** Largest order, 1…5 (default 5). */
  maxOrder?: number;
  /**
   * Smallest step increase worth a new factorisation (default 1.2, as ode15s does): a proposed factor in
   * [1, minIncrease) keeps the step and the factorisation.
   */
  minIncrease?: number;
  /** Reject steps that end below −atol in any component, clip smaller negatives (default true). */
  nonNegative?: boolean;
  /**
   * Fixed controller (for order studies and comparisons): constant step and order, no error-based
   * rejection. `history[j]` = y(t0 − j·step), j = 0…order, starts the formula at full order
   * (backward differences of the exact history); without it the first steps run at order 1.
   */
  fixed?: { step: number; order: number; history?: readonly Float64Array[] };
}

export interface NdfStepper {
  /** Time of the last accepted step. */
  readonly t: number;
  /** State at t (do not mutate outside the active window's rules). */
  readonly y: Float64Array;
  /** Time of the step before (the dense output covers [tOld, t]). */
  readonly tOld: number;
  /** Current order and step size (the next step's). */
  readonly order: number;
  readonly stepSize: number;
  readonly window: ActiveWindow;
  /**
   * Takes one accepted step towards tBound, never past it. Returns false when the step size fell below
   * round-off level (the run cannot continue: report it).
   */
  step(tBound: number): boolean;
  /** Dense output: the interpolating polynomial of the last step at tq ∈ [tOld, t], into out[lo…hi). */
  interpolate(tq: number, out: Float64Array): Float64Array;
  /** Dense output of one component i at tq ∈ [tOld, t] (the same polynomial as {@link interpolate}). */
  interpolateAt(tq: number, i: number): number;
  /** Moves the active window (components entering must hold their frozen value in y). */
  setWindow(lo: number, hi: number): void;
  readonly counters: StepperCounters;
}

/**
 * Makes an NDF stepper for `system` starting at (t0, y0).
 *
 * Longer than 80 lines on purpose: one closure owns the difference table, the Newton matrix and its
 * factorisation, the weights and the counters that every inner function (start, Newton, step, step-size
 * change, dense output) reads and updates; as separate modules they would pass a dozen typed arrays and
 * the mutable step state back and forth on every step.
 * @throws RangeError for tolerances or orders out of range
 */
export function makeNdfStepper(
  system: StiffSystem,
  t0: number,
  y0: Float64Array,
  options: NdfOptions,
  window: ActiveWindow = { lo: 0, hi: system.size },
): NdfStepper {
  const N = system.size;
  const { rtol, atol } = options;
  if (!(rtol > 0) || !(atol > 0)) throw new RangeError(`rtol and atol must be > 0 (got ${rtol}, ${atol})`);
  const maxStep = options.maxStep ?? Infinity;
  const maxOrder = options.maxOrder ?? MAX_ORDER;
  if (!(maxOrder >= 1 && maxOrder <= MAX_ORDER)) throw new RangeError(`maxOrder must be 1…5 (got ${maxOrder})`);
  const minIncrease = options.minIncrease ?? 1.2;
  const nonNegative = options.nonNegative ?? true;
  const newtonTol = Math.max((10 * Number.EPSILON) / rtol, Math.min(0.03, Math.sqrt(rtol)));
  const win: ActiveWindow = { lo: window.lo, hi: window.hi };
  const counters: StepperCounters = { accepted: 0, rejected: 0, newtonFailures: 0, rhsEvaluations: 0, jacobianEvaluations: 0, factorisations: 0, solves: 0 };

  const D: Float64Array[] = Array.from({ length: MAX_ORDER + 3 }, () => new Float64Array(N));
  const y = Float64Array.from(y0);
  const yPredict = new Float64Array(N);
  const yNew = new Float64Array(N);
  const psi = new Float64Array(N);
  const dSum = new Float64Array(N);
  const f = new Float64Array(N);
  const dy = new Float64Array(N);
  /** Error weights 1/(atol + rtol |y|). */
  const scale = new Float64Array(N);
  // Step-change matrices (order + 1 ≤ 6 square), scratch for the table update.
  const RU = new Float64Array(36);
  const Rm = new Float64Array(36);
  const Um = new Float64Array(36);
  const tmpRows: Float64Array[] = Array.from({ length: MAX_ORDER + 1 }, () => new Float64Array(N));

  let t = t0;
  let tOld = t0;
  let order = 1;
  let nEqualSteps = 0;
  let factoredC = NaN; // c of the kept factorisation, NaN when none
  let jacobianFresh = false;

  /** RMS norm of v weighted by wt = 1/(atol + rtol |y|). */
  function rms(v: Float64Array, wt: Float64Array): number {
    let s = 0;
    for (let i = win.lo; i < win.hi; i++) {
      const e = v[i] * wt[i];
      if (e > NORM_FLOOR || e < -NORM_FLOOR) s += e * e;
    }
    // Divided by the full size: frozen components contribute no error, so the norm does not depend on the window.
    return Math.sqrt(s / N);
  }

  /** R(order, factor) of Shampine (1994): cumulative products of M[i][j] = (i − 1 − factor·j)/i. */
  function computeR(k: number, factor: number, out: Float64Array): void {
    const w = k + 1;
    for (let j = 0; j < w; j++) out[j] = 1;
    for (let i = 1; i < w; i++) {
      out[i * w] = 0;
      for (let j = 1; j < w; j++) out[i * w + j] = out[(i - 1) * w + j] * ((i - 1 - factor * j) / i);
    }
  }

  /** Re-expresses D[0…k] for a step multiplied by `factor`: D ← (R U)ᵀ D. */
  function changeD(k: number, factor: number): void {
    const w = k + 1;
    computeR(k, factor, Rm);
    computeR(k, 1, Um);
    for (let i = 0; i < w; i++)
      for (let j = 0; j < w; j++) {
        let s = 0;
        for (let l = 0; l < w; l++) s += Rm[i * w + l] * Um[l * w + j];
        RU[i * w + j] = s;
      }
    const { lo, hi } = win;
    for (let j = 0; j < w; j++) {
      const out = tmpRows[j];
      for (let q = lo; q < hi; q++) out[q] = 0;
      for (let i = 0; i < w; i++) {
        const c = RU[i * w + j];
        if (c === 0) continue;
        const Di = D[i];
        for (let q = lo; q < hi; q++) out[q] += c * Di[q];
      }
    }
    for (let j = 0; j < w; j++) D[j].set(tmpRows[j].subarray(lo, hi), lo);
  }

  function selectInitialStep(tBound: number): number {
    const { lo, hi } = win;
    system.rhs(t, y, f, lo, hi);
    counters.rhsEvaluations++;
    for (let i = lo; i < hi; i++) scale[i] = 1 / (atol + rtol * Math.abs(y[i]));
    const d0 = rms(y, scale);
    const d1 = rms(f, scale);
    const h0 = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : (0.01 * d0) / d1;
    for (let i = lo; i < hi; i++) yNew[i] = y[i] + h0 * f[i];
    system.rhs(t + h0, yNew, dy, lo, hi);
    counters.rhsEvaluations++;
    for (let i = lo; i < hi; i++) dy[i] -= f[i];
    const d2 = rms(dy, scale) / h0;
    const h1 = d1 <= 1e-15 && d2 <= 1e-15 ? Math.max(1e-6, h0 * 1e-3) : (0.01 / Math.max(d1, d2)) ** 0.5;
    return Math.min(100 * h0, h1, maxStep, tBound - t);
  }

  let hAbs = NaN;
  let started = false;
  const fixed = options.fixed;
  if (fixed && !(fixed.step > 0 && fixed.order >= 1 && fixed.order <= MAX_ORDER)) throw new RangeError('fixed controller needs step > 0 and order 1…5');

  function start(tBound: number): void {
    hAbs = fixed ? fixed.step : options.firstStep ?? selectInitialStep(tBound);
    const { lo, hi } = win;
    D[0].set(y);
    if (fixed?.history) {
      // Backward differences ∇ʲ y_0 of the given history y(t0 − j h).
      order = fixed.order;
      if (fixed.history.length < order + 1) throw new RangeError(`fixed.history needs ${order + 1} states`);
      // Backward-difference table in place: after pass j, level[j] = ∇ʲ y at the newest point.
      const level = fixed.history.slice(0, order + 1).map((v) => Float64Array.from(v));
      for (let j = 1; j <= order; j++) {
        for (let k = order; k >= j; k--) for (let i = lo; i < hi; i++) level[k][i] = level[k - 1][i] - level[k][i];
        D[j].set(level[j]);
      }
    } else {
      system.rhs(t, y, f, lo, hi);
      counters.rhsEvaluations++;
      for (let i = lo; i < hi; i++) D[1][i] = f[i] * hAbs;
    }
    system.jacobian(t, y, lo, hi);
    counters.jacobianEvaluations++;
    jacobianFresh = true;
    started = true;
  }

  /** Simplified Newton iteration; returns the iterations used, or −1 when it did not converge. */
  function newton(tNew: number, c: number): number {
    const { lo, hi } = win;
    for (let i = lo; i < hi; i++) {
      yNew[i] = yPredict[i];
      dSum[i] = 0;
    }
    let dyNormOld = NaN;
    for (let k = 0; k < NEWTON_MAXITER; k++) {
      system.rhs(tNew, yNew, f, lo, hi);
      counters.rhsEvaluations++;
      let finite = true;
      for (let i = lo; i < hi; i++) {
        const r = c * f[i] - psi[i] - dSum[i];
        if (!Number.isFinite(r)) finite = false;
        dy[i] = r;
      }
      if (!finite) return -1;
      system.solve(dy, lo, hi);
      counters.solves++;
      // The update is applied before the convergence test (one pass): on divergence the caller discards yNew.
      let sq = 0;
      for (let i = lo; i < hi; i++) {
        const v = dy[i];
        const e = v * scale[i];
        if (e > NORM_FLOOR || e < -NORM_FLOOR) sq += e * e;
        yNew[i] += v;
        dSum[i] += v;
      }
      const dyNorm = Math.sqrt(sq / N);
      const rate = Number.isNaN(dyNormOld) ? NaN : dyNorm / dyNormOld;
      if (!Number.isNaN(rate) && (rate >= 1 || (rate ** (NEWTON_MAXITER - k) / (1 - rate)) * dyNorm > newtonTol)) return -1;
      if (dyNorm === 0 || (!Number.isNaN(rate) && (rate / (1 - rate)) * dyNorm < newtonTol)) return k + 1;
      dyNormOld = dyNorm;
    }
    return -1;
  }

  /**
   * One accepted step (retrying rejected ones) of the current order, then the order and the next step.
   * Longer than 80 lines on purpose: it is the algorithm of Shampine & Reichelt (1997) §2 read top to
   * bottom (step-size limit, predictor, Newton with Jacobian refresh, error test, positivity, difference
   * update, order choice), each stage using the locals of the one before.
   */
  function step(tBound: number): boolean {
    if (!started) start(tBound);
    const minStep = 10 * Math.max(Math.abs(t) * Number.EPSILON, Number.MIN_VALUE);
    if (hAbs > maxStep) {
      changeD(order, maxStep / hAbs);
      hAbs = maxStep;
      nEqualSteps = 0;
    } else if (hAbs < minStep) {
      changeD(order, minStep / hAbs);
      hAbs = minStep;
      nEqualSteps = 0;
    }
    for (;;) {
      const { lo, hi } = win;
      if (hAbs < minStep) return false;
      let tNew = t + hAbs;
      // Land exactly on tBound (also when round-off would leave a sliver of a step).
      if (tNew >= tBound - 1e-9 * hAbs) {
        tNew = tBound;
        const factor = (tNew - t) / hAbs;
        if (factor !== 1) {
          changeD(order, factor);
          nEqualSteps = 0;
        }
      }
      const h = tNew - t;
      hAbs = h;
      // One fused pass over the rows D⁰…D⁵ (rows above the order enter with weight 0; they hold finite
      // values): one read of each row and one write of each result instead of a pass per row.
      {
        const a = ALPHA[order];
        const e2 = order >= 2 ? 1 : 0;
        const e3 = order >= 3 ? 1 : 0;
        const e4 = order >= 4 ? 1 : 0;
        const e5 = order >= 5 ? 1 : 0;
        const g1 = GAMMA[1] / a;
        const g2 = (e2 * GAMMA[2]) / a;
        const g3 = (e3 * GAMMA[3]) / a;
        const g4 = (e4 * GAMMA[4]) / a;
        const g5 = (e5 * GAMMA[5]) / a;
        const D0 = D[0];
        const D1 = D[1];
        const D2 = D[2];
        const D3 = D[3];
        const D4 = D[4];
        const D5 = D[5];
        for (let i = lo; i < hi; i++) {
          const v1 = D1[i];
          const v2 = D2[i];
          const v3 = D3[i];
          const v4 = D4[i];
          const v5 = D5[i];
          const yp = D0[i] + v1 + e2 * v2 + e3 * v3 + e4 * v4 + e5 * v5;
          yPredict[i] = yp;
          psi[i] = g1 * v1 + g2 * v2 + g3 * v3 + g4 * v4 + g5 * v5;
          scale[i] = 1 / (atol + rtol * Math.abs(yp));
        }
      }
      const c = h / ALPHA[order];
      let iterations = -1;
      for (;;) {
        if (c !== factoredC) {
          if (!system.factor(c, lo, hi)) {
            factoredC = NaN;
            break;
          }
          counters.factorisations++;
          factoredC = c;
        }
        iterations = newton(tNew, c);
        if (iterations > 0 || jacobianFresh) break;
        counters.newtonFailures++;
        system.jacobian(tNew, yPredict, lo, hi);
        counters.jacobianEvaluations++;
        jacobianFresh = true;
        factoredC = NaN;
      }
      if (iterations < 0) {
        counters.newtonFailures++;
        hAbs *= 0.5;
        changeD(order, 0.5);
        nEqualSteps = 0;
        factoredC = NaN;
        continue;
      }
      const safety = (0.9 * (2 * NEWTON_MAXITER + 1)) / (2 * NEWTON_MAXITER + iterations);
      let minY = 0;
      let sq = 0;
      const ec = ERROR_CONST[order];
      for (let i = lo; i < hi; i++) {
        const v = yNew[i];
        const wt = 1 / (atol + rtol * Math.abs(v));
        scale[i] = wt;
        if (v < minY) minY = v;
        const e = ec * dSum[i] * wt;
        if (e > NORM_FLOOR || e < -NORM_FLOOR) sq += e * e;
      }
      const errorNorm = Math.sqrt(sq / N);
      if (!fixed && (errorNorm > 1 || (nonNegative && minY < -atol))) {
        const factor = errorNorm > 1 ? Math.max(MIN_FACTOR, safety * errorNorm ** (-1 / (order + 1))) : 0.5;
        hAbs *= factor;
        changeD(order, factor);
        nEqualSteps = 0;
        counters.rejected++;
        continue;
      }
      if (nonNegative && minY < 0)
        for (let i = lo; i < hi; i++)
          if (yNew[i] < 0) {
            dSum[i] -= yNew[i];
            yNew[i] = 0;
          }
      // Accepted.
      counters.accepted++;
      nEqualSteps++;
      tOld = t;
      t = tNew;
      jacobianFresh = false;
      // D^{j+1} y_n = D^j y_n − D^j y_{n−1}; d = D^{k+1} y_{n+1}.
      const Dk1 = D[order + 1];
      const Dk2 = D[order + 2];
      const D0 = D[0];
      // Differences below TINY are flushed to 0: far ahead of a front they would decay into subnormal
      // numbers, whose arithmetic is tens of times slower (measured 12× on a whole bench run).
      for (let i = lo; i < hi; i++) {
        let d = dSum[i];
        if (d < TINY && d > -TINY) d = 0;
        let d2 = d - Dk1[i];
        if (d2 < TINY && d2 > -TINY) d2 = 0;
        Dk2[i] = d2;
        Dk1[i] = d;
        // D⁰ after the update is Σ_{j ≤ k+1} Dʲ = y⁽⁰⁾ + d = y_{n+1}: set it directly.
        let v = yNew[i];
        if (v < TINY && v > -TINY) v = 0;
        y[i] = v;
        D0[i] = v;
      }
      // Dʲ += Dʲ⁺¹ from j = order down to 1, fused into one pass with a running sum.
      {
        switch (order) {
          case 1:
            accumulate1(D[1], D[2], lo, hi);
            break;
          case 2:
            accumulate2(D[1], D[2], D[3], lo, hi);
            break;
          case 3:
            accumulate3(D[1], D[2], D[3], D[4], lo, hi);
            break;
          case 4:
            accumulate4(D[1], D[2], D[3], D[4], D[5], lo, hi);
            break;
          default:
            accumulate5(D[1], D[2], D[3], D[4], D[5], D[6], lo, hi);
        }
      }
      if (nEqualSteps < order + 1) return true;
      if (fixed) {
        if (order < fixed.order) {
          order++;
          nEqualSteps = 0;
          factoredC = NaN;
        }
        return true;
      }
      const errM = order > 1 ? normOf(D[order], ERROR_CONST[order - 1]) : Infinity;
      const errP = order < maxOrder ? normOf(D[order + 2], ERROR_CONST[order + 1]) : Infinity;
      const fM = errM ** (-1 / order);
      const f0 = errorNorm ** (-1 / (order + 1));
      const fP = errP ** (-1 / (order + 2));
      let best = f0;
      let delta = 0;
      if (fM > best) {
        best = fM;
        delta = -1;
      }
      if (fP > best) {
        best = fP;
        delta = 1;
      }
      const factor = Math.min(MAX_FACTOR, safety * best);
      if (delta === 0 && factor >= 1 && factor < minIncrease) return true;
      order += delta;
      hAbs *= factor;
      changeD(order, factor);
      nEqualSteps = 0;
      factoredC = NaN;
      return true;
    }
  }

  function normOf(v: Float64Array, k: number): number {
    let s = 0;
    for (let i = win.lo; i < win.hi; i++) {
      const e = k * v[i] * scale[i];
      if (e > NORM_FLOOR || e < -NORM_FLOOR) s += e * e;
    }
    return Math.sqrt(s / N);
  }

  return {
    get t() {
      return t;
    },
    get tOld() {
      return tOld;
    },
    get y() {
      return y;
    },
    get order() {
      return order;
    },
    get stepSize() {
      return hAbs;
    },
    get window() {
      return win;
    },
    counters,
    step,
    interpolate(tq, out) {
      const { lo, hi } = win;
      // p_j = Π_{i<j} (tq − (t − i h)) / ((i + 1) h): Newton form on the equally spaced history grid;
      // one fused pass (weights above the order are 0).
      const p = [0, 0, 0, 0, 0, 0];
      let q = 1;
      for (let j = 1; j <= order; j++) {
        q *= (tq - (t - (j - 1) * hAbs)) / (j * hAbs);
        p[j] = q;
      }
      const [, p1, p2, p3, p4, p5] = p;
      const D0 = D[0];
      const D1 = D[1];
      const D2 = D[2];
      const D3 = D[3];
      const D4 = D[4];
      const D5 = D[5];
      for (let i = lo; i < hi; i++) out[i] = D0[i] + p1 * D1[i] + p2 * D2[i] + p3 * D3[i] + p4 * D4[i] + p5 * D5[i];
      return out;
    },
    interpolateAt(tq, i) {
      let v = D[0][i];
      let q = 1;
      for (let j = 1; j <= order; j++) {
        q *= (tq - (t - (j - 1) * hAbs)) / (j * hAbs);
        v += q * D[j][i];
      }
      return v;
    },
    setWindow(lo, hi) {
      if (!(lo >= 0 && hi <= N && lo < hi)) throw new RangeError(`window ${lo}…${hi} outside 0…${N}`);
      // Components leaving the window freeze at their current value: zero their differences.
      for (let i = win.lo; i < win.hi; i++)
        if (i < lo || i >= hi) for (let j = 1; j < D.length; j++) D[j][i] = 0;
      if (started) for (let i = lo; i < hi; i++) if (i < win.lo || i >= win.hi) D[0][i] = y[i];
      win.lo = lo;
      win.hi = hi;
      factoredC = NaN;
      // The kept Jacobian does not cover the new components: refresh it.
      if (started) {
        system.jacobian(t, y, lo, hi);
        counters.jacobianEvaluations++;
        jacobianFresh = true;
      }
    },
  };
}

/** Dʲ += Dʲ⁺¹ for j = 1 … 1 (order 1) in one pass, flushing tiny values. */
function accumulate1(D1: Float64Array, D2: Float64Array, lo: number, hi: number): void {
  for (let i = lo; i < hi; i++) {
    let acc = D2[i];
    acc += D1[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D1[i] = acc;
  }
}

/** Dʲ += Dʲ⁺¹ for j = 2 … 1 (order 2) in one pass, flushing tiny values. */
function accumulate2(D1: Float64Array, D2: Float64Array, D3: Float64Array, lo: number, hi: number): void {
  for (let i = lo; i < hi; i++) {
    let acc = D3[i];
    acc += D2[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D2[i] = acc;
    acc += D1[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D1[i] = acc;
  }
}

/** Dʲ += Dʲ⁺¹ for j = 3 … 1 (order 3) in one pass, flushing tiny values. */
function accumulate3(D1: Float64Array, D2: Float64Array, D3: Float64Array, D4: Float64Array, lo: number, hi: number): void {
  for (let i = lo; i < hi; i++) {
    let acc = D4[i];
    acc += D3[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D3[i] = acc;
    acc += D2[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D2[i] = acc;
    acc += D1[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D1[i] = acc;
  }
}

/** Dʲ += Dʲ⁺¹ for j = 4 … 1 (order 4) in one pass, flushing tiny values. */
function accumulate4(D1: Float64Array, D2: Float64Array, D3: Float64Array, D4: Float64Array, D5: Float64Array, lo: number, hi: number): void {
  for (let i = lo; i < hi; i++) {
    let acc = D5[i];
    acc += D4[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D4[i] = acc;
    acc += D3[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D3[i] = acc;
    acc += D2[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D2[i] = acc;
    acc += D1[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D1[i] = acc;
  }
}

/** Dʲ += Dʲ⁺¹ for j = 5 … 1 (order 5) in one pass, flushing tiny values. */
function accumulate5(D1: Float64Array, D2: Float64Array, D3: Float64Array, D4: Float64Array, D5: Float64Array, D6: Float64Array, lo: number, hi: number): void {
  for (let i = lo; i < hi; i++) {
    let acc = D6[i];
    acc += D5[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D5[i] = acc;
    acc += D4[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D4[i] = acc;
    acc += D3[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D3[i] = acc;
    acc += D2[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D2[i] = acc;
    acc += D1[i];
    if (acc < TINY && acc > -TINY) acc = 0;
    D1[i] = acc;
  }
}
