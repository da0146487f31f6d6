/**
 * PDF briefings for stored results, rendered in a worker thread (server/web/briefing-worker.ts) so the
 * server keeps answering while a briefing is drawn. One thread: briefings are short and rare.
 */
import { Piscina } from 'piscina';
import type { ResultDocument } from '../analysis/result.ts';
import type { Scenario } from '../model/scenario.ts';
import type { BriefingTask } from './briefing-worker.ts';
import { tsxLoaderUrl } from './jobs.ts';
import { InputError } from '../model/errors.ts';
import { briefingTextProblems } from '../report/pdf/fonts.ts';

/** Longest a briefing may take before the request is answered with an error [ms]. */
const BRIEFING_TIMEOUT_MS = 60_000;

export interface BriefingRenderer {
  render(document: ResultDocument, scenario: Scenario): Promise<Buffer>;
  close(): Promise<void>;
}

export function makeBriefingRenderer(): BriefingRenderer {
  const pool = new Piscina<BriefingTask, Uint8Array>({
    filename: new URL('./briefing-worker.ts', import.meta.url).href,
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: 60_000,
    execArgv: ['--import', tsxLoaderUrl()],
  });
  return {
    async render(document, scenario) {
      // Text the briefing's fonts cannot draw is refused by field, before any drawing (report/pdf/fonts.ts).
      const unsupported = briefingTextProblems(scenario);
      if (unsupported.length) throw Object.assign(new InputError('TEXT_NOT_DRAWABLE', unsupported), { statusCode: 422 });
      const bytes = await pool.run({ document, scenario, creationDate: new Date().toISOString() }, { signal: AbortSignal.timeout(BRIEFING_TIMEOUT_MS) });
      return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    },
    close: () => pool.destroy(),
  };
}
