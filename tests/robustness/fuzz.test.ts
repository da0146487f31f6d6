/**
 * Quick robustness run for CI (the long run and the load and fault runs: `npm run bench:fuzz`,
 * `bench:load`, `bench:faults`): a few hundred mutated scenarios, hostile form bodies and hostile requests
 * against app.inject, the accepted scenarios evaluated. Must show 0 crashes, 0 5xx, 0 stack traces, 0
 * non-finite results and no failure other than a named input, limit or computation error. Seeded: the
 * same inputs every run (change SEED to explore; bench/robustness/fuzz.ts runs many seeds).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildTestApp, type TestApp } from '../helpers/build-app.ts';
import { formatFigures, fuzz } from './harness.ts';

const SEED = 20261203;

describe('robustness (quick)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await buildTestApp({ formPerMinute: 1e6, computePerMinute: 1e6 });
  });
  afterAll(async () => {
    await t.close();
  });

  it('300 mutated scenarios, 100 form bodies, 150 hostile requests: no crash, no 5xx, no NaN verdict', async () => {
    const f = await fuzz(t.app, { seed: SEED, scenarios: 300, forms: 100, requests: 150, evaluate: 40 });
    process.stdout.write(`\n${formatFigures(f)}\n`);
    expect(f.crashes).toEqual([]);
    expect(f.serverErrors).toEqual([]);
    expect(f.stackTraces).toEqual([]);
    expect(f.unescaped).toEqual([]);
    expect(f.nonFinite).toEqual([]);
    expect(f.unexpectedFailures).toEqual([]);
    // The harness must have exercised both sides: refusals and accepted scenarios that ran to a verdict.
    expect(f.byStatus['400']).toBeGreaterThan(50);
    expect(f.accepted).toBeGreaterThan(20);
    expect(f.evaluated).toBeGreaterThan(10);
  });
});
