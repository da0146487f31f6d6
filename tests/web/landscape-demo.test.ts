/**
 * The demo map in the web app, end to end: listed, its page with the band table, "Run" → a durable job →
 * the result page with the answer per option first, the maps side by side, the downloads and the cautions.
 * The downloads are read back by independent readers: the GeoTIFF by the geotiff package and Debian's
 * gdalinfo (gdal-bin; skipped with a message where missing), the GeoJSON as RFC 7946 longitude/latitude.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fromArrayBuffer } from 'geotiff';
import type { FastifyInstance } from 'fastify';
import { landscapeApp, waitForLandscape, runIdOf, DEMO_REF } from './landscape-helpers.ts';
import { formBody } from '../helpers/build-app.ts';
import { gdal, skipWithoutGdal, tempDir } from '../domain/gis/gdal-tools.ts';
import { CAUTIONS } from '../../server/analysis/evaluate/cautions.ts';

let t: Awaited<ReturnType<typeof landscapeApp>>;
let app: FastifyInstance;
let runId = '';
beforeAll(async () => {
  t = await landscapeApp();
  app = t.app;
});
afterAll(async () => t?.close());

describe('demo map in the web app', () => {
  it('is listed with the scenarios and on the maps page', async () => {
    const list = await app.inject('/scenarios');
    expect(list.body).toContain('href="/landscapes"');
    const maps = await app.inject('/landscapes');
    expect(maps.statusCode).toBe(200);
    expect(maps.body).toContain(`/landscapes/${DEMO_REF}`);
    expect(maps.body).toContain('400 m model cells');
    expect(maps.body).toContain('2,000,000 model cells');
  });

  it('its page shows the map preview and the band table with the three options', async () => {
    const r = await app.inject(`/landscapes/${DEMO_REF}`);
    expect(r.statusCode).toBe(200);
    expect(r.body).toContain('<svg');
    expect(r.body).toContain('id="band-preview"');
    for (const k of [0, 1, 2]) expect(r.body).toContain(`name="band[${k}].line"`);
    expect(r.body).not.toContain('name="band[3].line"');
    expect(r.body).toContain('Neck cut, lake to lake');
  });

  it('Run starts a durable job that finishes with the answer first, the maps, the downloads and the cautions', async () => {
    const page = await app.inject(`/landscapes/${DEMO_REF}`);
    // The form as a browser posts it: every row's fields, as printed on the page.
    const fields: Record<string, string> = { bandCount: '3', action: 'run' };
    for (const m of page.body.matchAll(/name="(band\[\d\]\.(?:name|widthM))" value="([^"]*)"/g)) fields[m[1]] = m[2].replace(/&#x27;/g, "'").replace(/&amp;/g, '&');
    for (const m of page.body.matchAll(/name="(band\[\d\]\.line)"[^>]*>([^<]*)</g)) fields[m[1]] = m[2];
    const r = await app.inject({ method: 'POST', url: `/landscapes/${DEMO_REF}/bands`, headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: formBody(fields) });
    expect(r.statusCode, r.body.slice(0, 2000)).toBe(303);
    runId = runIdOf(r.headers.location);
    const progress = await app.inject(`/landscape-runs/${runId}`);
    expect(progress.statusCode).toBe(200);
    const end = await waitForLandscape(app, runId);
    expect(end.status, JSON.stringify(end)).toBe('done');
    const res = await app.inject(`/landscape-runs/${runId}`);
    const html = res.body;
    // Answer first: the options section comes before the maps and the downloads.
    const iAnswer = html.indexOf('id="answer"');
    const iMaps = html.indexOf('id="maps-title"');
    const iDown = html.indexOf('id="downloads"');
    expect(iAnswer).toBeGreaterThan(0);
    expect(iAnswer).toBeLessThan(iMaps);
    expect(iMaps).toBeLessThan(iDown);
    for (const k of ['A', 'B', 'C']) expect(html).toContain(`id="option-${k}"`);
    expect(html).toMatch(/The way past:<\/strong> (through the band|around its ends|not past within the horizon)/);
    expect(html).toContain('breeding population');
    expect(html).toContain('thin fringe');
    expect(html).toContain('Trees removed:');
    // The demo's short mid-neck cut leaves open ground at both ends: the pest goes around it.
    expect(html).toMatch(/id="option-B"[\s\S]*?The way past:<\/strong> around its ends/);
    expect((html.match(/<svg/g) ?? []).length).toBeGreaterThanOrEqual(4);
    expect(html).toContain('This web run uses 400 m model cells');
    // The cautions deferring to local regulators and licensed practice, as on transect pages.
    for (const c of CAUTIONS) expect(html).toContain(c.replace(/'/g, '&#x27;'));
  }, 180_000);

  it('the arrival GeoTIFF reads back in the map CRS (geotiff package, gdalinfo)', async () => {
    expect(runId).not.toBe('');
    const r = await app.inject(`/landscape-runs/${runId}/files/arrival-baseline.tif`);
    expect(r.statusCode).toBe(200);
    expect(r.headers['content-type']).toBe('image/tiff');
    const bytes = r.rawPayload;
    const tiff = await fromArrayBuffer(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
    const img = await tiff.getImage();
    const doc = JSON.parse((await app.inject(`/landscape-runs/${runId}/files/result.json`)).body) as { map: { nx: number; ny: number; cellM: number; originXM: number; originYM: number } };
    expect(img.getWidth()).toBe(doc.map.nx);
    expect(img.getHeight()).toBe(doc.map.ny);
    expect(img.getResolution()[0]).toBe(doc.map.cellM);
    expect(img.getOrigin().slice(0, 2)).toEqual([doc.map.originXM, doc.map.originYM]);
    if (skipWithoutGdal('the web GeoTIFF download check')) return;
    const tmp = tempDir();
    try {
      const f = join(tmp.dir, 'arrival.tif');
      writeFileSync(f, bytes);
      const info = JSON.parse(gdal('gdalinfo', ['-json', f])) as { size: number[]; geoTransform: number[]; coordinateSystem?: { wkt: string } };
      expect(info.size).toEqual([doc.map.nx, doc.map.ny]);
      expect(info.geoTransform[0]).toBe(doc.map.originXM);
      expect(info.geoTransform[3]).toBe(doc.map.originYM);
      expect(info.geoTransform[1]).toBe(doc.map.cellM);
      expect(info.coordinateSystem?.wkt ?? '').toMatch(/UTM|Transverse_Mercator/i);
    } finally {
      tmp.done();
    }
  });

  it('the fronts and bands GeoJSON are in longitude/latitude (RFC 7946) around the invented valley', async () => {
    for (const name of ['fronts.geojson', 'bands.geojson']) {
      const r = await app.inject(`/landscape-runs/${runId}/files/${name}`);
      expect(r.statusCode).toBe(200);
      const fc = r.json() as { type: string; features: { geometry: { coordinates: unknown } }[] };
      expect(fc.type).toBe('FeatureCollection');
      expect(fc.features.length).toBeGreaterThan(0);
      const flat = JSON.stringify(fc.features.map((f) => f.geometry.coordinates)).match(/-?\d+(\.\d+)?(e-?\d+)?/g)!.map(Number);
      for (let k = 0; k + 1 < flat.length; k += 2) {
        expect(Math.abs(flat[k])).toBeLessThanOrEqual(180);
        expect(Math.abs(flat[k + 1])).toBeLessThanOrEqual(90);
      }
    }
    const pdf = await app.inject(`/landscape-runs/${runId}/files/briefing.pdf`);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect(pdf.rawPayload.subarray(0, 5).toString()).toBe('%PDF-');
    expect((await app.inject(`/landscape-runs/${runId}/files/nothing.tif`)).statusCode).toBe(404);
  });
});
