import { z } from 'zod';
import { describeRange, type FieldSpec } from './fields.ts';

/**
 * A physical number: a plain value, or (where the field allows it) a distribution describing what is
 * known about it. Single runs use the central value; ensembles draw from the distribution.
 */

/** zod schema for a plain number in the field's allowed range; messages state the range. */
export function valueSchema(spec: FieldSpec) {
  const range = `must be ${describeRange(spec)}`;
  let s = z.number({ error: `${range} (a number)` });
  s = spec.minExclusive ? s.gt(spec.min, { error: range }) : s.gte(spec.min, { error: range });
  if (Number.isFinite(spec.max)) {
    s = spec.maxExclusive ? s.lt(spec.max, { error: range }) : s.lte(spec.max, { error: range });
  }
  return s;
}

export const DISTRIBUTION_KINDS = ['uniform', 'triangular', 'lognormal'] as const;

function distributionSchema(spec: FieldSpec) {
  const v = valueSchema(spec);
  const boundedAbove = Number.isFinite(spec.max);
  return z
    .discriminatedUnion('dist', [
      z.strictObject({ dist: z.literal('uniform'), min: v, max: v }),
      z.strictObject({ dist: z.literal('triangular'), min: v, mode: v, max: v }),
      z.strictObject({
        dist: z.literal('lognormal'),
        median: v,
        /** Geometric spread factor: about 68 % of draws fall within [median/spread, median×spread]. */
        spread: z
          .number({ error: 'must be ≥ 1 (a number: the geometric spread factor)' })
          .gte(1, { error: 'must be ≥ 1 (geometric spread factor)' })
          .lte(100, { error: 'must be ≤ 100 (geometric spread factor)' }),
      }),
    ])
    .superRefine((d, ctx) => {
      if (d.dist === 'lognormal') {
        if (spec.min < 0 || (boundedAbove && spec.max <= 1)) {
          ctx.addIssue({
            code: 'custom',
            path: ['dist'],
            input: d.dist,
            message: `lognormal is not allowed for a field with range ${describeRange(spec)}; use uniform or triangular`,
          });
        }
        return;
      }
      if (!(d.min < d.max)) {
        ctx.addIssue({ code: 'custom', path: ['max'], input: d.max, message: `must be greater than min (${d.min})` });
      }
      if (d.dist === 'triangular' && !(d.mode >= d.min && d.mode <= d.max)) {
        ctx.addIssue({
          code: 'custom',
          path: ['mode'],
          input: d.mode,
          message: `must lie between min (${d.min}) and max (${d.max})`,
        });
      }
    });
}

/** A field that may be a number or a distribution. */
export function quantitySchema(spec: FieldSpec) {
  return z.union([valueSchema(spec), distributionSchema(spec)]);
}

export type Distribution =
  | { dist: 'uniform'; min: number; max: number }
  | { dist: 'triangular'; min: number; mode: number; max: number }
  | { dist: 'lognormal'; median: number; spread: number };

export type Quantity = number | Distribution;

/** Replaces every distribution in T by number (the shape of a scenario ready to run). */
export type Resolved<T> = T extends number | Distribution
  ? number
  : T extends readonly (infer A)[]
    ? Resolved<A>[]
    : T extends object
      ? { [K in keyof T]: Resolved<T[K]> }
      : T;

export function isDistribution(x: unknown): x is Distribution {
  return typeof x === 'object' && x !== null && 'dist' in x && typeof (x as { dist: unknown }).dist === 'string';
}

/** Central value used for single runs: uniform → midpoint, triangular → mode, lognormal → median. */
export function centralValue(q: Quantity): number {
  if (typeof q === 'number') return q;
  switch (q.dist) {
    case 'uniform':
      return 0.5 * (q.min + q.max);
    case 'triangular':
      return q.mode;
    case 'lognormal':
      return q.median;
  }
}

/**
 * Inverse cumulative distribution: the value at probability p ∈ (0,1). Used by Latin hypercube draws.
 * Lognormal: median × spread^z with z the standard normal quantile (Acklam's rational approximation,
 * relative error < 1.2e-9).
 */
export function quantile(q: Distribution, p: number): number {
  switch (q.dist) {
    case 'uniform':
      return q.min + p * (q.max - q.min);
    case 'triangular': {
      const { min: a, mode: c, max: b } = q;
      const fc = (c - a) / (b - a);
      return p < fc ? a + Math.sqrt(p * (b - a) * (c - a)) : b - Math.sqrt((1 - p) * (b - a) * (b - c));
    }
    case 'lognormal':
      return q.median * Math.pow(q.spread, normalQuantile(p));
  }
}

/** Standard normal quantile (P. J. Acklam's algorithm; relative error below 1.15e-9). */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`p must be in (0,1), got ${p}`);
  const a = [-39.69683028665376, 220.9460984245205, -275.9285104469687, 138.357751867269, -30.66479806614716, 2.506628277459239];
  const b = [-54.47609879822406, 161.5858368580409, -155.6989798598866, 66.80131188771972, -13.28068155288572];
  const c = [-0.007784894002430293, -0.3223964580411365, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [0.007784695709041462, 0.3224671290700398, 2.445134137142996, 3.754408661907416];
  const pLow = 0.02425;
  if (p < pLow) {
    const q = Math.sqrt(-2 * Math.log(p));
    return (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  if (p > 1 - pLow) {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    return -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  const q = p - 0.5;
  const r = q * q;
  return ((((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q) / (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
}

/** A distribution found inside a scenario, with the path to it. */
export interface UncertainEntry {
  path: (string | number)[];
  distribution: Distribution;
}

/** Lists every distribution in an object tree, depth first, in key order (a stable parameter order for ensembles). */
export function listUncertain(root: unknown, path: (string | number)[] = []): UncertainEntry[] {
  if (isDistribution(root)) return [{ path, distribution: root }];
  if (Array.isArray(root)) return root.flatMap((x, i) => listUncertain(x, [...path, i]));
  if (typeof root === 'object' && root !== null) {
    return Object.entries(root).flatMap(([k, v]) => listUncertain(v, [...path, k]));
  }
  return [];
}

/**
 * Returns a copy of `root` with every distribution replaced by `pick(distribution, path)`.
 * With `centralValue` this gives the point scenario of a single run.
 */
export function resolveQuantities<T>(
  root: T,
  pick: (d: Distribution, path: (string | number)[]) => number = (d) => centralValue(d),
  path: (string | number)[] = [],
): Resolved<T> {
  if (isDistribution(root)) return pick(root, path) as Resolved<T>;
  if (Array.isArray(root)) return root.map((x, i) => resolveQuantities(x, pick, [...path, i])) as Resolved<T>;
  if (typeof root === 'object' && root !== null) {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(root)) out[k] = resolveQuantities(v, pick, [...path, k]);
    return out as Resolved<T>;
  }
  return root as Resolved<T>;
}
