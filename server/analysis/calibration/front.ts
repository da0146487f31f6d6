/**
 * The spread rate read straight from the records: the farthest detection of each survey year (the front
 * position), a straight line through those positions against the year, and its 90 % confidence interval
 * (ordinary least squares, Student's t with n − 2 degrees of freedom). Before the line is fitted, a detection
 * far ahead of the robust (Theil–Sen) front line is set aside as a possible human-carried introduction.
 */
import type { SurveyRecord } from '../../model/survey.ts';
import { leastSquaresLine, median, studentTQuantile, theilSenLine } from './statistics.ts';

export interface YearFront {
  year: number;
  /** Farthest detection this year [km along the transect]; null without a detection. */
  frontKm: number | null;
  /** Its distance beyond the starting stretch's leading edge [km] (negative inside it). */
  distanceKm: number | null;
  records: number;
  detections: number;
}

export interface FlaggedRecord {
  /** Index into the records. */
  index: number;
  /** "row 37" or "records[36]". */
  row: string;
  year: number;
  atKm: number;
  /** Distance ahead of the robust front line of that year [km]. */
  aheadKm: number;
  sentence: string;
}

export interface FrontFit {
  /** +1: the pest spreads towards larger km; −1: towards smaller km. */
  direction: 1 | -1;
  /** Leading edge of the starting stretch on the spreading side [km]. */
  edgeKm: number;
  years: YearFront[];
  flagged: FlaggedRecord[];
  /** Least-squares spread rate [km/yr] (null when fewer than three years have a detection). */
  kmPerYear: number | null;
  standardError: number | null;
  degreesOfFreedom: number;
  interval90: [number, number] | null;
  /** Front position of the line [km] in each year with a detection, and the residual (record − line) [km]. */
  residuals: { year: number; frontKm: number; fittedKm: number; residualKm: number }[];
  /** Line: distance = kmPerYear·(year − referenceYear) + interceptKm. */
  referenceYear: number;
  interceptKm: number | null;
  message: string;
}

/** A detection is "far ahead" when it lies beyond the robust front line by more than this many robust standard deviations… */
const FLAG_SCALES = 5;
/** …and by more than this many years of spread at the robust rate… */
const FLAG_YEARS_OF_SPREAD = 3;
/** …and by more than this distance [km] (common practice, no source: a few km is ordinary survey scatter). */
const FLAG_MIN_KM = 1;
/** Consistency factor of the median absolute deviation for a normal scatter. */
const MAD_TO_SD = 1.4826;

function yearFronts(records: readonly SurveyRecord[], use: readonly boolean[], direction: 1 | -1, edgeKm: number): YearFront[] {
  const byYear = new Map<number, YearFront>();
  records.forEach((r, i) => {
    if (r.atKm === undefined) return;
    let y = byYear.get(r.year);
    if (!y) byYear.set(r.year, (y = { year: r.year, frontKm: null, distanceKm: null, records: 0, detections: 0 }));
    y.records++;
    if (!r.detected || !use[i]) return;
    y.detections++;
    const d = direction * (r.atKm - edgeKm);
    if (y.distanceKm === null || d > y.distanceKm) {
      y.distanceKm = d;
      y.frontKm = r.atKm;
    }
  });
  return [...byYear.values()].sort((a, b) => a.year - b.year);
}

/** The side the pest spreads to: where most detections outside the starting stretch lie (right on a tie). */
export function spreadDirection(records: readonly SurveyRecord[], start: { fromKm: number; toKm: number }): 1 | -1 {
  let right = 0;
  let left = 0;
  for (const r of records) {
    if (!r.detected || r.atKm === undefined) continue;
    if (r.atKm > start.toKm) right++;
    else if (r.atKm < start.fromKm) left++;
  }
  return left > right ? -1 : 1;
}

/**
 * Front positions by year, the flagged introductions and the straight-line spread rate.
 * @param start - the infested stretch the spread starts from [km]
 * @param rowLabels - label of each record for messages
 * @param setAside - records already flagged (e.g. by the full model): left out and listed first
 */
export function fitFront(
  records: readonly SurveyRecord[],
  rowLabels: readonly string[],
  start: { fromKm: number; toKm: number },
  setAside: readonly FlaggedRecord[] = [],
): FrontFit {
  const direction = spreadDirection(records, start);
  const edgeKm = direction === 1 ? start.toKm : start.fromKm;
  const use = records.map(() => true);
  for (const f of setAside) use[f.index] = false;
  const flagged: FlaggedRecord[] = [...setAside];
  let years = yearFronts(records, use, direction, edgeKm);
  for (let guard = 0; guard < records.length; guard++) {
    const withDet = years.filter((y) => y.distanceKm !== null);
    if (withDet.length < 3) break;
    const t = withDet.map((y) => y.year);
    const d = withDet.map((y) => y.distanceKm as number);
    const robust = theilSenLine(t, d);
    const resid = d.map((v, k) => v - (robust.intercept + robust.slope * t[k]));
    const scale = MAD_TO_SD * median(resid.map((e) => Math.abs(e - median(resid))));
    const threshold = Math.max(FLAG_SCALES * scale, FLAG_YEARS_OF_SPREAD * Math.abs(robust.slope), FLAG_MIN_KM);
    let worst = 0;
    for (let k = 1; k < resid.length; k++) if (resid[k] > resid[worst]) worst = k;
    if (!(resid[worst] > threshold)) break;
    const yr = withDet[worst];
    const index = records.findIndex((r, i) => use[i] && r.detected && r.year === yr.year && r.atKm === yr.frontKm);
    use[index] = false;
    const ahead = resid[worst];
    const rate = Math.abs(robust.slope);
    flagged.push({
      index,
      row: rowLabels[index],
      year: yr.year,
      atKm: yr.frontKm as number,
      aheadKm: ahead,
      sentence:
        `${rowLabels[index]} (${yr.year}, ${fmt(yr.frontKm as number)} km): a detection ${fmt(ahead)} km ahead of the front line of that year` +
        (rate > 0 ? ` — about ${fmt(ahead / rate)} years of spread at ${fmt(rate)} km/yr` : '') +
        '. Natural spread cannot explain it: a possible human-carried introduction (firewood, logs, nursery stock). ' +
        'It is left out of the fit; confirm it on the ground and report it to the regulator.',
    });
    years = yearFronts(records, use, direction, edgeKm);
  }
  const withDet = years.filter((y) => y.distanceKm !== null);
  const referenceYear = withDet.length ? withDet[0].year : years[0]?.year ?? 0;
  if (withDet.length < 3) {
    return { direction, edgeKm, years, flagged, kmPerYear: null, standardError: null, degreesOfFreedom: 0, interval90: null, residuals: [], referenceYear, interceptKm: null, message: `only ${withDet.length} survey year(s) with a detection: a spread rate needs at least three` };
  }
  const t = withDet.map((y) => y.year - referenceYear);
  const d = withDet.map((y) => y.distanceKm as number);
  const ls = leastSquaresLine(t, d);
  const tq = studentTQuantile(0.95, ls.df);
  const se = Number.isFinite(ls.slopeStandardError) ? ls.slopeStandardError : 0;
  const residuals = withDet.map((y, k) => {
    const fittedDist = ls.intercept + ls.slope * t[k];
    return { year: y.year, frontKm: y.frontKm as number, fittedKm: edgeKm + direction * fittedDist, residualKm: d[k] - fittedDist };
  });
  const message =
    ls.slope > 0
      ? `front advances ${fmt(ls.slope)} km/yr (90 % interval ${fmt(ls.slope - tq * se)}–${fmt(ls.slope + tq * se)}) over ${withDet.length} survey years`
      : 'the farthest detections do not advance over the survey years: no spread rate to invert';
  return {
    direction,
    edgeKm,
    years,
    flagged,
    kmPerYear: ls.slope,
    standardError: se,
    degreesOfFreedom: ls.df,
    interval90: [ls.slope - tq * se, ls.slope + tq * se],
    residuals,
    referenceYear,
    interceptKm: ls.intercept,
    message,
  };
}

function fmt(x: number): string {
  return Math.abs(x) >= 10 ? x.toFixed(1) : x.toPrecision(2);
}
