/**
 * Parameter ranges of the survey fit: the movement rate's 90 % range from the profile likelihoods (a mixture
 * over the grid of the other fitted parameters, each grid point weighted by its fit), the grid parameters'
 * ranges from their deviance profiles, and the distributions a fitted range is adopted as.
 */
import type { Scenario } from '../../model/scenario.ts';
import { FIELDS, type FieldSpec } from '../../model/fields.ts';
import type { Distribution, Quantity } from '../../model/quantity.ts';
import type { GridParameter, ModelFitOutcome } from './model-fit.ts';
import { CHI2_1_90, Z90, normalCdf } from './statistics.ts';

/** One fitted (or considered) parameter. */
export interface FittedParameter {
  path: string;
  label: string;
  unit: string;
  /** The scenario's value or distribution before the fit. */
  prior: Quantity;
  /** Best value (null when not fitted). */
  estimate: number | null;
  /** 90 % range (null when not identifiable). */
  interval90: [number, number] | null;
  identifiable: boolean;
  method: string;
  message: string;
  /** The distribution to adopt (null: keep the prior). */
  distribution: Distribution | null;
}

export const growthPath = (s: Scenario): (string | number)[] => (s.pest.growth.form === 'mate-finding' ? ['pest', 'growth', 'birthRate'] : ['pest', 'growth', 'rate']);

export function valueAtPath(root: unknown, path: readonly (string | number)[]): unknown {
  let cur = root as Record<string | number, unknown> | undefined;
  for (const p of path) cur = cur?.[p] as Record<string | number, unknown> | undefined;
  return cur;
}

export function specOf(path: readonly (string | number)[]): FieldSpec {
  const key = String(path[path.length - 1]);
  if (key === 'rate') return FIELDS.growthRate;
  return (FIELDS as Record<string, FieldSpec>)[key];
}

export const STRATA = (n: number) => Array.from({ length: n }, (_, k) => (k + 0.5) / n);

/** Lognormal whose 5 % and 95 % points are the range's ends. */
export function lognormalFor([lo, hi]: [number, number]): Distribution {
  return { dist: 'lognormal', median: sig(Math.sqrt(lo * hi)), spread: sig(Math.max(1, Math.exp(Math.log(hi / lo) / (2 * Z90)))) };
}

/** Uniform whose 5 % and 95 % points are the range's ends, kept inside (0, 1). */
export function uniformFor([lo, hi]: [number, number], spec: FieldSpec): Distribution {
  const pad = (hi - lo) / 18;
  const min = Math.max(lo - pad, spec.min + 1e-3);
  const max = Math.min(hi + pad, spec.max - 1e-3);
  return { dist: 'uniform', min: sig(min), max: sig(max) };
}

function sig(x: number): number {
  return Number(x.toPrecision(4));
}

/**
 * Quantile of a mixture of split-normal distributions in ln D (one per grid point, weights w), found by
 * bisection on the mixture's distribution function.
 */
function mixtureQuantile(parts: { w: number; mu: number; sLo: number; sHi: number }[], p: number): number {
  const cdf = (x: number) =>
    parts.reduce((a, c) => {
      // Split normal with the mode at mu: mass ½ on each side.
      const z = x < c.mu ? 0.5 * 2 * normalCdf((x - c.mu) / c.sLo) : 0.5 + 0.5 * (2 * normalCdf((x - c.mu) / c.sHi) - 1);
      return a + c.w * z;
    }, 0);
  let lo = Math.min(...parts.map((c) => c.mu - 10 * c.sLo));
  let hi = Math.max(...parts.map((c) => c.mu + 10 * c.sHi));
  for (let it = 0; it < 100; it++) {
    const m = 0.5 * (lo + hi);
    if (cdf(m) < p) lo = m;
    else hi = m;
  }
  return 0.5 * (lo + hi);
}

export function summariseParameters(scenario: Scenario, outcome: ModelFitOutcome, grid: GridParameter[], messages: string[]): FittedParameter[] {
  const profiles = outcome.profiles;
  const top = Math.max(...profiles.map((p) => p.best.logLik));
  const out: FittedParameter[] = [];
  // Movement rate: mixture over the grid points, weighted by likelihood (equal prior mass per point).
  const weights = profiles.map((p) => Math.exp(p.best.logLik - top));
  const wsum = weights.reduce((a, b) => a + b, 0);
  const parts = profiles.map((p, i) => ({
    w: weights[i] / wsum,
    mu: Math.log(p.best.diffusion),
    sLo: Math.max(1e-6, (Math.log(p.best.diffusion) - Math.log(p.interval90[0])) / Z90),
    sHi: Math.max(1e-6, (Math.log(p.interval90[1]) - Math.log(p.best.diffusion)) / Z90),
  }));
  const open = profiles.some((p, i) => weights[i] / wsum > 0.05 && (p.lowerOpen || p.upperOpen));
  const dPath = ['pest', 'diffusionHost'];
  const bestProfile = profiles[weights.indexOf(Math.max(...weights))];
  const searched = profiles.flatMap((p) => p.evaluations.map((e) => e.diffusion));
  const range: [number, number] = [Math.exp(mixtureQuantile(parts, 0.05)), Math.exp(mixtureQuantile(parts, 0.95))];
  const dSpec = FIELDS.diffusionHost;
  const carried = grid.length ? ` (the ${joinWords(grid.map((g) => specOf(g.path).label.toLowerCase()))} range${grid.length > 1 ? 's' : ''} carried through, each grid point weighted by its fit)` : '';
  out.push({
    path: 'pest.diffusionHost',
    label: dSpec.label,
    unit: dSpec.unit,
    prior: valueAtPath(scenario, dPath) as Quantity,
    estimate: bestProfile.best.diffusion,
    interval90: open ? null : range,
    identifiable: !open,
    method: `profile likelihood of the full model (binomial detections; start year and detection chance profiled out)${carried}`,
    message: open
      ? `not identifiable from these records: they do not bound it towards ${bestProfile.lowerOpen ? 'small' : 'large'} values (searched ${fmt(Math.min(...searched))}–${fmt(Math.max(...searched))} ${dSpec.unit}); the entered range is kept`
      : `${fmt(bestProfile.best.diffusion)} ${dSpec.unit}, 90 % range ${fmt(range[0])}–${fmt(range[1])}`,
    distribution: open ? null : lognormalFor(range),
  });
  // Grid parameters: deviance across their grid (max over the other parameters), interpolated.
  grid.forEach((g, i) => {
    const spec = specOf(g.path);
    const prof = g.values.map((v) => Math.max(...profiles.filter((p) => p.gridValues[i] === v).map((p) => p.best.logLik)));
    const dev = prof.map((l) => 2 * (top - l));
    const k = dev.indexOf(Math.min(...dev));
    const leftClosed = dev.slice(0, k).some((d) => d > CHI2_1_90);
    const rightClosed = dev.slice(k + 1).some((d) => d > CHI2_1_90);
    const cross = (from: number, step: -1 | 1): number => {
      let j = from;
      while (dev[j + step] <= CHI2_1_90) j += step;
      const a = dev[j];
      const b = dev[j + step];
      return g.values[j] + ((CHI2_1_90 - a) / (b - a)) * (g.values[j + step] - g.values[j]);
    };
    const identifiable = leftClosed && rightClosed;
    const interval: [number, number] | null = identifiable ? [cross(k, -1), cross(k, 1)] : null;
    const prior = valueAtPath(scenario, g.path) as Quantity;
    if (!identifiable) messages.push(`${spec.label} is not identifiable from these records: the fit is about equally good across its range (${fmt(g.values[0])}–${fmt(g.values[g.values.length - 1])}${spec.unit ? ` ${spec.unit}` : ''}); its entered range is kept and carried into the movement rate's range.`);
    out.push({
      path: g.path.join('.'),
      label: spec.label,
      unit: spec.unit,
      prior,
      estimate: g.values[k],
      interval90: interval,
      identifiable,
      method: `profile over ${g.values.length} points of the entered range (its quantiles ${STRATA(g.values.length).map((u) => Math.round(u * 100)).join(', ')} %), linear between points: a coarse range`,
      message: identifiable ? `${fmt(g.values[k])}${spec.unit ? ` ${spec.unit}` : ''}, 90 % range ${fmt(interval![0])}–${fmt(interval![1])}` : 'not identifiable: flat profile across the entered range; entered range kept',
      distribution: identifiable ? (spec.max <= 1 ? uniformFor(interval!, spec) : lognormalFor(interval!)) : null,
    });
  });
  return out;
}

export function joinWords(w: string[]): string {
  return w.length <= 1 ? (w[0] ?? '') : `${w.slice(0, -1).join(', ')} and ${w[w.length - 1]}`;
}

export function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

export function fmt(x: number): string {
  return Math.abs(x) >= 100 ? x.toFixed(0) : Number(x.toPrecision(3)).toString();
}
