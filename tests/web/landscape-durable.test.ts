/**
 * Map evaluations are durable like transect runs: the job row is in the database before the answer, a
 * server stopped while the map is computed leaves it queued, and the next start takes it up again and
 * finishes it (the transect runner leaves it alone); the result page works from the database afterwards.
 */
import { describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { landscapeApp, waitForLandscape, runIdOf, DEMO_REF } from './landscape-helpers.ts';
import { formBody } from '../helpers/build-app.ts';

describe('durable map evaluations', () => {
  it('a map evaluation interrupted by a stop resumes at the next start and finishes', async () => {
    const first = await landscapeApp({}, { keep: true });
    const root = first.root;
    try {
      // Run the demo with one band only (quicker), from the band table.
      const fields = { bandCount: '1', 'band[0].name': 'Neck cut', 'band[0].cover': 'clearing', 'band[0].widthM': '600', 'band[0].line': '495300 4016000; 495100 4019500; 495000 4023300', action: 'run' };
      const r = await first.app.inject({ method: 'POST', url: `/landscapes/${DEMO_REF}/bands`, headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: formBody(fields) });
      expect(r.statusCode, r.body.slice(0, 1500)).toBe(303);
      const id = runIdOf(r.headers.location);
      await new Promise((res) => setTimeout(res, 1500));
      const before = (await first.app.inject(`/api/landscape-runs/${id}`)).json() as { status: string };
      expect(['queued', 'running']).toContain(before.status);
      await first.close();

      const second = await landscapeApp({}, { root, keep: true });
      try {
        const end = await waitForLandscape(second.app, id);
        expect(end.status, JSON.stringify(end)).toBe('done');
        expect(end.resumed).toBe(1);
        const page = await second.app.inject(`/landscape-runs/${id}`);
        expect(page.body).toContain('id="option-A"');
        expect(page.body).not.toContain('id="option-B"');
      } finally {
        await second.close();
      }
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  }, 180_000);
});
