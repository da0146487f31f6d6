/**
 * Command line: `npm run evaluate -- <scenario.json> [--json] [--out FILE]`. Invalid input names the field
 * path, the value and the allowed range and exits non-zero; --out never leaves a half-written file;
 * --json prints a result document that parses. (Common practice for command-line tools, no source.)
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main, parseArgs } from '../server/cli.ts';
import { RESULT_VERSION, type ResultDocument } from '../server/analysis/result.ts';

const root = fileURLToPath(new URL('..', import.meta.url));
const quick = join(root, 'tests/fixtures/quick-scenario.json');
const bad = (name: string) => join(root, 'tests/model/bad-scenarios', name);

/** Runs `npm run evaluate -- ...args` as a user would. */
function npmEvaluate(args: string[]) {
  return spawnSync('npm', ['run', '-s', 'evaluate', '--', ...args], { cwd: root, encoding: 'utf8', maxBuffer: 64 << 20 });
}

/** Captures what main() writes to stdout and stderr. */
function capture() {
  const out: string[] = [];
  const err: string[] = [];
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => (out.push(String(s)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => (err.push(String(s)), true));
  return {
    stdout: () => out.join(''),
    stderr: () => err.join(''),
    restore: () => {
      o.mockRestore();
      e.mockRestore();
    },
  };
}

describe('npm run evaluate (spawned as a user runs it)', () => {
  it('a bad scenario exits non-zero and names field path, value and allowed range', () => {
    const r = npmEvaluate([bad('negative-diffusion.json'), '--quiet']);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('pest.diffusionOpen = -0.5: must be > 0 and ≤ 1000 km²/yr');
    expect(r.stdout).toBe('');
    expect(r.stderr).not.toMatch(/at .*\.ts:\d+/); // no stack trace
  });

  it('--json prints a result document that parses', () => {
    const r = npmEvaluate([quick, '--json', '--quiet', '--threads', '1']);
    expect(r.status, r.stderr).toBe(0);
    const doc = JSON.parse(r.stdout) as ResultDocument;
    expect(doc.resultVersion).toBe(RESULT_VERSION);
    expect(doc.baseline.arrivals.map((a) => a.name)).toEqual(['Wendle school', 'Carrow mill']);
    expect(doc.baseline.numerics.status).toBe('completed');
    expect(doc.options).toHaveLength(1);
  });
});

describe('evaluate command (in process)', () => {
  let dir: string;
  let io: ReturnType<typeof capture>;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'cli-test-'));
    io = capture();
  });
  afterEach(() => {
    io.restore();
    rmSync(dir, { recursive: true, force: true });
  });

  it('each kind of bad input exits 1 and prints one line per problem with path, value and range', async () => {
    const cases: [string, string][] = [
      ['edge-preference-above-one.json', 'pest.edgePreferenceOpen = 1.2: must be ≥ 0.000001 and ≤ 0.999999'],
      ['horizon-too-long.json', 'horizonYears = 10000: must be > 0 and ≤ 500 yr'],
      ['overlapping-segments.json', 'transect.segments[1].fromKm = 8: overlaps the previous segment'],
      ['zero-length-segment.json', 'transect.segments[1].lengthKm = 0: must be ≥ 0.001 and ≤ 5000 km'],
      ['unknown-field.json', 'pest.diffusionForest = 0.5: is not a known field'],
      ['not-json.json', 'is not valid JSON'],
      ['unknown-growth-form.json', 'pest.growth.form = "gompertz": must be one of "logistic", "allee-cubic", "mate-finding"'],
      ['too-many-cells.json', 'numerics.cellM = 1: gives about'],
    ];
    for (const [file, line] of cases) {
      const code = await main([bad(file), '--quiet', '--threads', '1']);
      expect(code, file).toBe(1);
      expect(io.stderr(), file).toContain(line);
    }
    expect(io.stdout()).toBe('');
  });

  it('--out with an invalid scenario writes nothing and keeps an existing file untouched', async () => {
    const target = join(dir, 'result.json');
    expect(await main([bad('site-inside-infestation.json'), '--json', '--out', target, '--quiet'])).toBe(1);
    expect(readdirSync(dir)).toEqual([]);
    writeFileSync(target, 'previous result');
    expect(await main([bad('too-many-time-steps.json'), '--json', '--out', target, '--quiet'])).toBe(1);
    expect(readFileSync(target, 'utf8')).toBe('previous result');
    expect(readdirSync(dir)).toEqual(['result.json']);
  });

  it('--out writes the whole document atomically (no temporary file left) and it parses', async () => {
    const target = join(dir, 'result.json');
    expect(await main([quick, '--json', '--out', target, '--quiet', '--threads', '1'])).toBe(0);
    expect(readdirSync(dir)).toEqual(['result.json']);
    const doc = JSON.parse(readFileSync(target, 'utf8')) as ResultDocument;
    expect(doc.title).toMatch(/Verification fixture/);
    expect(io.stdout()).toBe('');
  });

  it('--out into a folder that does not exist fails cleanly, with nothing written', async () => {
    const target = join(dir, 'missing-folder', 'result.json');
    expect(await main([quick, '--out', target, '--quiet', '--threads', '1'])).toBe(1);
    expect(existsSync(target)).toBe(false);
    expect(io.stderr()).toMatch(/evaluation failed|ENOENT/);
  });

  it('an output path that cannot be written is refused before evaluating: the option and folder are named, nothing is written', async () => {
    // Regression: `--pdf /nonexistent/dir/b.pdf` ran the whole evaluation, then said "evaluation failed: ENOENT ...
    // '/nonexistent/dir/.b.pdf.<pid>.tmp'" (an internal temporary name); with `--pdf ok.pdf --out missing/x.json`
    // the briefing was written and the run still failed.
    const missing = join(dir, 'missing-folder');
    expect(await main([quick, '--pdf', join(missing, 'b.pdf'), '--quiet', '--threads', '1'])).toBe(1);
    expect(io.stderr()).toContain(`--pdf ${join(missing, 'b.pdf')}`);
    expect(io.stderr()).toContain(`folder ${missing} does not exist`);
    expect(io.stderr()).not.toMatch(/\.tmp|evaluation failed/);
    expect(await main([quick, '--pdf', join(dir, 'ok.pdf'), '--out', join(missing, 'x.json'), '--quiet', '--threads', '1'])).toBe(1);
    expect(io.stderr()).toContain(`--out ${join(missing, 'x.json')}`);
    expect(readdirSync(dir)).toEqual([]);
    // A folder given as the output file.
    expect(await main([quick, '--json', '--out', dir, '--quiet', '--threads', '1'])).toBe(1);
    expect(io.stderr()).toContain(`--out ${dir}: is a folder`);
    expect(readdirSync(dir)).toEqual([]);
    // A folder that refuses new files although it looks writable (/proc as root): the late write failure
    // names the option and file, not a temporary file.
    if (existsSync('/proc/self')) {
      expect(await main([quick, '--out', '/proc/self/x.json', '--quiet', '--threads', '1'])).toBe(1);
      expect(io.stderr()).toContain('cannot write --out /proc/self/x.json');
      expect(io.stderr()).not.toMatch(/\.tmp|evaluation failed/);
    }
    expect(io.stdout()).toBe('');
  });

  it('a scenario file that cannot be read says why in words, not only by error code (regression)', async () => {
    expect(await main([join(dir, 'nope.json'), '--quiet'])).toBe(1);
    expect(io.stderr()).toContain('nope.json: ENOENT (no such file)');
    expect(await main([dir, '--quiet'])).toBe(1);
    expect(io.stderr()).toContain(`${dir}: EISDIR (a folder, not a file)`);
  });

  it('the readable summary shows fronts, measured spread rate, arrivals and host remaining', async () => {
    expect(await main([quick, '--quiet', '--threads', '1'])).toBe(0);
    const text = io.stdout();
    expect(text).toContain('Front position over time');
    expect(text).toMatch(/Measured spread rate rightwards: [\d.]+ km\/yr/);
    expect(text).toMatch(/Wendle school \(km 12\.00\): year [\d.]+/);
    expect(text).toMatch(/Host remaining at year 10\.0: \d+ % of host stems/);
    expect(text).toMatch(/regulator/);
  });

  it('usage errors: unknown option (exit 2), missing file (exit 1)', async () => {
    expect(await main([quick, '--jsn'])).toBe(2);
    expect(io.stderr()).toContain('--jsn');
    expect(await main([join(dir, 'nope.json')])).toBe(1);
    expect(io.stderr()).toMatch(/cannot read scenario file .*nope\.json: ENOENT/);
    expect(() => parseArgs(['a.json', 'b.json'])).toThrow(/only one scenario file/);
  });
});
