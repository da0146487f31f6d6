/**
 * The quick estimate: the movement rate from the front's spread rate (inversion.ts), with an uncertain
 * growth rate carried through by seeded Monte Carlo. Shared by the transect fit and the map fit.
 */
import type { PointScenario, Scenario } from '../../model/scenario.ts';
import { isDistribution, quantile } from '../../model/quantity.ts';
import { makeRng } from '../../numerics/rng.ts';
import type { FrontFit } from './front.ts';
import { movementRateFromSpeed, unitSpeed, type UnitSpeed } from './inversion.ts';
import { withValue } from './model-fit.ts';
import { growthPath, valueAtPath } from './ranges.ts';
import { studentTQuantile } from './statistics.ts';

export interface QuickEstimate {
  unitSpeed: UnitSpeed;
  /** D from the front's spread rate [km²/yr] and its 90 % range (null when the front does not advance). */
  diffusion: number | null;
  interval90: [number, number] | null;
  note: string;
}

/**
 * D from the front's spread rate, carrying an uncertain growth rate through by seeded Monte Carlo.
 * @param stocking - host stocking of the forest the front spread through (1: fully stocked)
 */
export function quickEstimate(s: Scenario, point: PointScenario, front: FrontFit, stocking = 1): QuickEstimate {
  const unit = unitSpeed(point, stocking);
  if (front.kmPerYear === null || !(front.kmPerYear > 0) || unit.kmPerYear === null) {
    return { unitSpeed: unit, diffusion: null, interval90: null, note: front.kmPerYear !== null && front.kmPerYear <= 0 ? 'the front does not advance: no movement rate follows from its speed' : unit.note };
  }
  const c = front.kmPerYear;
  const gp = growthPath(s);
  const prior = valueAtPath(s, gp);
  const d = movementRateFromSpeed(c, unit.kmPerYear);
  const [cLo, cHi] = front.interval90 as [number, number];
  if (!isDistribution(prior) || s.pest.growth.form === 'mate-finding') {
    return {
      unitSpeed: unit,
      diffusion: d,
      interval90: [cLo > 0 ? movementRateFromSpeed(cLo, unit.kmPerYear) : 0, movementRateFromSpeed(cHi, unit.kmPerYear)],
      note: `${unit.note}; asymptotic speed of an established front (a young front of a pest without an Allee effect is slower, so this can underestimate D)${isDistribution(prior) ? '; the birth rate is taken at its central value here' : ''}`,
    };
  }
  // c ~ ĉ + se·t(df) and r ~ its distribution, independent; D = c²/c(1; r)².
  const rng = makeRng(20260401);
  const draws: number[] = [];
  const se = front.standardError ?? 0;
  for (let i = 0; i < 4000; i++) {
    const ci = c + se * studentTQuantile(rng.nextOpen(), Math.max(1, front.degreesOfFreedom));
    const r = quantile(prior, rng.nextOpen());
    const u = unitSpeed(withValue(point, gp, r), stocking).kmPerYear as number;
    draws.push(ci > 0 ? movementRateFromSpeed(ci, u) : 0);
  }
  draws.sort((a, b) => a - b);
  return {
    unitSpeed: unit,
    diffusion: d,
    interval90: [draws[Math.floor(0.05 * draws.length)], draws[Math.floor(0.95 * draws.length)]],
    note: `${unit.note}; the growth rate's range is carried through (4000 seeded draws); asymptotic speed of an established front`,
  };
}
