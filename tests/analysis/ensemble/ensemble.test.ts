import { describe, expect, it } from 'vitest';
import { parseScenario, pointScenario } from '../../../server/model/scenario.ts';
import { drawValues, effectiveStandardError, evaluatePoint, planEnsemble, probability, runEnsemble, summariseEnsemble, wilsonInterval, type DrawOutcome } from '../../../server/analysis/ensemble/ensemble.ts';
import { expectAllClose } from '../../helpers/close.ts';
import { probabilityEstimate } from '../../../server/report/format.ts';
import { runEnsembleParallel } from '../../../server/jobs/parallel.ts';
import { evaluateScenario } from '../../../server/analysis/evaluate/evaluate.ts';
import { FIELDS } from '../../../server/model/fields.ts';
import { smallEnsembleScenario } from './ensemble-fixture.ts';

const strip = (r: { wallMs: number; threads: number }) => ({ ...r, wallMs: 0, threads: 0 });

describe('ensemble over uncertain parameters', () => {
  it('is reproducible for a seed and changes with the seed', () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 5, seed: 5, criticalWidth: false } }));
    const a = runEnsemble(s);
    const b = runEnsemble(s);
    expect(strip(b)).toEqual(strip(a));
    const c = runEnsemble(parseScenario(smallEnsembleScenario({ uncertainty: { draws: 5, seed: 6, criticalWidth: false } })));
    expect(c.baseline.sites[0].arrivalYears).not.toEqual(a.baseline.sites[0].arrivalYears);
  });

  it('gives identical results on worker pools of 1 and 2 threads and in this thread', async () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 5, seed: 9, criticalWidth: true } }));
    const inline = runEnsemble(s);
    const one = await runEnsembleParallel(s, { threads: 1, batchSize: 2 });
    const two = await runEnsembleParallel(s, { threads: 2, batchSize: 2 });
    expect(one.threads).toBe(1);
    expect(two.threads).toBe(2);
    expect(strip(one)).toEqual(strip(inline));
    expect(strip(two)).toEqual(strip(inline));
  });

  it('P(holds) converges to the exact value of a known outcome rule, with standard error shrinking like 1/√N', () => {
    // The summary and the Latin hypercube are checked on an outcome whose probability is known exactly:
    // "holds" iff mortality × (edge preference − 0.5) > 1.5 with mortality ~ U(1, 10), edge preference ~ U(0.5, 0.95):
    // P = (3 − 1.5 ln 3) / (0.45 × 9) = 0.333848 (own integral: ∫_{0.15}^{0.45} (10 − 1.5/a) da over the rectangle's area).
    const exact = (3 - 1.5 * Math.log(3)) / (0.45 * 9);
    const rows = [64, 256, 1024, 4096].map((n) => {
      const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: n, seed: 3, criticalWidth: false } }));
      const plan = planEnsemble(s);
      const jm = plan.parameters.findIndex((p) => p.pathText === 'pest.mortalityOpen');
      const ja = plan.parameters.findIndex((p) => p.pathText === 'pest.edgePreferenceOpen');
      const outcomes: DrawOutcome[] = Array.from({ length: n }, (_, i) => {
        const { values, clipped } = drawValues(plan, i);
        const holds = values[jm] * (values[ja] - 0.5) > 1.5;
        return { index: i, values, clipped, baselineArrivals: [10], options: [{ crossingYears: holds ? null : 5, arrivals: [holds ? null : 12], pinned: holds, criticalWidthM: null, bypassLambda: 0.1 }] };
      });
      return { N: n, ...summariseEnsemble(s, plan, outcomes, { status: 'completed', threads: 1, wallMs: 0 }).options[0].holdsWithinHorizon };
    });
    console.log(['   N    P(holds)   s.e.     s.e.·√N   |error|', ...rows.map((r) => `${String(r.N).padStart(5)}   ${r.p.toFixed(4)}    ${r.standardError.toFixed(4)}   ${(r.standardError * Math.sqrt(r.N)).toFixed(3)}     ${Math.abs(r.p - exact).toFixed(4)}`)].join('\n'));
    const scaled = Math.sqrt(exact * (1 - exact));
    for (const r of rows) {
      // s.e.·√N = √(p̂(1−p̂)) is constant up to the estimate's own error: within ±10 %.
      expect(Math.abs(r.standardError * Math.sqrt(r.N) - scaled)).toBeLessThan(0.1 * scaled);
      // Latin hypercube errors are no larger than simple random sampling's: within 3 s.e. of the exact value.
      expect(Math.abs(r.p - exact)).toBeLessThan(3 * r.standardError);
    }
    expect(rows[3].standardError).toBeLessThan(rows[0].standardError / 7);
  });

  it('with zero ranges collapses to the single-run result', () => {
    // Log-normal with spread 1 is a distribution of zero width: every draw equals the central value.
    const zero = {
      diffusionOpen: { dist: 'lognormal', median: 0.5, spread: 1 },
      edgePreferenceOpen: 0.8,
      growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.2 },
      mortalityOpen: { dist: 'lognormal', median: 4, spread: 1 },
    };
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 3, seed: 1, criticalWidth: false } }, zero));
    const ens = runEnsemble(s);
    const single = evaluatePoint(pointScenario(s));
    const doc = evaluateScenario(s);
    expect(ens.completed).toBe(3);
    const o = ens.options[0];
    expect(o.holdsWithinHorizon.p).toBe(single.options[0].crossingYears === null ? 1 : 0);
    expect(o.holdsWithinHorizon.p).toBe(doc.options[0].crossingYears.option === null ? 1 : 0);
    expect(o.pinned?.p).toBe(doc.options[0].pinned ? 1 : 0);
    expect(o.holdsWithinHorizon.standardError).toBe(0);
    // Arrivals: the ensemble's quantiles all equal the single run's arrival, taken from the full recorded run.
    const arrival = doc.options[0].sites[0].optionArrivalYears;
    const q = o.sites[0].arrivalYears;
    if (arrival === null) expect(q.beyondHorizon).toBe(3);
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
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 20, seed: 4, criticalWidth: false } }));
    const seen: number[] = [];
    const r = runEnsemble(s, { onProgress: (f) => seen.push(f), shouldCancel: () => seen.length >= 3 });
    expect(r.status).toBe('cancelled');
    expect(r.completed).toBe(3);
    expect(r.convergence.adequate).toBe(false);
    expect(r.convergence.message).toMatch(/Cancelled after 3 of 20/);
    expect(seen).toEqual([1 / 20, 2 / 20, 3 / 20]);
  });

  it('on the worker pool, cancel stops the run and keeps the draws done', async () => {
    const s = parseScenario(smallEnsembleScenario({ uncertainty: { draws: 8, seed: 4, criticalWidth: false } }));
    let seen = 0;
    const r = await runEnsembleParallel(s, { threads: 1, batchSize: 1, onProgress: () => seen++, shouldCancel: () => seen >= 2 });
    expect(r.status).toBe('cancelled');
    expect(r.completed).toBeGreaterThanOrEqual(2);
    expect(r.completed).toBeLessThan(8);
    expect(r.convergence.message).toMatch(/Cancelled after/);
  });

  it('asks for more draws when the standard error is above the target', () => {
    const r = runEnsemble(parseScenario(smallEnsembleScenario({ uncertainty: { draws: 8, seed: 3, targetStandardError: 0.02, criticalWidth: false } })));
    expect(r.convergence.adequate).toBe(false);
    expect(r.convergence.message).toMatch(/More draws needed/);
    expect(r.convergence.drawsSuggested).toBeGreaterThan(8 * (r.convergence.largestStandardError / 0.02) ** 2 - 1);
  });
});

describe('probability estimates from draws', () => {
  it('95 % Wilson score interval (Wilson 1927) matches scipy.stats.binomtest(k, n).proportion_ci(method="wilson")', () => {
    // Values computed with scipy 1.17: binomtest(k, n).proportion_ci(confidence_level=0.95, method='wilson').
    const cases: [number, number, [number, number]][] = [
      [12, 12, [0.7575059933447592, 1]],
      [0, 12, [0, 0.24249400665524085]],
      [6, 12, [0.2537815976337061, 0.7462184023662939]],
      [884, 1000, [0.8626667265227275, 0.9023943229603661]],
    ];
    for (const [k, n, ci] of cases) expectAllClose(wilsonInterval(k, n), ci, { rtol: 1e-9, atol: 1e-12 });
  });
  it('when every draw agrees the standard error is 0, but the sampling error used for "enough draws" is not', () => {
    const all = probability(12, 12);
    expect(all.standardError).toBe(0);
    // A quarter of the interval width: (1 − 0.7575) / (2 × 1.96) ≈ 0.062, far above a 0.02 target.
    expectAllClose(effectiveStandardError(all), (1 - 0.7575059933447592) / (2 * 1.959963984540054), { rtol: 1e-9 });
    // With many draws the interval and the standard error agree (Wilson → Wald for large n).
    const many = probability(8840, 10000);
    expectAllClose(effectiveStandardError(many), many.standardError, { rtol: 2e-3 });
  });
  it('is printed with its interval, not "± 0", when every draw agrees', () => {
    expect(probabilityEstimate(probability(12, 12))).toBe('100.0 % (95 % interval 75.8–100.0 %)');
    expect(probabilityEstimate(probability(6, 12), 0)).toBe('50 % ± 14.4 %');
  });
});
