/**
 * `npm run fit` on the demo landscape map with its invented survey records (scenarios/landscapes/
 * ossenvale-valley.records.csv, made by scenarios/generate-map-survey-records.ts from a known movement rate).
 * The fit must bracket the truth, flag the planted long-distance detection, say that the ground is mixed,
 * and write a landscape scenario that validates with the fitted range adopted.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../server/fit-cli.ts';
import { parseLandscapeScenario } from '../server/model/landscape.ts';
import { surveyToCsv } from '../server/model/survey.ts';
import type { MapCalibrationResult } from '../server/analysis/calibration/map-fit.ts';
import { MAP_RECORDS_FILE, MAP_SCENARIO_FILE, MAP_TRUTH, generateMapRecords } from '../scenarios/generate-map-survey-records.ts';

describe('npm run fit on a landscape map', () => {
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'fit-map-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('the demo records are what the generator makes (seeded engine run)', async () => {
    expect(surveyToCsv(await generateMapRecords())).toBe(readFileSync(MAP_RECORDS_FILE, 'utf8'));
  });

  it('brackets the true movement rate, flags the planted record, notes the mixed ground, writes a valid scenario', async () => {
    const out = join(dir, 'fitted.json');
    let stdout = '';
    let stderr = '';
    const code = await main([MAP_SCENARIO_FILE, MAP_RECORDS_FILE, '--out', out, '--json'], (s) => (stdout += s), (s) => (stderr += s));
    expect(stderr).toBe('');
    expect(code).toBe(0);
    const fit = JSON.parse(stdout) as MapCalibrationResult;
    const d = fit.parameters[0];
    expect(d.identifiable).toBe(true);
    expect(d.interval90![0]).toBeLessThanOrEqual(MAP_TRUTH.diffusionHost);
    expect(d.interval90![1]).toBeGreaterThanOrEqual(MAP_TRUTH.diffusionHost);
    expect(fit.flagged).toHaveLength(1);
    expect(fit.flagged[0]).toMatchObject({ year: MAP_TRUTH.planted.year, x: MAP_TRUTH.planted.x, y: MAP_TRUTH.planted.y });
    expect(fit.messages.join(' ')).toMatch(/not host forest/);
    const adopted = parseLandscapeScenario(JSON.parse(readFileSync(out, 'utf8')));
    expect(adopted.pest.diffusionHost).toMatchObject({ dist: 'lognormal' });
    expect(adopted.calibration?.sentence).toMatch(/radial spread of \d+ detections \(\d+ survey records\), 2019–2025/);
  });

  it('transect-only options are refused on a map, naming the option', async () => {
    let stderr = '';
    const code = await main([MAP_SCENARIO_FILE, MAP_RECORDS_FILE, '--start', '0:1', '--out', join(dir, 'x.json')], () => {}, (s) => (stderr += s));
    expect(code).toBe(1);
    expect(stderr).toMatch(/--start.*transects only/);
  });
});
