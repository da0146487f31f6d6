/** Length scales of a front and its fringe in host forest, and where the barrier analysis watches and cuts its windows. */
import { lowDensityRate } from '../../model/growth.ts';
import type { PointScenario } from '../../model/scenario.ts';
import { growthRateScale } from '../../problem/discretise.ts';


/** Movement length in host forest √(D/r) [km]: the distance over which a front profile changes. */
export function movementLengthKm(s: PointScenario): number {
  return Math.sqrt(s.pest.diffusionHost / growthRateScale(s.pest.growth));
}

/** Decay length of a low-density fringe in host forest √(D/|g(0)|) [km] (the movement length when g(0) = 0). */
export function fringeLengthKm(s: PointScenario): number {
  const g0 = Math.abs(lowDensityRate(s.pest.growth, 1));
  return g0 > 0 ? Math.sqrt(s.pest.diffusionHost / g0) : movementLengthKm(s);
}
