/**
 * Durable web jobs: every accepted evaluation (and briefing) is a row before the server answers 202, with its exact
 * scenario, its state and the pieces of work already finished (the central-value document and each chunk
 * of ensemble draws, stored as they finish). On start the server resumes what was queued or running from
 * these rows (server/web/jobs.ts, server/web/briefings.ts). A briefing job's row links to the result it
 * draws and, once drawn, holds the PDF (briefing_jobs). Tables live in the same SQLite database as scenarios and results.
 */
import type Database from 'better-sqlite3';
import type { Problem } from '../model/errors.ts';
import type { Scenario } from '../model/scenario.ts';

export type StoredJobStatus = 'queued' | 'running' | 'cancelling' | 'done' | 'cancelled' | 'failed';

export interface StoredJob {
  id: string;
  /** What the job computes ('evaluation'; an ensemble is an evaluation with an uncertainty block). */
  kind: string;
  status: StoredJobStatus;
  title: string;
  scenarioRef: string | null;
  scenario: Scenario;
  createdAt: string;
  finishedAt: string | null;
  fraction: number;
  stage: string;
  message: string;
  problems: Problem[];
  resultId: string | null;
  /** How many times the job was taken up again after a server restart. */
  resumed: number;
}

export interface JobStore {
  insert(job: StoredJob): void;
  update(id: string, patch: Partial<Omit<StoredJob, 'id' | 'scenario' | 'kind' | 'createdAt'>>): void;
  get(id: string): StoredJob | undefined;
  /** Jobs left queued, running or stopping (oldest first), of one kind or all: what a starting server must take up again. */
  unfinished(kind?: string): StoredJob[];
  /** Stores the central-value document of a job (JSON text). */
  savePoint(id: string, text: string): void;
  point(id: string): string | undefined;
  /** Stores one finished chunk of ensemble draws (JSON text). */
  saveChunk(id: string, chunk: number, text: string): void;
  chunks(id: string): Map<number, string>;
  /** Drops the stored pieces of a finished job (its result is saved on its own). */
  clearCheckpoint(id: string): void;
  /** Keeps the `keep` most recent finished jobs (their pages), deleting older ones. */
  prune(keep: number): void;
  /** Briefing jobs (kind 'briefing'): the result a job draws, and its PDF once drawn. */
  briefings: BriefingJobStore;
}

export interface BriefingJobStore {
  /** Links a briefing job (its row inserted first) to the stored result it draws. */
  insert(jobId: string, resultId: string): void;
  /** The result a briefing job draws. */
  resultOf(jobId: string): string | undefined;
  savePdf(jobId: string, pdf: Buffer): void;
  pdf(jobId: string): Buffer | undefined;
  /** The newest briefing job of a result that is unfinished or has its PDF (reused by a new request). */
  latestFor(resultId: string): { jobId: string; status: StoredJobStatus } | undefined;
}

interface JobRow {
  id: string;
  kind: string;
  status: StoredJobStatus;
  title: string;
  scenario_ref: string | null;
  scenario: string;
  created_at: string;
  finished_at: string | null;
  fraction: number;
  stage: string;
  message: string;
  problems: string;
  result_id: string | null;
  resumed: number;
}

/** Creates the job tables (idempotent; part of the schema migration). */
export function createJobTables(db: Database.Database): void {
  db.exec(`
    CREATE TABLE IF NOT EXISTS jobs (
      id TEXT PRIMARY KEY,
      kind TEXT NOT NULL,
      status TEXT NOT NULL,
      title TEXT NOT NULL,
      scenario_ref TEXT,
      scenario TEXT NOT NULL,
      created_at TEXT NOT NULL,
      finished_at TEXT,
      fraction REAL NOT NULL DEFAULT 0,
      stage TEXT NOT NULL DEFAULT '',
      message TEXT NOT NULL DEFAULT '',
      problems TEXT NOT NULL DEFAULT '[]',
      result_id TEXT,
      resumed INTEGER NOT NULL DEFAULT 0,
      point TEXT
    );
    CREATE INDEX IF NOT EXISTS jobs_by_status ON jobs (status, created_at);
    CREATE TABLE IF NOT EXISTS briefing_jobs (
      job_id TEXT PRIMARY KEY REFERENCES jobs (id) ON DELETE CASCADE,
      result_id TEXT NOT NULL,
      pdf BLOB
    );
    CREATE INDEX IF NOT EXISTS briefing_jobs_by_result ON briefing_jobs (result_id);
    CREATE TABLE IF NOT EXISTS job_chunks (
      job_id TEXT NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
      chunk INTEGER NOT NULL,
      draws TEXT NOT NULL,
      PRIMARY KEY (job_id, chunk)
    );
  `);
}

const COLUMNS: Record<string, string> = {
  status: 'status',
  title: 'title',
  scenarioRef: 'scenario_ref',
  finishedAt: 'finished_at',
  fraction: 'fraction',
  stage: 'stage',
  message: 'message',
  problems: 'problems',
  resultId: 'result_id',
  resumed: 'resumed',
};

export function makeJobStore(db: Database.Database): JobStore {
  const q = prepareStatements(db);
  const clear = db.transaction((id: string) => {
    q.clearChunks.run(id);
    q.clearPoint.run(id);
  });
  return {
    insert(job) {
      q.insert.run({ ...job, scenario: JSON.stringify(job.scenario), problems: JSON.stringify(job.problems) });
    },
    update: (id, patch) => updateJob(db, id, patch),
    get(id) {
      const r = q.get.get(id);
      return r ? toJob(r) : undefined;
    },
    unfinished: (kind) => (kind === undefined ? q.unfinished.all() : q.unfinishedOf.all(kind)).map(toJob),
    savePoint: (id, text) => void q.savePoint.run(text, id),
    point: (id) => q.point.get(id)?.point ?? undefined,
    saveChunk: (id, chunk, text) => void q.saveChunk.run(id, chunk, text),
    chunks: (id) => new Map(q.chunks.all(id).map((r) => [r.chunk, r.draws])),
    clearCheckpoint: (id) => clear(id),
    prune: (keep) => void q.prune.run(keep),
    briefings: {
      insert: (jobId, resultId) => void q.briefingInsert.run(jobId, resultId),
      resultOf: (jobId) => q.briefingResult.get(jobId)?.result_id,
      savePdf: (jobId, pdf) => void q.briefingSave.run(pdf, jobId),
      pdf: (jobId) => q.briefingPdf.get(jobId)?.pdf ?? undefined,
      latestFor: (resultId) => {
        const r = q.briefingLatest.get(resultId);
        return r ? { jobId: r.job_id, status: r.status } : undefined;
      },
    },
  };
}

function toJob(r: JobRow): StoredJob {
  return {
    id: r.id,
    kind: r.kind,
    status: r.status,
    title: r.title,
    scenarioRef: r.scenario_ref,
    scenario: JSON.parse(r.scenario) as Scenario,
    createdAt: r.created_at,
    finishedAt: r.finished_at,
    fraction: r.fraction,
    stage: r.stage,
    message: r.message,
    problems: JSON.parse(r.problems) as Problem[],
    resultId: r.result_id,
    resumed: r.resumed,
  };
}

/** Writes the given fields of a job row (those left undefined keep their value). */
function updateJob(db: Database.Database, id: string, patch: Parameters<JobStore['update']>[1]): void {
  const sets: string[] = [];
  const values: Record<string, unknown> = { id };
  for (const [k, v] of Object.entries(patch)) {
    const col = COLUMNS[k];
    if (!col || v === undefined) continue;
    sets.push(`${col} = @${k}`);
    values[k] = k === 'problems' ? JSON.stringify(v) : v;
  }
  if (sets.length) db.prepare(`UPDATE jobs SET ${sets.join(', ')} WHERE id = @id`).run(values);
}

/** The job store's statements, prepared once per database. */
function prepareStatements(db: Database.Database) {
  return {
    insert: db.prepare(
      `INSERT INTO jobs (id, kind, status, title, scenario_ref, scenario, created_at, finished_at, fraction, stage, message, problems, result_id, resumed)
       VALUES (@id, @kind, @status, @title, @scenarioRef, @scenario, @createdAt, @finishedAt, @fraction, @stage, @message, @problems, @resultId, @resumed)`,
    ),
    get: db.prepare<[string], JobRow>('SELECT * FROM jobs WHERE id = ?'),
    unfinished: db.prepare<[], JobRow>(`SELECT * FROM jobs WHERE status IN ('queued', 'running', 'cancelling') ORDER BY created_at, rowid`),
    unfinishedOf: db.prepare<[string], JobRow>(`SELECT * FROM jobs WHERE kind = ? AND status IN ('queued', 'running', 'cancelling') ORDER BY created_at, rowid`),
    briefingInsert: db.prepare<[string, string]>('INSERT INTO briefing_jobs (job_id, result_id) VALUES (?, ?)'),
    briefingResult: db.prepare<[string], { result_id: string }>('SELECT result_id FROM briefing_jobs WHERE job_id = ?'),
    briefingSave: db.prepare<[Buffer, string]>('UPDATE briefing_jobs SET pdf = ? WHERE job_id = ?'),
    briefingPdf: db.prepare<[string], { pdf: Buffer | null }>('SELECT pdf FROM briefing_jobs WHERE job_id = ?'),
    briefingLatest: db.prepare<[string], { job_id: string; status: StoredJobStatus }>(
      `SELECT b.job_id, j.status FROM briefing_jobs b JOIN jobs j ON j.id = b.job_id
       WHERE b.result_id = ? AND (j.status IN ('queued', 'running') OR (j.status = 'done' AND b.pdf IS NOT NULL))
       ORDER BY j.created_at DESC, j.rowid DESC LIMIT 1`,
    ),
    savePoint: db.prepare<[string, string]>('UPDATE jobs SET point = ? WHERE id = ?'),
    point: db.prepare<[string], { point: string | null }>('SELECT point FROM jobs WHERE id = ?'),
    saveChunk: db.prepare<[string, number, string]>('INSERT OR REPLACE INTO job_chunks (job_id, chunk, draws) VALUES (?, ?, ?)'),
    chunks: db.prepare<[string], { chunk: number; draws: string }>('SELECT chunk, draws FROM job_chunks WHERE job_id = ? ORDER BY chunk'),
    clearChunks: db.prepare<[string]>('DELETE FROM job_chunks WHERE job_id = ?'),
    clearPoint: db.prepare<[string]>('UPDATE jobs SET point = NULL WHERE id = ?'),
    prune: db.prepare<[number]>(
      `DELETE FROM jobs WHERE status IN ('done', 'cancelled', 'failed') AND id NOT IN
         (SELECT id FROM jobs WHERE status IN ('done', 'cancelled', 'failed') ORDER BY finished_at DESC LIMIT ?)`,
    ),
  };
}
