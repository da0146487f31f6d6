import { expect } from 'vitest';

/**
 * Asserts |actual − expected| ≤ atol + rtol·|expected| elementwise (numpy.allclose semantics).
 * vitest's toBeCloseTo is absolute-only, so float checks go through here.
 */
export function expectAllClose(
  actual: number | ArrayLike<number>,
  expected: number | ArrayLike<number>,
  { rtol = 1e-7, atol = 0 }: { rtol?: number; atol?: number } = {},
): void {
  const a = typeof actual === 'number' ? [actual] : Array.from(actual);
  const e = typeof expected === 'number' ? [expected] : Array.from(expected);
  expect(a.length, 'length').toBe(e.length);
  const bad: string[] = [];
  for (let i = 0; i < a.length; i++) {
    const tol = atol + rtol * Math.abs(e[i]);
    if (!(Math.abs(a[i] - e[i]) <= tol)) bad.push(`[${i}] ${a[i]} vs ${e[i]} (|diff| ${Math.abs(a[i] - e[i]).toExponential(3)} > ${tol.toExponential(3)})`);
  }
  expect(bad.slice(0, 10), `allClose(rtol=${rtol}, atol=${atol})`).toEqual([]);
}

/** Relative error |a − e| / |e|. */
export function relErr(a: number, e: number): number {
  return Math.abs(a - e) / Math.abs(e);
}

/**
 * Observed orders of convergence log2(e_k / e_{k+1}) for errors on grids refined by 2 each time
 * (the expected-order table habit).
 */
export function observedOrders(errors: readonly number[], ratio = 2): number[] {
  const out: number[] = [];
  for (let k = 0; k + 1 < errors.length; k++) out.push(Math.log(errors[k] / errors[k + 1]) / Math.log(ratio));
  return out;
}

/** Prints an order table (visible in test output) and returns it. */
export function orderTable(label: string, hs: readonly number[], errors: readonly number[]): string {
  const orders = observedOrders(errors, hs[0] / hs[1]);
  const lines = [`${label}`, '   h            error        order'];
  hs.forEach((h, k) => lines.push(`   ${h.toExponential(3)}   ${errors[k].toExponential(3)}   ${k === 0 ? '   –' : orders[k - 1].toFixed(2)}`));
  const table = lines.join('\n');
  console.log(table);
  return table;
}
