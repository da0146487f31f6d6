/**
 * PDF briefings as durable jobs: a request is in the database before the 202 answer, the PDF is kept with
 * the job and a second request reuses it; a briefing left unfinished by a stopped server is drawn at the
 * next start ("resumed"); the result page's download link goes through the same job.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildApp } from '../../server/app.ts';
import { openStore } from '../../server/web/store.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import { parseScenario } from '../../server/model/scenario.ts';
import { smallEnsembleScenario } from '../analysis/ensemble/ensemble-fixture.ts';
import { FIXTURE_SCENARIOS_DIR } from '../helpers/build-app.ts';

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

/** A data folder holding one stored result (computed here, not through the web). */
function folderWithResult(): { dataDir: string; resultId: string } {
  const dataDir = mkdtempSync(join(tmpdir(), 'barrier-briefing-jobs-'));
  dirs.push(dataDir);
  const scenario = parseScenario(smallEnsembleScenario({ uncertainty: undefined, transport: undefined }));
  const store = openStore(dataDir);
  const saved = store.saveResult({ scenarioRef: null, scenario, document: evaluateScenario(scenario) });
  store.close();
  return { dataDir, resultId: saved.id };
}
const app = (dataDir: string) => buildApp({ scenariosDir: FIXTURE_SCENARIOS_DIR, dataDir, workerThreads: 1, ensembleThreads: 1 });

async function waitDone(a: Awaited<ReturnType<typeof app>>, id: string) {
  for (let i = 0; i < 1200; i++) {
    const s = (await a.inject(`/api/briefings/${id}`)).json();
    if (s.finished) return s;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error('briefing did not finish');
}

describe('durable briefings', () => {
  it('a request is stored before the 202; the PDF is kept and a second request reuses the job', async () => {
    const { dataDir, resultId } = folderWithResult();
    const a = await app(dataDir);
    try {
      const posted = await a.inject({ method: 'POST', url: `/api/results/${resultId}/briefings` });
      expect(posted.statusCode).toBe(202);
      const job = posted.json();
      expect(posted.headers.location).toBe(`/api/briefings/${job.id}`);
      expect(job).toMatchObject({ resultId, finished: false, pdfUrl: null, resumed: false });
      // In the database at once (a second connection sees the row).
      const store = openStore(dataDir);
      expect(store.jobs.get(job.id)).toMatchObject({ kind: 'briefing' });
      expect(store.jobs.briefings.resultOf(job.id)).toBe(resultId);
      store.close();
      const done = await waitDone(a, job.id);
      expect(done.status).toBe('done');
      const pdf = await a.inject(done.pdfUrl);
      expect(pdf.statusCode).toBe(200);
      expect(pdf.headers['content-type']).toBe('application/pdf');
      expect(pdf.rawPayload.subarray(0, 5).toString()).toBe('%PDF-');
      const again = await a.inject({ method: 'POST', url: `/api/results/${resultId}/briefings` });
      expect(again.json()).toMatchObject({ id: job.id, status: 'done' });
      // The page's link is served from the same job.
      const link = await a.inject(`/results/${resultId}/briefing.pdf`);
      expect(link.statusCode).toBe(200);
      expect(Buffer.compare(link.rawPayload, pdf.rawPayload)).toBe(0);
      expect((await a.inject({ method: 'POST', url: '/api/results/no-such-result/briefings' })).statusCode).toBe(404);
      expect((await a.inject('/api/briefings/no-such-job')).statusCode).toBe(404);
    } finally {
      await a.close();
    }
  });

  it('a briefing a stopped server had not drawn yet is drawn at the next start (resumed)', async () => {
    const { dataDir, resultId } = folderWithResult();
    const a = await app(dataDir);
    const id = (await a.inject({ method: 'POST', url: `/api/results/${resultId}/briefings` })).json().id as string;
    await a.close(); // at once: the drawing thread is still starting
    const store = openStore(dataDir);
    const left = store.jobs.get(id)!;
    store.close();
    expect(['queued', 'running']).toContain(left.status);

    const b = await app(dataDir);
    try {
      const done = await waitDone(b, id);
      expect(done).toMatchObject({ status: 'done', resumed: true, resultId });
      const pdf = await b.inject(`/api/briefings/${id}/pdf`);
      expect(pdf.rawPayload.subarray(0, 5).toString()).toBe('%PDF-');
    } finally {
      await b.close();
    }
  });
});
