/**
 * Map uploads: every limit stated on the page is enforced with a named error that names the field
 * (upload size, cells ≤ 2 million, a band that misses the forest, an infestation outside the map, an
 * unreadable file, a geographic CRS), answered on the page with the problem by field, never a crash.
 * A valid upload is queued as a durable map evaluation. The GeoTIFFs are the shipped demo files or are
 * written here with the project's writer (its output is checked against gdalinfo in tests/domain/gis/).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import { landscapeApp, runIdOf, waitForLandscape, DEMO_LANDSCAPES_DIR } from './landscape-helpers.ts';
import { writeGeoTiff } from '../../server/domain/gis/geotiff.ts';
import { MAX_MODEL_CELLS } from '../../server/model/landscape.ts';

const demoJson = () => JSON.parse(readFileSync(join(DEMO_LANDSCAPES_DIR, 'ossenvale-valley.json'), 'utf8')) as Record<string, any>;
const HOST = readFileSync(join(DEMO_LANDSCAPES_DIR, 'ossenvale-valley-host.tif'));
const CLASSES = readFileSync(join(DEMO_LANDSCAPES_DIR, 'ossenvale-valley-classes.tif'));

/** A multipart/form-data body as a browser sends it. */
function multipart(parts: { name: string; filename: string; type: string; bytes: Buffer }[]) {
  const boundary = '----landscape-test-boundary';
  const chunks: Buffer[] = [];
  for (const p of parts) {
    chunks.push(Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="${p.name}"; filename="${p.filename}"\r\nContent-Type: ${p.type}\r\n\r\n`));
    chunks.push(p.bytes, Buffer.from('\r\n'));
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return { payload: Buffer.concat(chunks), headers: { 'content-type': `multipart/form-data; boundary=${boundary}` } };
}
const scenarioPart = (s: unknown) => ({ name: 'scenario', filename: 'scenario.json', type: 'application/json', bytes: Buffer.from(JSON.stringify(s)) });
const hostPart = (bytes: Buffer = HOST) => ({ name: 'host', filename: 'host.tif', type: 'image/tiff', bytes });
const classesPart = () => ({ name: 'classes', filename: 'classes.tif', type: 'image/tiff', bytes: CLASSES });

let t: Awaited<ReturnType<typeof landscapeApp>>;
let app: FastifyInstance;
beforeAll(async () => {
  // A low per-file limit for the size check; the demo host raster (≈ 0.1 MB) stays under it.
  t = await landscapeApp({ landscapeUploadBytes: Math.max(HOST.length, CLASSES.length) + 1000 });
  app = t.app;
});
afterAll(async () => t?.close());

const upload = (parts: Parameters<typeof multipart>[0]) => app.inject({ method: 'POST', url: '/landscapes/upload', ...multipart(parts) });

/** The problems box lists `path` with a message matching `re`. */
function expectProblem(html: string, path: string, re: RegExp) {
  const box = /<section class="problems"[\s\S]*?<\/section>/.exec(html)?.[0] ?? '';
  expect(box, html.slice(0, 3000)).toContain(`<code>${path}</code>`);
  expect(box).toMatch(re);
}

describe('map upload limits', () => {
  it('the limits are stated on the page', async () => {
    const r = await app.inject('/landscapes');
    expect(r.body).toContain('id="upload-limits"');
    expect(r.body).toContain(`At most ${MAX_MODEL_CELLS.toLocaleString('en-GB')} model cells`);
    expect(r.body).toMatch(/Each file at most [\d.]+ MB/);
    expect(r.body).toContain('geographic (degree) raster is refused');
  });

  it('a file over the upload size: 413, the field named', async () => {
    const big = Buffer.concat([HOST, Buffer.alloc(5000)]);
    const r = await upload([scenarioPart(demoJson()), hostPart(big), classesPart()]);
    expect(r.statusCode).toBe(413);
    expectProblem(r.body, 'host', /larger than [\d.]+ MB/);
  });

  it('more than 2 million model cells: the cell size field named', async () => {
    const s = demoJson();
    s.map.cellM = 10; // 30 × 20 km at 10 m: 6 million cells
    const r = await upload([scenarioPart(s), hostPart(), classesPart()]);
    expect(r.statusCode).toBe(400);
    expectProblem(r.body, 'map.cellM', /2[ ,]?000[ ,]?000|2 million/);
  });

  it('a band that misses the forest: the band named', async () => {
    const s = demoJson();
    // Along the northern map edge: farmland beyond the forest (no host cell there in the demo map).
    s.bands.options = [{ name: 'On the farmland', line: [[485000, 4029700], [490000, 4029700]], widthM: 200, cover: 'clearing' }];
    const r = await upload([scenarioPart(s), hostPart(), classesPart()]);
    expect(r.statusCode).toBe(400);
    expectProblem(r.body, 'bands.options[0]', /misses the forest/);
  });

  it('an infestation outside the map: the place named', async () => {
    const s = demoJson();
    s.infestation.places = [{ point: [100000, 100000], radiusM: 500 }];
    const r = await upload([scenarioPart(s), hostPart(), classesPart()]);
    expect(r.statusCode).toBe(400);
    expectProblem(r.body, 'infestation.places[0]', /outside the map/);
  });

  it('an unreadable map file: the map file field named', async () => {
    const s = demoJson();
    delete s.map.classes;
    const r = await upload([scenarioPart(s), hostPart(Buffer.from('this is not a GeoTIFF at all'))]);
    expect(r.statusCode).toBe(400);
    expectProblem(r.body, 'map.file', /GeoTIFF|read/i);
  });

  it('a geographic (degree) CRS is refused with a message that says so', async () => {
    const s = demoJson();
    delete s.map.classes;
    s.coordinates = 'lonlat';
    const bytes = await writeGeoTiff({
      nx: 20,
      ny: 10,
      cellM: 0.01,
      originXM: 10,
      originYM: 50,
      crs: { code: 'EPSG:4326', proj4: '+proj=longlat +datum=WGS84 +no_defs', name: 'WGS 84' },
      values: new Float32Array(200).fill(300),
    });
    const r = await upload([scenarioPart(s), hostPart(Buffer.from(bytes))]);
    expect(r.statusCode).toBe(400);
    expectProblem(r.body, 'map.file', /geographic CRS/);
  });

  it('a scenario that is not a landscape scenario, and a missing map file, name their fields', async () => {
    const bad = await upload([scenarioPart({ kind: 'landscape', title: '' })]);
    expect(bad.statusCode).toBe(400);
    expect(bad.body).toContain('<code>title</code>');
    const noMap = await upload([scenarioPart(demoJson())]);
    expect(noMap.statusCode).toBe(400);
    expectProblem(noMap.body, 'host', /map file/);
  });

  it('GeoJSON stands (longitude/latitude) upload and queue too; the stands demo shows its bands in degrees', async () => {
    const s = JSON.parse(readFileSync(join(DEMO_LANDSCAPES_DIR, 'ossenvale-valley-stands.json'), 'utf8'));
    const stands = readFileSync(join(DEMO_LANDSCAPES_DIR, 'ossenvale-valley-stands.geojson'));
    s.map.cellM = 1000; // coarse: the queued run is cancelled below anyway
    const r = await upload([scenarioPart(s), { name: 'host', filename: 'stands.geojson', type: 'application/geo+json', bytes: stands }]);
    expect(r.statusCode, r.body.slice(0, 2000)).toBe(303);
    await app.inject({ method: 'POST', url: `/landscape-runs/${runIdOf(r.headers.location)}/cancel` });
    const page = await app.inject('/landscapes/demo-ossenvale-valley-stands');
    expect(page.statusCode).toBe(200);
    expect(page.body).toContain('longitude latitude [°]');
    const line = /name="band\[0\]\.line"[^>]*>([^<]*)</.exec(page.body)![1];
    const typed = s.bands.options[0].line as number[][];
    const back = line.split(';').map((p) => p.trim().split(' ').map(Number));
    expect(back.length).toBe(typed.length);
    back.forEach((p, k) => {
      expect(Math.abs(p[0] - typed[k][0])).toBeLessThan(1e-6);
      expect(Math.abs(p[1] - typed[k][1])).toBeLessThan(1e-6);
    });
  });

  it('ranges with draws and a transport block: the result page says how sure, and the chance people carry the pest past each band', async () => {
    const s = demoJson();
    s.map.cellM = 600;
    s.pest.diffusionHost = { dist: 'lognormal', median: 1, spread: 1.5 };
    s.uncertainty = { draws: 6, seed: 2 };
    s.transport = { ratePerKm2Year: 0.01, kernel: { shape: 'exponential', meanKm: 8 }, establishmentProbability: 0.2 };
    const r = await upload([scenarioPart(s), hostPart(), classesPart()]);
    expect(r.statusCode, r.body.slice(0, 2000)).toBe(303);
    const id = runIdOf(r.headers.location);
    await waitForLandscape(app, id);
    const page = (await app.inject(`/landscape-runs/${id}`)).body;
    expect(page).toContain('How sure: chance of arrival over the uncertain parameters');
    expect(page).toMatch(/over 6 draws of the uncertain pest parameters \(movement in host forest;/);
    const table = /<section aria-labelledby="sure-title"[\s\S]*?<\/section>/.exec(page)![0];
    // One row per site, a column without a band and one per band, each a percentage with its standard error.
    expect(table.match(/<tr><th scope="row">/g)!.length).toBe(s.sites.length);
    expect(table.match(/\d+ % \(± \d+\)/g)!.length).toBe(s.sites.length * (1 + s.bands.options.length));
    expect(page.match(/People carrying infested wood: /g)!.length).toBe(s.bands.options.length);
  });

  it('a valid upload is queued as a map evaluation and can be cancelled', async () => {
    const r = await upload([scenarioPart(demoJson()), hostPart(), classesPart()]);
    expect(r.statusCode, r.body.slice(0, 2000)).toBe(303);
    const id = runIdOf(r.headers.location);
    const c = await app.inject({ method: 'POST', url: `/landscape-runs/${id}/cancel` });
    expect(c.statusCode).toBe(303);
    for (let k = 0; k < 100; k++) {
      const s = (await app.inject(`/api/landscape-runs/${id}`)).json() as { status: string };
      if (s.status === 'cancelled') break;
      await new Promise((res) => setTimeout(res, 100));
    }
    const page = await app.inject(`/landscape-runs/${id}`);
    expect(page.body).toMatch(/Cancelled/);
  });
});
