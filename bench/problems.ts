/**
 * Benchmark problems shared by the bench scripts (invented Ossenvale pest profile, illustrative numbers).
 */
import type { ScenarioInput } from '../server/model/scenario.ts';

/**
 * Bench (a)/(b): a 100 km transect of host forest at 25 m cells over 30 years, infested over its first
 * 3 km, with one 500 m clearing option at km 20. Allee growth with slow host killing (the "holds" profile).
 */
export function transect100km(over: Partial<ScenarioInput> = {}): ScenarioInput {
  return {
    title: 'Bench: 100 km Ossenvale transect at 25 m',
    pest: {
      name: 'Ossenvale bark-borer (illustrative profile)',
      illustrative: true,
      diffusionHost: 1,
      diffusionOpen: 1,
      edgePreferenceOpen: 0.8,
      growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.2 },
      hostKillRate: 0.05,
      mortalityOpen: 5,
    },
    transect: { segments: [{ habitat: 'host-forest', name: 'Long stand', lengthKm: 100, stocking: 0.9, stemsPerHa: 400 }] },
    infestation: { fromKm: 0, toKm: 3 },
    sites: [{ name: 'Far village', atKm: 60 }],
    barrier: { lengthKm: 5, options: [{ name: '500 m cut at km 20', fromKm: 20, widthM: 500 }] },
    horizonYears: 30,
    numerics: { cellM: 25 },
    ...over,
  };
}

/**
 * Bench (c): the "clearing holds" layout (50 km, mate-limited borer that kills its hosts, 1.2 km cut at
 * km 8) with ranges on five pest parameters. Self-contained so that edits to the demo files do not change it.
 */
export function ensembleProblem(draws: number): ScenarioInput {
  return {
    title: 'Bench: ensemble on the Ossenvale east flank',
    pest: {
      name: 'Ossenvale bark-borer (illustrative profile)',
      illustrative: true,
      diffusionHost: { dist: 'triangular', min: 0.7, mode: 1, max: 1.3 },
      diffusionOpen: { dist: 'lognormal', median: 1, spread: 1.5 },
      edgePreferenceOpen: { dist: 'uniform', min: 0.75, max: 0.92 },
      growth: { form: 'mate-finding', birthRate: 4, deathRate: 0.5, crowding: 2.577, mating: 'saturating', mateScale: { dist: 'triangular', min: 0.15, mode: 0.25, max: 0.35 } },
      hostKillRate: 0.1,
      mortalityOpen: { dist: 'uniform', min: 2, max: 6 },
    },
    transect: {
      segments: [
        { habitat: 'host-forest', name: 'Greyholm stand', lengthKm: 12, stocking: 0.9, stemsPerHa: 420 },
        { habitat: 'host-forest', name: 'Brackfen woods', lengthKm: 18, stocking: 0.85, stemsPerHa: 380 },
        { habitat: 'clearing', name: 'Tarrow power-line corridor', lengthKm: 0.06 },
        { habitat: 'host-forest', name: 'Saltrin slopes', lengthKm: 20, stocking: 0.8, stemsPerHa: 380 },
      ],
    },
    infestation: { fromKm: 0, toKm: 3, density: 1 },
    sites: [
      { name: 'Brackfen Mill village', atKm: 22 },
      { name: 'Saltrin Hollow seed orchard', atKm: 40 },
    ],
    barrier: { lengthKm: 6, options: [{ name: 'Wide cut at km 8', fromKm: 8, widthM: 1200, cover: 'clearing' }] },
    horizonYears: 50,
    uncertainty: { draws, seed: 1, criticalWidth: true },
  };
}
