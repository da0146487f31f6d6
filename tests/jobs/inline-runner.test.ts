import { describe, expect, it } from 'vitest';
import { makeInlineRunner } from '../../server/jobs/inline-runner.ts';
import { registerTask } from '../../server/jobs/tasks.ts';
import { CancelledError } from '../../server/jobs/task-runner.ts';

registerTask('test-square', (n: number) => n * n);

describe('inline runner', () => {
  it('returns results in payload order and reports each', async () => {
    const runner = makeInlineRunner();
    const seen: [number, number][] = [];
    const out = await runner.map<number, number>('test-square', [3, 1, 2], { onResult: (i, r) => seen.push([i, r]) });
    expect(out).toEqual([9, 1, 4]);
    expect(seen).toEqual([[0, 9], [1, 1], [2, 4]]);
  });
  it('rejects an unknown kind by name and stops on abort', async () => {
    const runner = makeInlineRunner();
    await expect(runner.map('no-such-kind', [1])).rejects.toThrow(/no-such-kind/);
    const ac = new AbortController();
    ac.abort();
    await expect(runner.map('test-square', [1], { signal: ac.signal })).rejects.toBeInstanceOf(CancelledError);
  });
});
