/**
 * Golden-section search for the minimum of a unimodal function on [a, b].
 *
 * @remarks Keeps the interior points at the golden ratio so one new evaluation per iteration shrinks the
 * bracket by 0.618 (Kiefer 1953; e.g. Press et al., Numerical Recipes, §10.2).
 * @param f - function to minimise
 * @param a - left end of the bracket
 * @param b - right end of the bracket
 * @param absTol - stop when the bracket is narrower than this
 * @param maxIterations - bound on iterations
 * @returns the better interior point and its value
 */
export function goldenSectionMin(
  f: (x: number) => number,
  a: number,
  b: number,
  absTol: number,
  maxIterations = 100,
): { x: number; value: number } {
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a);
  let d = a + g * (b - a);
  let fc = f(c);
  let fd = f(d);
  for (let it = 0; it < maxIterations && b - a > absTol; it++) {
    if (fc < fd) {
      b = d;
      d = c;
      fd = fc;
      c = b - g * (b - a);
      fc = f(c);
    } else {
      a = c;
      c = d;
      fc = fd;
      d = a + g * (b - a);
      fd = f(d);
    }
  }
  return fc < fd ? { x: c, value: fc } : { x: d, value: fd };
}
