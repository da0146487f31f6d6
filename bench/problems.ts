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
