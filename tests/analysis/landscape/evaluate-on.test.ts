/**
 * evaluateLandscapeOn: the landscape's runs handed out through a task runner (inline, and two worker threads)
 * give the same result as evaluateLandscape on one thread, bit for bit — for a band the pest gets around or
 * through, and for a band that holds (the steady-state continuation then runs as a task of its own). The
 * task runner's rule that results never depend on where they ran (server/jobs/task-runner.ts) is what is
 * checked; the verdicts themselves are checked against published results in tests/verification/.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { LOGISTIC_TEST_PEST, makeLandscape } from '../../helpers/landscape.ts';
import { evaluateLandscape, evaluateLandscapeOn } from '../../../server/analysis/landscape/evaluate.ts';
import { makeInlineRunner } from '../../../server/jobs/inline-runner.ts';
import { makePoolRunner } from '../../../server/jobs/pool-runner.ts';
import { CancelledError } from '../../../server/jobs/task-runner.ts';
import type { PointPest } from '../../../server/analysis/landscape/problem.ts';

const logistic = LOGISTIC_TEST_PEST as unknown as PointPest;

// 6 × 4 km at 100 m; infested west strip; a site in the east; a short band and one across the map.
const open = makeLandscape({
  nx: 60,
  ny: 40,
  cellM: 100,
  infestedAt: (x) => (x < 800 ? 1 : 0),
  sites: [{ name: 'east stand', at: (x, y) => Math.abs(x - 5050) < 60 && Math.abs(y - 2050) < 60 }],
  bands: [
    { id: 'short', inside: (x, y) => x > 2500 && x < 2800 && y > 1000 && y < 3000, widthM: 300 },
    { id: 'across', inside: (x) => x > 2500 && x < 2800, widthM: 300 },
  ],
});

// A cubic Allee pest (D = r = 1, a = 0.25: critical clearing ≈ 596 m, check set G1 of server/numerics/README.md)
// before a 1 km clearing across a narrow strip: the band holds and the continuation must verify it.
const allee = {
  ...logistic,
  diffusionHost: 1,
  diffusionOpen: 1,
  edgePreferenceOpen: 0.5,
  mortalityOpen: 1,
  growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.25 },
} as PointPest;
const strip = makeLandscape({
  nx: 150,
  ny: 3,
  cellM: 100,
  infestedAt: (x) => (x < 3000 ? 1 : 0),
  sites: [{ name: 'beyond', at: (x) => Math.abs(x - 12050) < 60 }],
  bands: [{ id: 'wide cut', inside: (x) => x > 8000 && x < 9000, widthM: 1000 }],
});

const pool = makePoolRunner({ threads: 2 });
afterAll(() => pool.close());

describe('evaluateLandscapeOn', () => {
  it('gives the one-thread result bit for bit, inline and on two worker threads, with progress to the end', async () => {
    const settings = { horizonYears: 8, crossSection: false };
    const one = evaluateLandscape(open, logistic, settings);
    const fractions: number[] = [];
    const inline = await evaluateLandscapeOn(makeInlineRunner(), open, logistic, { ...settings, onProgress: (f) => fractions.push(f) });
    const threads = await evaluateLandscapeOn(pool, open, logistic, settings);
    expect(one.options.map((o) => o.wayPast)).toEqual(['around', 'through']);
    // Wall times differ by where a run ran; everything else must not.
    const strip = (r: typeof one) => JSON.parse(JSON.stringify(r, (k, v) => (k === 'wallMs' ? 0 : ArrayBuffer.isView(v) ? Array.from(v as Float32Array, (x) => (Number.isNaN(x) ? 'NaN' : x)) : v)));
    expect(strip(inline)).toEqual(strip(one));
    expect(strip(threads)).toEqual(strip(one));
    expect(fractions.at(-1)).toBe(1);
    for (let i = 1; i < fractions.length; i++) expect(fractions[i]).toBeGreaterThanOrEqual(fractions[i - 1]);
  });

  it('runs the steady-state continuation of a band that holds as a task, with the same evidence', async () => {
    const settings = { horizonYears: 60, crossSection: false };
    const one = evaluateLandscape(strip, allee, settings);
    const threads = await evaluateLandscapeOn(pool, strip, allee, settings);
    expect(one.options[0].verdict.kind).toBe('holds');
    expect(threads.options[0].pinning).toEqual(one.options[0].pinning);
    expect(threads.options[0].verdict).toEqual(one.options[0].verdict);
  });

  it('stops with a CancelledError when its signal aborts', async () => {
    const c = new AbortController();
    c.abort();
    await expect(evaluateLandscapeOn(pool, open, logistic, { horizonYears: 8, crossSection: false, signal: c.signal })).rejects.toBeInstanceOf(CancelledError);
  });
});
