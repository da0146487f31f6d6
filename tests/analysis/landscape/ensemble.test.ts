/**
 * Landscape ensembles through the task runner: the same numbers whatever the chunking (draw i depends only
 * on the payload and i), probabilities with their standard errors, draws that differ where a parameter
 * range makes the outcome differ.
 */
import { describe, expect, it } from 'vitest';
import { makeLandscape } from '../../helpers/landscape.ts';
import { makeInlineRunner } from '../../../server/jobs/inline-runner.ts';
import { drawPest, runLandscapeEnsemble } from '../../../server/analysis/landscape/ensemble.ts';
import type { Pest } from '../../../server/model/pest.ts';

const pest: Pest = {
  name: 'test pest (invented)',
  illustrative: true,
  diffusionHost: { dist: 'uniform', min: 0.05, max: 0.6 },
  diffusionOpen: 0.25,
  edgePreferenceOpen: 0.8,
  growth: { form: 'logistic', rate: 1 },
  hostKillRate: 0,
  mortalityOpen: 2,
} as Pest;

const L = makeLandscape({
  nx: 60,
  ny: 30,
  cellM: 100,
  infestedAt: (x) => (x < 800 ? 1 : 0),
  sites: [
    { name: 'near', at: (x, y) => Math.abs(x - 1550) < 60 && Math.abs(y - 1550) < 60 },
    { name: 'far', at: (x, y) => Math.abs(x - 5050) < 60 && Math.abs(y - 1550) < 60 },
  ],
  bands: [{ id: 'cut', inside: (x) => x > 3000 && x < 3300, widthM: 300 }],
});

describe('landscape ensemble', () => {
  it('draws follow the Latin hypercube and stay in range', () => {
    const d = [0, 1, 2, 3].map((i) => drawPest(pest, 7, 4, i).diffusionHost);
    // One draw per quarter of the range (Latin hypercube strata).
    const strata = d.map((v) => Math.floor(((v - 0.05) / 0.55) * 4)).sort();
    expect(strata).toEqual([0, 1, 2, 3]);
  });

  it('gives P(site reached) per option, the same for any chunking', async () => {
    const runner = makeInlineRunner();
    const settings = { horizonYears: 4, detectionLevel: 0.01 };
    const a = await runLandscapeEnsemble(L, pest, settings, { draws: 6, seed: 3, cellM: 100, chunk: 1 }, runner);
    const b = await runLandscapeEnsemble(L, pest, settings, { draws: 6, seed: 3, cellM: 100, chunk: 4 }, runner);
    expect(b).toEqual(a);
    expect(a.completed).toBe(6);
    const near = a.baseline.sites[0].reached;
    const far = a.options[0].sites[1].reached;
    console.log(`P(near reached) ${near.p} ± ${near.standardError.toFixed(3)}; P(far reached with the cut) ${far.p}; way past ${JSON.stringify(a.options[0].wayPast)}`);
    expect(near.p).toBe(1);
    expect(far.p).toBeLessThan(near.p);
    expect(a.baseline.sites[1].reached.p).toBeGreaterThan(0);
    expect(a.baseline.sites[1].reached.p).toBeLessThan(1);
    expect(a.parameters[0].path).toBe('pest.diffusionHost');
  });
});
