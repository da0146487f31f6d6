import { describe, expect, it } from 'vitest';
import { parseArgs, progressBar } from '../server/cli.ts';

describe('CLI progress bar and ensemble options', () => {
  it('shows the stage, the percentage and, once there is enough to go on, the time left', () => {
    const out: string[] = [];
    let now = 0;
    const bar = progressBar(true, (s) => out.push(s), () => now);
    bar(0.01, 'baseline');
    now = 10_000;
    bar(0.5, 'ensemble draw 500/1000');
    now = 20_000;
    bar(1, 'done');
    expect(out[0]).toMatch(/\[\.+\]\s+1 % baseline/);
    // 10 s for half the work: about 10 s left.
    expect(out[1]).toMatch(/50 % ensemble draw 500\/1000, about 10 s left/);
    expect(out[2]).toMatch(/\[#{30}\] 100 % done/);
    expect(out[out.length - 1]).toBe('\n');
  });

  it('is silent when disabled (not a terminal, or --quiet)', () => {
    const out: string[] = [];
    progressBar(false, (s) => out.push(s))(0.5, 'x');
    expect(out).toEqual([]);
  });

  it('--threads takes a whole number from 1 to 256', () => {
    expect(parseArgs(['a.json', '--threads', '2']).threads).toBe(2);
    expect(() => parseArgs(['a.json', '--threads', '0'])).toThrow(/--threads/);
    expect(() => parseArgs(['a.json', '--threads', 'many'])).toThrow(/whole number/);
  });
});
