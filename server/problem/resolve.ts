/**
 * Resolution of a scenario's quantities into a point scenario: the central value of every distribution
 * (`resolve`), or the values of ensemble draw i (`resolveDraw`, values by parameter path).
 */
import { centralValue, resolveQuantities, type Distribution } from '../model/quantity.ts';
import { pointScenario, type PointScenario, type Scenario } from '../model/scenario.ts';
import { formatPath } from '../model/errors.ts';

/** The scenario at the central value of every distribution. */
export function resolve(scenario: Scenario): PointScenario {
  return pointScenario(scenario);
}

/** The scenario with the listed parameters (by path) at the drawn values and every other distribution at its central value. */
export function resolveDraw(scenario: Scenario, parameters: readonly { pathText: string }[], values: readonly number[]): PointScenario {
  const byPath = new Map(parameters.map((p, j) => [p.pathText, values[j]]));
  return resolveQuantities(scenario, (d: Distribution, path) => byPath.get(formatPath(path)) ?? centralValue(d)) as PointScenario;
}
