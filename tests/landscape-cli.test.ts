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
  // Movement uncertain (log-normal): the slowest draws do not reach the east end within 8 years, the fastest do
  // (Fisher speed 2√(rD) needs D ≳ 0.35 km²/yr to cover the 8.5 km in time).
  writeFileSync(join(dir, 'ranges.json'), JSON.stringify(scenario({ pest: { ...PEST, diffusionHost: { dist: 'lognormal', median: 0.4, spread: 2 } }, uncertainty: { draws: 12, seed: 5 } })));
  writeFileSync(join(dir, 'carried.json'), JSON.stringify(scenario({ transport: { ratePerKm2Year: 0.02, kernel: { shape: 'exponential', meanKm: 5 }, establishmentProbability: 0.3 } })));
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

  it('with ranges and draws: the chance each site is reached, without a band and with each, in JSON, text and PDF', () => {
    const r = run([join(dir, 'ranges.json'), '--json', '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    const e = JSON.parse(r.stdout).ensemble;
    expect(e.draws).toBe(12);
    expect(e.parameters.map((p: { path: string }) => p.path)).toEqual(['pest.diffusionHost']);
    const base = e.baseline[0];
    expect(base.site).toBe('East end');
    // Both outcomes occur over the range; the standard error is the binomial one.
    expect(base.p).toBeGreaterThan(0);
    expect(base.p).toBeLessThan(1);
    expect(base.standardError).toBeCloseTo(Math.sqrt((base.p * (1 - base.p)) / 12), 12);
    // A band across the whole map can only delay: never more draws reached with it than without.
    expect(e.options[0].sites[0].p).toBeLessThanOrEqual(base.p);
    const w = e.options[0].wayPast;
    expect(w.through + w.around + w.none).toBe(12);
    const text = run([join(dir, 'ranges.json'), '--quiet']);
    expect(text.status, text.stderr).toBe(0);
    expect(text.stdout).toMatch(/Chance that each site is reached within 8 years, over 12 draws/);
    expect(text.stdout).toMatch(new RegExp(`East end: ${Math.round(100 * base.p)} % \\(± ${Math.round(100 * base.standardError)}\\)`));
    const pdf = run([join(dir, 'ranges.json'), '--pdf', join(dir, 'ranges.pdf'), '--quiet']);
    expect(pdf.status, pdf.stderr).toBe(0);
  });

  it('with a transport block: the chance people carry the pest past each band, in JSON and in words', () => {
    const r = run([join(dir, 'carried.json'), '--json', '--quiet']);
    expect(r.status, r.stderr).toBe(0);
    const t = JSON.parse(r.stdout).options[0].transport;
    expect(t.expectedColonies).toBeGreaterThan(0);
    expect(t.probability).toBeCloseTo(1 - Math.exp(-t.expectedColonies), 12);
    const text = run([join(dir, 'carried.json'), '--quiet']);
    expect(text.stdout).toContain(`People carrying infested wood: ${Math.round(100 * t.probability)} % chance that at least one carried introduction founds a colony behind the band within 8 years`);
  });

  it('an infestation outside the map: the named error, the field and exit 1, nothing printed on stdout', () => {
    const r = run([join(dir, 'outside.json'), '--json', '--quiet']);
    expect(r.status).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/INFESTATION_OUTSIDE_MAP/);
    expect(r.stderr).toMatch(/infestation\.places\[0\]/);
  });
});
