/** Number formatting shared by the CLI summary, the web pages and the briefing (presentation only). */

import type { Distribution } from '../model/quantity.ts';

/** Fixed decimals, with a true minus sign and no "-0". */
export function fixed(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return (Number(s) === 0 ? (0).toFixed(digits) : s).replace('-', '−');
}

/** Integer with thin thousands separators, e.g. 12 345. */
export function integer(x: number): string {
  const s = Math.round(Math.abs(x)).toString().replace(/\B(?=(\d{3})+(?!\d))/g, '\u202f');
  return x < 0 && Math.round(x) !== 0 ? `−${s}` : s;
}

/** A year count to one decimal, or the given text for null. */
export function years(x: number | null | undefined, none = '—'): string {
  return x === null || x === undefined || !Number.isFinite(x) ? none : fixed(x, 1);
}

/** A position or distance in km: 2 decimals below 100 km, 1 from 100 km (fixed, so columns line up). */
export function km(x: number | null | undefined, none = '—'): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return none;
  return Math.abs(x) >= 100 ? fixed(x, 1) : fixed(x, 2);
}

/** A fraction as a percentage. */
export function percent(x: number, digits = 0): string {
  return `${fixed(100 * x, digits)} %`;
}

/** A speed in km/yr with 2 significant decimals. */
export function speed(x: number | null | undefined, none = '—'): string {
  return x === null || x === undefined || !Number.isFinite(x) ? none : `${fixed(x, x !== 0 && Math.abs(x) < 0.1 ? 3 : 2)} km/yr`;
}

/** A general number with `sig` significant digits, plain notation where sensible. */
export function num(x: number, sig = 3): string {
  if (!Number.isFinite(x)) return '—';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return Number(x.toPrecision(sig)).toString().replace('-', '−');
  return x.toExponential(sig - 1).replace('-', '−');
}

/** A distribution in words with its unit, e.g. "triangular 0.2–0.9, most likely 0.5 km²/yr". */
export function distributionText(d: Distribution, unit = ''): string {
  const u = unit ? ` ${unit}` : '';
  switch (d.dist) {
    case 'uniform':
      return `uniform ${num(d.min, 4)}–${num(d.max, 4)}${u}`;
    case 'triangular':
      return `triangular ${num(d.min, 4)}–${num(d.max, 4)}, most likely ${num(d.mode, 4)}${u}`;
    case 'lognormal':
      return `log-normal, median ${num(d.median, 4)}${u}, spread ×${num(d.spread, 3)}`;
  }
}

/**
 * A probability estimated from draws: "62.5 % ± 1.5 %" (one standard error); when every draw agreed (standard
 * error 0) the 95 % Wilson interval instead, "100 % (95 % interval 75.8–100 %)", since ± 0 would overstate
 * what a finite ensemble shows.
 */
export function probabilityEstimate(
  e: { p: number; standardError: number; interval95?: [number, number] } | null | undefined,
  digits = 1,
): string {
  if (!e || !Number.isFinite(e.p)) return '—';
  const [lo, hi] = e.interval95 ?? [NaN, NaN];
  if (!(e.standardError > 0) && Number.isFinite(lo) && Number.isFinite(hi) && hi - lo > 0) {
    return `${percent(e.p, digits)} (95 % interval ${fixed(100 * lo, 1)}–${fixed(100 * hi, 1)} %)`;
  }
  return Number.isFinite(e.standardError) ? `${percent(e.p, digits)} ± ${percent(e.standardError, 1)}` : percent(e.p, digits);
}
