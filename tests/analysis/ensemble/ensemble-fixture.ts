import type { ScenarioInput } from '../../../server/model/scenario.ts';

/**
 * A small transect (8 km, 100 m cells, 0.05 yr steps) with an Allee pest and uncertain clearing behaviour:
 * a few milliseconds per run, so ensembles of hundreds of draws stay cheap in tests.
 */
export function smallEnsembleScenario(over: Partial<ScenarioInput> = {}, pest: Record<string, unknown> = {}): ScenarioInput {
  return {
    title: 'small ensemble test transect',
    pest: {
      name: 'test borer',
      illustrative: true,
      diffusionHost: 0.5,
      diffusionOpen: { dist: 'lognormal', median: 0.5, spread: 2 },
      edgePreferenceOpen: { dist: 'uniform', min: 0.5, max: 0.95 },
      growth: { form: 'allee-cubic', rate: 1, alleeThreshold: { dist: 'triangular', min: 0.1, mode: 0.2, max: 0.3 } },
      hostKillRate: 0,
      mortalityOpen: { dist: 'uniform', min: 1, max: 10 },
      ...pest,
    } as ScenarioInput['pest'],
    transect: { segments: [{ habitat: 'host-forest', lengthKm: 8, stocking: 1, stemsPerHa: 400 }] },
    infestation: { fromKm: 0, toKm: 1.5 },
    sites: [{ name: 'East hut', atKm: 6 }],
    barrier: { lengthKm: 2, options: [{ name: '300 m cut', fromKm: 2.5, widthM: 300 }] },
    horizonYears: 15,
    numerics: { cellM: 100, stepYears: 0.05 },
    uncertainty: { draws: 32, seed: 3, criticalWidth: false },
    transport: { ratePerKm2Year: 0.01, kernel: { shape: 'exponential', meanKm: 10 }, establishmentProbability: 0.3 },
    ...over,
  };
}
