import { describe, expect, it } from 'vitest';
import { parseScenario, pointScenario } from '../../server/model/scenario.ts';
import { drawValues, evaluatePoint, planEnsemble, runEnsemble } from '../../server/analysis/ensemble.ts';
import { runEnsembleParallel } from '../../server/analysis/ensemble-pool.ts';
import { evaluateScenario } from '../../server/analysis/evaluate.ts';
import { FIELDS } from '../../server/model/fields.ts';
import { smallEnsembleScenario } from './ensemble-fixture.ts';

const strip = (r: { wallMs: number; threads: number }) => ({ ...r, wallMs: 0, threads: 0 });

describe('ensemble over uncertain parameters', () => {
  it('is reproducible for a seed and changes with the seed', () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 12, seed: 5 } }));
    const a = runEnsemble(s);
    const b = runEnsemble(s);
    expect(strip(b)).toEqual(strip(a));
    const c = runEnsemble(parseScenario(smallEnsembleScenario({ uncertainty: { draws: 12, seed: 6 } })));
    expect(c.options[0].crossingYears).not.toEqual(a.options[0].crossingYears);
  });

  it('gives identical results on worker pools of 1 and 2 threads and in this thread', async () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 10, seed: 9 } }));
    const inline = runEnsemble(s);
    const one = await runEnsembleParallel(s, { threads: 1, batchSize: 3 });
    const two = await runEnsembleParallel(s, { threads: 2, batchSize: 2 });
    expect(one.threads).toBe(1);
    expect(two.threads).toBe(2);
    expect(strip(one)).toEqual(strip(inline));
    expect(strip(two)).toEqual(strip(inline));
  });

  it('P(holds) converges: its standard error shrinks like 1/√N and estimates approach a 1024-draw reference', () => {
    const est = (n: number) => runEnsemble(parseScenario(smallEnsembleScenario({ uncertainty: { draws: n, seed: 3 } }))).options[0].holdsWithinHorizon;
    const ref = est(1024);
    expect(ref.p).toBeGreaterThan(0.2);
    expect(ref.p).toBeLessThan(0.9);
    const rows = [16, 64, 256].map((n) => est(n));
    console.log(['   N    P(holds)   s.e.     s.e.·√N', ...rows.map((r) => `${String(r.n).padStart(5)}   ${r.p.toFixed(4)}    ${r.standardError.toFixed(4)}   ${(r.standardError * Math.sqrt(r.n)).toFixed(3)}`)].join('\n'));
    // s.e.·√N = √(p(1−p)) varies only through p (0.2 < p < 0.9): within ±30 % of the reference value.
    const scaled = Math.sqrt(ref.p * (1 - ref.p));
    for (const r of rows) {
      expect(Math.abs(r.standardError * Math.sqrt(r.n) - scaled)).toBeLessThan(0.3 * scaled);
      // Latin hypercube errors are no larger than simple random sampling's: within 3 s.e. of the reference.
      expect(Math.abs(r.p - ref.p)).toBeLessThan(3 * Math.hypot(r.standardError, ref.standardError));
    }
    expect(rows[2].standardError).toBeLessThan(rows[0].standardError / 2.5);
  });

  it('with zero ranges collapses to the single-run result', () => {
    // Log-normal with spread 1 is a distribution of zero width: every draw equals the central value.
    const zero = {
      diffusionOpen: { dist: 'lognormal', median: 0.5, spread: 1 },
      edgePreferenceOpen: 0.8,
      growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.2 },
      mortalityOpen: { dist: 'lognormal', median: 4, spread: 1 },
    };
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 6, seed: 1 } }, zero));
    const ens = runEnsemble(s);
    const single = evaluatePoint(pointScenario(s));
    const doc = evaluateScenario(s);
    expect(ens.completed).toBe(6);
    const o = ens.options[0];
    expect(o.holdsWithinHorizon.p).toBe(single.options[0].crossingYears === null ? 1 : 0);
    expect(o.holdsWithinHorizon.standardError).toBe(0);
    // Arrivals: the ensemble's quantiles all equal the single run's arrival, taken from the full recorded run.
    const arrival = doc.options[0].run.arrivals[0].arrivalYears;
    const q = o.sites[0].arrivalYears;
    if (arrival === null) expect(q.beyondHorizon).toBe(6);
    else expect([q.p05, q.median, q.p95]).toEqual([arrival, arrival, arrival]);
    const base = doc.baseline.arrivals[0].arrivalYears;
    expect(ens.baseline.sites[0].arrivalYears.median).toBe(base);
    expect(o.sensitivity).toBeNull();
  });

  it('without any distribution runs one draw and says there is no sampling error', () => {
    const fixed = { diffusionOpen: 0.5, edgePreferenceOpen: 0.8, growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.2 }, mortalityOpen: 4 };
    const s = parseScenario(smallEnsembleScenario({ transport: undefined }, fixed));
    const r = runEnsemble(s);
    expect(r.completed).toBe(1);
    expect(r.convergence.message).toMatch(/no sampling error/);
  });

  it('clips log-normal tails into the field range and counts the clipped draws', () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 200, seed: 2 } }, { mortalityOpen: { dist: 'lognormal', median: 500, spread: 20 } }));
    const plan = planEnsemble(s);
    const j = plan.parameters.findIndex((p) => p.pathText === 'pest.mortalityOpen');
    let clipped = 0;
    for (let i = 0; i < plan.draws; i++) {
      const d = drawValues(plan, i);
      expect(d.values[j]).toBeLessThanOrEqual(FIELDS.mortalityOpen.max);
      if (d.clipped[j]) clipped++;
    }
    // P(500 × 20^Z > 1000) = P(Z > ln 2 / ln 20) = P(Z > 0.231) ≈ 0.41 (normal table).
    expect(clipped / plan.draws).toBeGreaterThan(0.33);
    expect(clipped / plan.draws).toBeLessThan(0.49);
  });

  it('reports progress and stops on cancel, keeping the draws already done', () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 20, seed: 4 } }));
    const seen: number[] = [];
    const r = runEnsemble(s, { onProgress: (f) => seen.push(f), shouldCancel: () => seen.length >= 3 });
    expect(r.status).toBe('cancelled');
    expect(r.completed).toBe(3);
    expect(r.convergence.adequate).toBe(false);
    expect(r.convergence.message).toMatch(/Cancelled after 3 of 20/);
    expect(seen).toEqual([1 / 20, 2 / 20, 3 / 20]);
  });

  it('asks for more draws when the standard error is above the target', () => {
    const r = runEnsemble(parseScenario(smallEnsembleScenario({ uncertainty: { draws: 16, seed: 3, targetStandardError: 0.02 } })));
    expect(r.convergence.adequate).toBe(false);
    expect(r.convergence.message).toMatch(/More draws needed/);
    expect(r.convergence.drawsSuggested).toBeGreaterThan(16 * (r.convergence.largestStandardError / 0.02) ** 2 - 1);
  });
});
