import { describe, expect, it } from 'vitest';
import { makeRng } from '../../server/numerics/rng.ts';
import { partialRankCorrelation, rankTransform, tCritical95 } from '../../server/analysis/sensitivity/sensitivity.ts';
import { expectAllClose } from '../helpers/close.ts';
import { hasPythonScipy, runPython } from '../helpers/python.ts';

const python = hasPythonScipy();
if (!python) console.warn('SKIPPED: python3 with scipy not found; the PRCC cross-check against numpy/scipy is skipped');

/** Draws: y = 3 x0 − x1 + 0.2 x2 + noise, x3 irrelevant; y censored (+∞) above a cut to mimic "beyond the horizon". */
function sample(n: number) {
  const r = makeRng(17).child(0);
  const cols = [0, 1, 2, 3].map(() => new Float64Array(n));
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (const c of cols) c[i] = r.next();
    y[i] = 3 * cols[0][i] - cols[1][i] + 0.2 * cols[2][i] + 0.3 * (r.next() - 0.5);
    if (y[i] > 2.6) y[i] = Infinity;
  }
  return { cols, y };
}

describe('partial rank correlation (Blower & Dowlatabadi 1994; Marino et al. 2008)', () => {
  it('ranks with ties share the mean rank and +∞ sorts last', () => {
    expect(Array.from(rankTransform([3, 1, Infinity, 3, 2, Infinity]))).toEqual([3.5, 1, 5.5, 3.5, 2, 5.5]);
  });

  it.skipIf(!python)('agrees with the residual definition computed by numpy/scipy (rankdata, lstsq, pearsonr)', () => {
    const { cols, y } = sample(300);
    const ours = partialRankCorrelation(cols, y);
    // Independent route: regress rank(x_j) and rank(y) on the other ranks (with intercept), correlate residuals.
    const ref = runPython<number[]>(
      `
import json, sys, numpy as np
from scipy.stats import rankdata, pearsonr
d = json.load(sys.stdin)
X = np.array(d['cols']).T
y = np.array([np.inf if v is None else v for v in d['y']])
R = np.column_stack([rankdata(X[:, j]) for j in range(X.shape[1])])
ry = rankdata(y)
out = []
for j in range(R.shape[1]):
    Z = np.column_stack([np.ones(len(ry)), np.delete(R, j, axis=1)])
    ex = R[:, j] - Z @ np.linalg.lstsq(Z, R[:, j], rcond=None)[0]
    ey = ry - Z @ np.linalg.lstsq(Z, ry, rcond=None)[0]
    out.append(pearsonr(ex, ey)[0])
print(json.dumps(out))
`,
      { cols: cols.map((c) => Array.from(c)), y: Array.from(y, (v) => (Number.isFinite(v) ? v : null)) },
    );
    // Two exact algebraic routes to the same number: agreement to round-off.
    expectAllClose(ours!.prcc, ref, { rtol: 1e-9, atol: 1e-12 });
  });

  it('ranks the driving parameters first, with the right signs, and finds the irrelevant one insignificant', () => {
    const { cols, y } = sample(400);
    const r = partialRankCorrelation(cols, y)!;
    expect(r.prcc[0]).toBeGreaterThan(0.9);
    expect(r.prcc[1]).toBeLessThan(-0.5);
    expect(Math.abs(r.prcc[0])).toBeGreaterThan(Math.abs(r.prcc[1]));
    expect(Math.abs(r.prcc[1])).toBeGreaterThan(Math.abs(r.prcc[2]));
    expect(r.significant.slice(0, 2)).toEqual([true, true]);
    expect(r.significant[3]).toBe(false);
  });

  it('returns null when the outcome does not vary, and 0 for a parameter that does not vary', () => {
    expect(partialRankCorrelation([[1, 2, 3, 4, 5, 6]], [1, 1, 1, 1, 1, 1])).toBeNull();
    const r = partialRankCorrelation([[1, 2, 3, 4, 5, 6, 7], [2, 2, 2, 2, 2, 2, 2]], [1, 3, 2, 5, 4, 7, 6])!;
    expect(r.prcc[1]).toBe(0);
  });

  it('t critical values are close to the tables (Student t, two-sided 5 %)', () => {
    // Tables (e.g. Abramowitz & Stegun 26.10): df 10 → 2.228, df 30 → 2.042, df 1000 → 1.962.
    expectAllClose([tCritical95(10), tCritical95(30), tCritical95(1000)], [2.228, 2.042, 1.962], { rtol: 3e-3 });
  });
});
