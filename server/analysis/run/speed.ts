/** Means and centred sums of squares and products of two equally long series. */
export function centredMoments(a: ArrayLike<number>, b: ArrayLike<number>): { meanA: number; meanB: number; saa: number; sab: number; sbb: number } {
  const n = a.length;
  let sa = 0;
  let sb = 0;
  for (let i = 0; i < n; i++) {
    sa += a[i];
    sb += b[i];
  }
  const meanA = sa / n;
  const meanB = sb / n;
  let saa = 0;
  let sab = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = a[i] - meanA;
    const db = b[i] - meanB;
    saa += da * da;
    sab += da * db;
    sbb += db * db;
  }
  return { meanA, meanB, saa, sab, sbb };
}

/** Least-squares line x = slope·t + intercept with its coefficient of determination. */
export function fitLine(t: ArrayLike<number>, x: ArrayLike<number>): { slope: number; intercept: number; rSquared: number } {
  const { meanA: mt, meanB: mx, saa: stt, sab: stx, sbb: sxx } = centredMoments(t, x);
  const slope = stt > 0 ? stx / stt : NaN;
  const rSquared = sxx > 0 ? (stx * stx) / (stt * sxx) : 1;
  return { slope, intercept: mx - slope * mt, rSquared };
}

/** A measured spread rate and the window it was measured over. */
export interface SpeedFit {
  /** Speed [km/yr], positive away from the infestation. */
  kmPerYear: number;
  fromYears: number;
  toYears: number;
  samples: number;
  rSquared: number;
}

/** Fewest samples a fit may use. */
const MIN_SAMPLES = 10;

/**
 * Asymptotic spread rate of one front: a straight-line fit of position against time over the later half
 * of the period in which the front lies inside [lowKm, highKm] (away from the start and the transect end).
 *
 * @param direction - +1 for a front moving right, −1 for a front moving left (speed is reported positive outward)
 * @param logCorrectionRate - when given (the front's decay rate s* [1/km]), fits x = c t − (3/(2 s*)) ln t + b
 *   instead, the Bramson correction for pulled fronts (Bramson 1983, Mem. AMS 44(285))
 * @returns null when the front spent too few samples in the window to fit
 */
export function spreadRate(
  times: readonly number[],
  frontKm: readonly number[],
  window: { lowKm: number; highKm: number },
  direction: 1 | -1,
  logCorrectionRate?: number,
): SpeedFit | null {
  const idx: number[] = [];
  for (let i = 0; i < times.length; i++) {
    const x = frontKm[i];
    if (Number.isFinite(x) && x >= window.lowKm && x <= window.highKm && times[i] > 0) idx.push(i);
  }
  if (idx.length < 2 * MIN_SAMPLES) return null;
  const t0 = times[idx[0]];
  const t1 = times[idx[idx.length - 1]];
  const mid = 0.5 * (t0 + t1);
  const late = idx.filter((i) => times[i] >= mid);
  if (late.length < MIN_SAMPLES) return null;
  const t = late.map((i) => times[i]);
  const x = late.map((i) => {
    const corr = logCorrectionRate ? (3 / (2 * logCorrectionRate)) * Math.log(times[i]) : 0;
    return direction * frontKm[i] + corr;
  });
  const fit = fitLine(t, x);
  return { kmPerYear: fit.slope, fromYears: t[0], toYears: t[t.length - 1], samples: late.length, rSquared: fit.rSquared };
}
