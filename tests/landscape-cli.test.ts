/**
 * `npm run evaluate` on a landscape scenario: --json gives per option the verdict, the way past, arrivals
 * and trees removed; --pdf writes a briefing with the maps; a bad map gives the named error and exit 1.
 * A small map written by the test (10 × 6 km at 200 m, logistic test pest) keeps the run short.
 */
import { describe, expect, it, beforeAll, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PEST, uniformHostTiff } from './domain/gis/fixtures.ts';

let dir = '';
const X0 = 500_000, Y0 = 5_800_000;

function scenario(extra: Record<string, unknown> = {}) {
  return {
    kind: 'landscape',
    title: 'Small test map',
    pest: PEST,
    map: { format: 'geotiff', file: 'host.tif', unit: 'share', stemsPerHaAtFullCover: 400 },
    infestation: { places: [{ polygon: [[[X0, Y0 + 2000], [X0 + 1000, Y0 + 2000], [X0 + 1000, Y0 + 4000], [X0, Y0 + 4000]]] }] },
    sites: [{ name: 'East end', place: { point: [X0 + 9500, Y0 + 3000] } }],
    bands: { costPerStem: 10, costUnit: 'credits', options: [{ name: 'Full cut', line: [[X0 + 5000, Y0 - 100], [X0 + 5000, Y0 + 6100]], widthM: 400 }] },
    horizonYears: 8,
    ...extra,
  };
}

const run = (args: string[]) => spawnSync('npx', ['tsx', 'server/cli.ts', ...args], { encoding: 'utf8', cwd: new URL('..', import.meta.url).pathname, maxBuffer: 64 << 20 });

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'landscape-cli-'));
  writeFileSync(join(dir, 'host.tif'), await uniformHostTiff(50, 30, 200, X0, Y0));
  writeFileSync(join(dir, 'small.json'), JSON.stringify(scenario()));
  writeFileSync(join(dir, 'outside.json'), JSON.stringify(scenario({ infestation: { places: [{ point: [X0 + 20_000, Y0], radiusM: 500 }] } })));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('landscape CLI', () => {
  it('--json: per option verdict, way past, arrivals and trees removed (= band area × 400 stems/ha)', () => {
    const r = run([join(dir, 'small.json'), '--json', '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.kind).toBe('landscape');
    expect(doc.map.crs.code).toBe('EPSG:32633');
    const o = doc.options[0];
    expect(o.key).toBe('A');
    expect(typeof o.verdict.kind).toBe('string');
    expect(['through', 'around', 'none']).toContain(o.wayPast);
    expect(o.arrivals[0].site).toBe('East end');
    // The band runs past the map's north and south edges: only the 6 km inside counts, 400 m wide.
    expect(o.bandAreaHa).toBeCloseTo(240, 6);
    expect(o.treesRemoved).toBe(96_000);
    expect(o.cost.total).toBe(960_000);
    expect(doc.result.baseline.arrival.years.length).toBe(1500);
    expect(doc.cautions.join(' ')).toMatch(/regulator/);
  });

  it('--pdf: a briefing with the maps and the footer on every page', () => {
    const pdf = join(dir, 'b.pdf');
    const r = run([join(dir, 'small.json'), '--pdf', pdf, '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    const bytes = readFileSync(pdf);
    expect(bytes.subarray(0, 5).toString()).toBe('%PDF-');
    // The maps' raster layer is embedded as an image only for large grids; this one is drawn as vectors.
    expect(bytes.length).toBeGreaterThan(20_000);
  });

  it('an infestation outside the map: the named error, the field and exit 1, nothing printed on stdout', () => {
    const r = run([join(dir, 'outside.json'), '--json', '--quiet']);
    expect(r.status).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/INFESTATION_OUTSIDE_MAP/);
    expect(r.stderr).toMatch(/infestation\.places\[0\]/);
  });
});
