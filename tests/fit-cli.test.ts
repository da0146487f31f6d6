/**
 * Command line: `npm run fit -- <scenario.json> <records.csv> [--start FROM:TO] [--out FILE] [--json]`.
 * Prints the fit, writes the scenario with the fitted ranges (a file that validates), and answers bad
 * input with the field, the value and what is allowed, exit code 1, nothing written.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main, parseFitArgs } from '../server/fit-cli.ts';
import { parseScenarioText } from '../server/model/scenario.ts';

const root = fileURLToPath(new URL('..', import.meta.url));
const scenario = join(root, 'scenarios/survey-fit.json');
const records = join(root, 'scenarios/survey-fit.records.csv');

describe('npm run fit', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'fit-cli-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('spawned as a user runs it: prints the fit and writes the updated scenario', () => {
    // The demo with its edge preference held at one value: one profile of D instead of five (keeps the test quick).
    const demo = JSON.parse(readFileSync(scenario, 'utf8'));
    demo.pest.edgePreferenceOpen = 0.8;
    const input = join(dir, 'demo.json');
    writeFileSync(input, JSON.stringify(demo));
    const out = join(dir, 'fitted.json');
    const r = spawnSync('npm', ['run', '-s', 'fit', '--', input, records, '--start', '0:1', '--out', out], { cwd: root, encoding: 'utf8' });
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/Movement in host forest: [\d.]+ km²\/yr \(90 % range [\d.]+–[\d.]+\)/);
    expect(r.stdout).toMatch(/possible human-carried introduction/);
    expect(r.stdout).toMatch(/regulator/);
    const adopted = parseScenarioText(readFileSync(out, 'utf8'));
    expect(adopted.calibration?.sentence).toMatch(/fitted to \d+ detections \(\d+ survey records\), 2019–2025/);
    expect(adopted.pest.diffusionHost).toMatchObject({ dist: 'lognormal' });
  }, 120_000);

  it('bad records: the row and column, exit 1, nothing written', async () => {
    const bad = join(dir, 'bad.csv');
    writeFileSync(bad, 'year,km,detected\n2020,1,yes\n2021,99,yes\n2019,2,no\n');
    const out = join(dir, 'out.json');
    const err: string[] = [];
    const code = await main([scenario, bad, '--out', out], () => {}, (s) => err.push(s));
    expect(code).toBe(1);
    expect(err.join('')).toContain('rows[3].km = 99: is off the transect: must be within [0, 32.3] km');
    expect(err.join('')).toContain('rows[4].year = 2019: is out of order');
    expect(existsSync(out)).toBe(false);
  });

  it('arguments: two files, --start as FROM:TO', () => {
    expect(parseFitArgs([scenario, records, '--start', '0:1.5', '--json'])).toMatchObject({ start: { fromKm: 0, toKm: 1.5 }, json: true });
    expect(() => parseFitArgs([scenario])).toThrow(/need a scenario file and a records file/);
    expect(() => parseFitArgs([scenario, records, '--start', '2:1'])).toThrow(/FROM:TO/);
    expect(() => parseFitArgs([scenario, records, '--adopt'])).toThrow(/not a known option/);
  });
});
