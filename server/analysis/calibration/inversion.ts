/**
 * From a spread rate to a movement rate. In unbroken host forest the model is u_t = D u_xx + f(u, h) u,
 * h_t = −k u h; the change of variable x' = x/√D removes D, so every front speed scales exactly as
 * c(D) = √D · c(1). The speed at unit movement c(1) is
 *   - logistic growth: 2√r (Fisher 1937; Kolmogorov, Petrovsky & Piskunov 1937), so D = c²/(4r);
 *   - cubic Allee growth r u(1−u)(u−a): √(2r)(½ − a) (Nagumo's equation; McKean 1970; Lewis & Kareiva
 *     1993), so D = c²/(2r(½ − a)²), defined only for a < ½ (the pest advances);
 *   - mate-finding growth: the engine's own speed at D = 1 — the linear (pulled) speed 2√(λ0) when small
 *     groups grow, or the front measured in a simulated stand when they do not (strong Allee effect: a pushed
 *     front with no closed form).
 */
import type { PointScenario } from '../../model/scenario.ts';
import type { PointGrowth } from '../../model/growth.ts';
import { lowDensityRate } from '../../model/growth.ts';
import { strongAllee } from '../run/barrier-growth.ts';
import { measureMosaicSpeed } from '../mosaic/mosaic.ts';

/** Fisher–KPP speed c = 2√(rD) [km/yr]. */
export function fisherSpeed(rate: number, diffusion: number): number {
  return 2 * Math.sqrt(rate * diffusion);
}

/** Movement rate D = c²/(4r) [km²/yr] from a Fisher–KPP speed c [km/yr] and growth rate r [1/yr]. */
export function fisherMovementRate(speed: number, rate: number): number {
  return (speed * speed) / (4 * rate);
}

/** Nagumo (cubic Allee) speed c = √(2rD)(½ − a) [km/yr]. */
export function nagumoSpeed(rate: number, diffusion: number, threshold: number): number {
  return Math.sqrt(2 * rate * diffusion) * (0.5 - threshold);
}

/** Movement rate D = c²/(2r(½ − a)²) from a Nagumo speed; NaN when a ≥ ½ (no advancing front to invert). */
export function nagumoMovementRate(speed: number, rate: number, threshold: number): number {
  if (!(threshold < 0.5)) return NaN;
  return (speed * speed) / (2 * rate * (0.5 - threshold) ** 2);
}

/** How the speed at unit movement was obtained. */
export type SpeedMethod = 'fisher-kpp' | 'nagumo' | 'linear-pulled' | 'engine-measured';

export interface UnitSpeed {
  /** c(1): spread rate at D = 1 km²/yr in fully stocked host forest [km/yr]; null when the pest does not advance. */
  kmPerYear: number | null;
  method: SpeedMethod;
  /** The formula or method in words. */
  note: string;
}

/**
 * Spread rate at unit movement for a growth form (fully stocked host forest, h = 1).
 * @param s - the point scenario (its pest's growth and host-kill rate); only the mate-finding form with a
 *   strong Allee effect needs the engine (one run of about a second)
 */
export function unitSpeed(s: PointScenario, stocking = 1): UnitSpeed {
  const g: PointGrowth = s.pest.growth;
  if (g.form === 'logistic') return { kmPerYear: 2 * Math.sqrt(g.rate * stocking), method: 'fisher-kpp', note: 'c = 2√(rD) (Fisher–KPP)' };
  if (g.form === 'allee-cubic') {
    // At stocking h the cubic r(h − u)(u − a h) becomes, with u = h w, r h² (1 − w)(w − a): speed h√(2r)(½ − a).
    const a = g.alleeThreshold;
    const c = stocking * Math.sqrt(2 * g.rate) * (0.5 - a);
    return { kmPerYear: c > 0 ? c : null, method: 'nagumo', note: a < 0.5 ? 'c = √(2rD)(½ − a) (Nagumo; Lewis & Kareiva 1993)' : 'Allee threshold a ≥ ½: the front retreats' };
  }
  if (!strongAllee(g, stocking)) {
    const r0 = lowDensityRate(g, stocking);
    return { kmPerYear: r0 > 0 ? 2 * Math.sqrt(r0) : null, method: 'linear-pulled', note: 'c = 2√(λ0 D), λ0 the growth rate of small groups (a pulled front)' };
  }
  // Pushed front: measure it with the engine at D = 1 in a long unbroken stand (1 m gaps, as the mosaic
  // analysis measures the speed in intact forest).
  const unit: PointScenario = { ...s, pest: { ...s.pest, diffusionHost: 1 } };
  const m = measureMosaicSpeed(unit, { name: 'intact', forestM: 1000, gapM: 0.001, cover: 'clearing', stocking, measure: true }, { periods: 60 });
  return {
    kmPerYear: m.kmPerYear !== null && m.kmPerYear > 0 ? m.kmPerYear : null,
    method: 'engine-measured',
    note: 'c = √D · c(1), c(1) measured with the engine in unbroken host forest (strong Allee effect: no closed form)',
  };
}

/** Movement rate D = (c / c(1))² [km²/yr] from a spread rate c [km/yr]. */
export function movementRateFromSpeed(speed: number, unit: number): number {
  return (speed / unit) ** 2;
}
