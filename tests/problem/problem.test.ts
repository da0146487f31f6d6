/**
 * The resolved problem: built once from a point scenario, variants share its cache, layouts are built once
 * per clearing and discretisations once per distinct layout × resolution × ends × start × run length.
 */
import { describe, expect, it } from 'vitest';
import { asProblem, buildProblem, deriveProblem, layoutOf } from '../../server/problem/problem.ts';
import { discretise } from '../../server/problem/discretise.ts';
import { chooseResolution } from '../../server/problem/resolution.ts';
import { makeWindowSolver } from '../../server/analysis/run/barrier-run.ts';
import { clearingSegment, hostSegment, testPest, testScenario } from '../helpers/scenario.ts';

describe('Problem', () => {
  const s = testScenario({
    pest: testPest({ growth: { form: 'logistic', rate: 1 } }),
    transect: { segments: [hostSegment(4), clearingSegment(0.5), hostSegment(4)] },
    infestation: { fromKm: 0, toKm: 1, density: 1 },
    sites: [{ name: 'far stand', atKm: 7 }],
    horizonYears: 5,
  });
  it('carries the scenario facts the runs read', () => {
    const p = buildProblem(s);
    expect(p.extentKm[0]).toBe(s.transect.originKm);
    expect(p.ends).toEqual(s.transect.ends);
    expect(p.sites).toBe(s.sites);
    expect(p.horizonYears).toBe(s.horizonYears);
    expect(asProblem(p)).toBe(p);
    expect(asProblem(s)).not.toBe(p);
  });
  it('builds each layout once and discretises each distinct one once', () => {
    const p = buildProblem(s);
    const a = layoutOf(p);
    expect(layoutOf(p)).toBe(a);
    const r = chooseResolution(p, a);
    const d1 = discretise(p, a, r);
    expect(discretise(p, a, r)).toBe(d1);
    const finer = { ...r, cellKm: r.cellKm / 2 };
    const d2 = discretise(p, a, finer);
    expect(d2).not.toBe(d1);
    expect(d2.grid.nCells).toBeGreaterThan(d1.grid.nCells);
    expect(p.cache.counts).toMatchObject({ made: 2, asked: 3, layoutsBuilt: 1 });
  });
  it('a variant shares the cache but is discretised on its own terms (a window with reflecting cuts)', () => {
    const p = buildProblem({ ...s, transect: { ...s.transect, ends: { left: 'absorbing', right: 'absorbing' } } });
    const pieces = layoutOf(p);
    const r = chooseResolution(p, pieces);
    const [lo, hi] = p.extentKm;
    const w = makeWindowSolver(p, pieces, [lo + 0.25 * (hi - lo), hi + 1], r, 10);
    // The cut end reflects, the transect end keeps its own condition; the variant does not touch the problem.
    expect(w.problem.ends).toEqual({ left: 'reflecting', right: 'absorbing' });
    expect(p.ends).toEqual({ left: 'absorbing', right: 'absorbing' });
    expect(p.cache.counts.made).toBe(1);
    const v = deriveProblem(p, { horizonYears: 3 });
    expect(v.cache).toBe(p.cache);
    expect(v.scenario).toBe(p.scenario);
  });
});
