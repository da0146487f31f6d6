/**
 * The invented demo landscape (scenarios/landscapes/): the committed files are exactly what
 * scenarios/make-landscape.ts generates (regenerated here and compared byte for byte), both demo scenarios
 * validate and load, and the map has what the demo promises (two lakes, a town, farmland, three bands of
 * different length and width, each on host forest).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import { makeDemoLandscape, DEMO_DIR } from '../../../scenarios/make-landscape.ts';
import { parseLandscapeScenario } from '../../../server/model/landscape.ts';
import { loadLandscape, treesInCover } from '../../../server/domain/gis/load.ts';
import { lineLength } from '../../../server/domain/gis/geometry.ts';
import { RASTER_CLASSES } from '../../../server/domain/raster.ts';

const sha = (b: Uint8Array) => createHash('sha256').update(b).digest('hex').slice(0, 16);

describe('demo landscape', async () => {
  const generated = await makeDemoLandscape();

  it('committed files equal a fresh run of the generator (fingerprints)', () => {
    for (const [name, bytes] of Object.entries(generated)) {
      const committed = readFileSync(join(DEMO_DIR, name));
      expect(`${name} ${sha(committed)}`, `regenerate with: npx tsx scenarios/make-landscape.ts`).toBe(`${name} ${sha(bytes)}`);
    }
  });

  it('stays small (each file under 200 KB)', () => {
    for (const [name, bytes] of Object.entries(generated)) expect(bytes.byteLength, name).toBeLessThan(200_000);
  });

  for (const file of ['ossenvale-valley.json', 'ossenvale-valley-stands.json']) {
    it(`${file} validates, states its purpose, is illustrative, and loads onto the model grid`, async () => {
      const s = parseLandscapeScenario(JSON.parse(readFileSync(join(DEMO_DIR, file), 'utf8')));
      expect(s.description).toMatch(/Purpose:/);
      expect(s.pest.illustrative).toBe(true);
      expect(s.region).toMatch(/invented/);
      const files: Record<string, Uint8Array> = {};
      for (const n of Object.keys(generated)) files[n] = readFileSync(join(DEMO_DIR, n));
      const l = await loadLandscape(s, files);
      expect(l.crs.code).toBe('EPSG:32628');
      const count = (k: string) => l.classAtCells.filter((c) => RASTER_CLASSES[c] === k).length;
      expect(count('host')).toBeGreaterThan(0.4 * l.nx * l.ny);
      expect(count('outside')).toBeGreaterThan(0.03 * l.nx * l.ny); // lakes and the town
      expect(count('open')).toBeGreaterThan(0.1 * l.nx * l.ny); // farmland
      expect(l.bands.length).toBe(s.bands.options.length);
      for (const b of l.bands) expect(treesInCover(l, b.cover)).toBeGreaterThan(0);
      if (file === 'ossenvale-valley.json') {
        const lengths = s.bands.options.map((o) => lineLength(o.line as [number, number][]));
        const widths = s.bands.options.map((o) => o.widthM);
        expect(new Set(lengths.map(Math.round)).size).toBe(3);
        expect(new Set(widths).size).toBe(3);
        expect((l.nx * l.cellM) / 1000).toBe(30);
        expect((l.ny * l.cellM) / 1000).toBe(20);
      }
    });
  }
});
