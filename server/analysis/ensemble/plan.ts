/**
 * The ensemble's plan and draws: every distribution of a scenario (stable depth-first order), a Latin
 * hypercube from the seed's child stream 0, draw i's values (clipped into range), its point scenario and its
 * coarsened problem, and what one draw yields.
 */
import { DEFAULT_TOLERANCE_M } from '../run/baseline.ts';
import { FIELDS, inRange, type FieldSpec } from '../../model/fields.ts';
import { listUncertain, quantile, type Distribution } from '../../model/quantity.ts';
import { type PointScenario, type Scenario } from '../../model/scenario.ts';
import { formatPath } from '../../model/errors.ts';
import { latinHypercube, makeRng } from '../../numerics/rng.ts';
import { asProblem, type Problem } from '../../problem/problem.ts';
import { coarsenedProblem } from '../../problem/resolution.ts';
import { resolveDraw } from '../../problem/resolve.ts';

/* ------------------------------------------------------------------ parameters and draws */

/** Field spec of a scenario path whose last key names the field (growth.rate → growthRate, kernel.meanKm → transportMeanKm). */
const FIELD_OF_KEY: Record<string, FieldSpec> = {
  rate: FIELDS.growthRate,
  meanKm: FIELDS.transportMeanKm,
  ratePerKm2Year: FIELDS.transportRate,
};

/** The field spec (range, label, unit) of an uncertain entry's path. */
export function fieldOfPath(path: readonly (string | number)[]): FieldSpec {
  const key = String(path[path.length - 1]);
  const spec = FIELD_OF_KEY[key] ?? (FIELDS as Record<string, FieldSpec>)[key];
  if (!spec) throw new Error(`no field spec for uncertain parameter ${formatPath(path)}`);
  return spec;
}

/** Label of a parameter for tables and sentences (segments name their stretch). */
export function parameterLabel(scenario: Scenario, path: readonly (string | number)[]): string {
  const spec = fieldOfPath(path);
  const lower = (t: string): string => (t.startsWith('Allee') ? t : t.charAt(0).toLowerCase() + t.slice(1));
  if (path[0] === 'transect' && path[1] === 'segments' && typeof path[2] === 'number') {
    const seg = scenario.transect.segments[path[2]];
    return `${lower(spec.label)} (${seg?.name ? `"${seg.name}"` : `segment ${path[2] + 1}`})`;
  }
  return lower(spec.label);
}

/**
 * Moves a drawn value into the field's allowed range. Only log-normal tails can leave it (uniform and
 * triangular draws lie between validated bounds); an exclusive bound is approached to within 1e-9 relative.
 */
export function clipToField(spec: FieldSpec, v: number): number {
  if (inRange(spec, v)) return v;
  const eps = 1e-9;
  if (v < spec.min || (spec.minExclusive && v <= spec.min)) return spec.minExclusive ? spec.min + eps * Math.max(1, Math.abs(spec.min)) : spec.min;
  return spec.maxExclusive ? spec.max - eps * Math.max(1, Math.abs(spec.max)) : spec.max;
}

export interface PlannedParameter {
  path: (string | number)[];
  pathText: string;
  spec: FieldSpec;
  distribution: Distribution;
}

/** The draws of an ensemble: parameters (stable depth-first order) and the unit design (row-major draws × parameters). */
export interface EnsemblePlan {
  parameters: PlannedParameter[];
  draws: number;
  seed: number;
  /** Latin hypercube on (0,1)^k, draws × k, row-major. */
  unit: Float64Array;
}

/** Uncertain parameters of a scenario (every distribution, in stable order). */
export function uncertainParameters(scenario: Scenario): PlannedParameter[] {
  return listUncertain(scenario).map((e) => ({ path: e.path, pathText: formatPath(e.path), spec: fieldOfPath(e.path), distribution: e.distribution }));
}

/**
 * Plans the ensemble. Without distributions the ensemble is one draw (the central values), whatever
 * `draws` says: repeating an identical run adds nothing.
 */
export function planEnsemble(scenario: Scenario): EnsemblePlan {
  const u = scenario.uncertainty ?? { draws: 1000, seed: 1 };
  const parameters = uncertainParameters(scenario);
  const draws = parameters.length === 0 ? 1 : u.draws;
  const unit = latinHypercube(draws, parameters.length, makeRng(u.seed).child(0));
  return { parameters, draws, seed: u.seed, unit };
}

/** Parameter values of draw i (clipped into range) and which of them were clipped. */
export function drawValues(plan: EnsemblePlan, i: number): { values: number[]; clipped: boolean[] } {
  const k = plan.parameters.length;
  const values: number[] = [];
  const clipped: boolean[] = [];
  for (let j = 0; j < k; j++) {
    const p = plan.parameters[j];
    const raw = quantile(p.distribution, plan.unit[i * k + j]);
    const v = clipToField(p.spec, raw);
    values.push(v);
    clipped.push(v !== raw);
  }
  return { values, clipped };
}

/** Default coarsening of a transect ensemble's draws (cells and steps; tests/analysis/ensemble/ensemble-resolution.test.ts). */
export const TRANSECT_DRAW_FACTOR = 3;

/**
 * Draw i: its point scenario (resolve.ts) and the problem it runs, with the resolution coarsened by the
 * ensemble's `resolutionFactor` (a variant of the draw's problem; the scenario itself is not rewritten).
 */
export function drawScenario(scenario: Scenario, plan: EnsemblePlan, i: number): { point: PointScenario; problem: Problem; values: number[]; clipped: boolean[] } {
  const { values, clipped } = drawValues(plan, i);
  const point = resolveDraw(scenario, plan.parameters, values);
  return { point, problem: coarsened(point, scenario.uncertainty?.resolutionFactor ?? TRANSECT_DRAW_FACTOR), values, clipped };
}

/** The problem of a point scenario with cells and step `factor` times the automatic choice (see coarsenedProblem). */
export function coarsened(s: PointScenario | Problem, factor: number): Problem {
  return coarsenedProblem(asProblem(s), factor);
}



/** What one evaluation of a point scenario yields for the ensemble (plain data: crosses worker threads). */
export interface PointOutcome {
  /** Baseline arrival per site [yr]; null: not within the horizon. */
  baselineArrivals: (number | null)[];
  options: {
    /** Year the breeding front got past the clearing (barrier analysis); null: not within the horizon. */
    crossingYears: number | null;
    /** Arrival per site with the option [yr]; null: not within the horizon, or held (front verified pinned). */
    arrivals: (number | null)[];
    /** Front verified pinned (holds indefinitely under the model). */
    pinned: boolean;
    /**
     * Critical width [m]: the narrowest width verified to pin the front (upper end of the bisection bracket);
     * Infinity: no finite width pins it (no strong Allee effect, or none up to the widest the transect allows);
     * null: not computed (switched off, or no front approached the clearing in the baseline and no phase-plane value).
     */
    criticalWidthM: number | null;
    /** Expected established introductions beyond the barrier up to the crossing or the horizon; null without transport. */
    bypassLambda: number | null;
  }[];
}

export interface DrawOutcome extends PointOutcome {
  index: number;
  values: number[];
  clipped: boolean[];
}

/** Critical-width tolerance for ensemble draws [m]: the scenario's, or 2 % of the option width if larger (the spread over draws is far wider). */
export function drawToleranceM(s: PointScenario, widthM: number): number {
  return Math.max(s.barrier?.toleranceM ?? DEFAULT_TOLERANCE_M, 0.02 * widthM);
}
