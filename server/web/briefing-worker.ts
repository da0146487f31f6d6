/**
 * Worker-thread entry (piscina) for PDF briefings: rendering takes about a second of computing, so it runs
 * off the request thread. Returns the PDF bytes (transferred, not copied).
 */
import { Piscina } from 'piscina';
import { renderBriefing } from '../report/briefing.ts';
import type { ResultDocument } from '../analysis/result.ts';
import type { Scenario } from '../model/scenario.ts';

export interface BriefingTask {
  document: ResultDocument;
  scenario: Scenario;
  /** ISO date of the PDF's creation stamp. */
  creationDate: string;
}

export default async function briefingTask(task: BriefingTask): Promise<Uint8Array> {
  const pdf = await renderBriefing(task.document, { scenario: task.scenario, creationDate: new Date(task.creationDate) });
  const bytes = new Uint8Array(pdf.buffer, pdf.byteOffset, pdf.byteLength).slice();
  return Piscina.move(bytes) as unknown as Uint8Array;
}
