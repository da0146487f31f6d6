/**
 * Saved scenarios and past results in an embedded SQLite database (better-sqlite3) under the data folder.
 * The file name is fixed; nothing from a request reaches the file system. Every result row keeps the exact
 * scenario it was computed from and the tool version that computed it.
 */
import Database from 'better-sqlite3';
import { accessSync, constants, mkdirSync, statfsSync } from 'node:fs';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import type { Scenario } from '../model/scenario.ts';
import type { ResultDocument } from '../analysis/result.ts';
import { createJobTables, makeJobStore, type JobStore } from './job-store.ts';
import { InputError } from '../model/errors.ts';

/** File name of the database inside the data folder. */
export const DATABASE_FILE = 'barrier-evaluator.sqlite';

/** Schema version (PRAGMA user_version); bump with a migration step when a table changes. */
const SCHEMA_VERSION = 2;

export interface SavedScenario {
  id: number;
  title: string;
  scenario: Scenario;
  createdAt: string;
  updatedAt: string;
}

export interface SavedScenarioSummary {
  id: number;
  title: string;
  updatedAt: string;
}

export interface StoredResult {
  id: string;
  /** Scenario reference the run started from ('demo-…' or a saved id as text); null for API runs of a posted scenario. */
  scenarioRef: string | null;
  title: string;
  /** The exact validated scenario the result was computed from. */
  scenario: Scenario;
  toolName: string;
  toolVersion: string;
  createdAt: string;
  document: ResultDocument;
}

/** What a list of results shows about each one beyond its title (see Store.resultDigests). */
export interface ResultDigest {
  fingerprint: string;
  options: { name: string; widthM: number; kind: string | null; transportDecides: boolean }[];
}

export type StoredResultSummary = Omit<StoredResult, 'scenario' | 'document'>;

interface ScenarioRow {
  id: number;
  title: string;
  body: string;
  created_at: string;
  updated_at: string;
}

interface ResultRow {
  id: string;
  scenario_ref: string | null;
  title: string;
  scenario: string;
  tool_name: string;
  tool_version: string;
  created_at: string;
  document: string;
}

/** Free space below which new evaluations are refused (a result document of a large run is a few MB) [bytes]. */
export const DEFAULT_MIN_FREE_BYTES = 64 * 1024 * 1024;

export interface StoreOptions {
  /** Refuse new evaluations when the data folder's disk has less free space than this [bytes]. */
  minFreeBytes?: number;
  /** Largest database size in pages (SQLite max_page_count); tests set it small to produce a full disk. */
  maxPageCount?: number;
}

/** The data folder cannot be used at start (missing permissions, not a folder, a read-only database file). */
export class DataDirError extends Error {
  readonly code = 'DATA_DIR_UNUSABLE';
  constructor(dataDir: string, reason: string) {
    super(
      `DATA_DIR ${JSON.stringify(dataDir)} cannot be used: ${reason}. Set DATA_DIR to a folder this user can write ` +
        '(it is created when missing), or fix the permissions of this one.',
    );
    this.name = 'DataDirError';
  }
}

/** Nothing more can be stored (a full disk, a read-only database): answered 507 with what to do. */
export class StorageFullError extends InputError {
  readonly statusCode = 507;
  constructor(message: string) {
    super('STORAGE_FULL', [{ path: 'storage', value: undefined, message }], message);
    this.name = 'StorageFullError';
  }
}

/** SQLite result codes that mean "cannot store", not "bad request". */
function storageFailure(e: unknown, dataDir: string): StorageFullError | undefined {
  const code = (e as { code?: string }).code ?? '';
  if (code === 'SQLITE_FULL') {
    return new StorageFullError(`the disk holding the data folder (DATA_DIR ${dataDir}) is full: nothing was saved. Free some space, or delete old results, and try again`);
  }
  if (code.startsWith('SQLITE_READONLY') || code.startsWith('SQLITE_IOERR') || code.startsWith('SQLITE_CANTOPEN')) {
    return new StorageFullError(`the database in the data folder (DATA_DIR ${dataDir}) cannot be written (${code}): nothing was saved. Check the disk and the folder's permissions`);
  }
  return undefined;
}

export interface Store {
  listScenarios(): SavedScenarioSummary[];
  getScenario(id: number): SavedScenario | undefined;
  createScenario(scenario: Scenario): SavedScenario;
  /** Returns undefined when there is no such scenario. */
  updateScenario(id: number, scenario: Scenario): SavedScenario | undefined;
  deleteScenario(id: number): boolean;
  saveResult(input: { scenarioRef: string | null; scenario: Scenario; document: ResultDocument }): StoredResult;
  listResults(filter?: { scenarioRef?: string; limit?: number }): StoredResultSummary[];
  getResult(id: string): StoredResult | undefined;
  /**
   * Per result: the scenario fingerprint and each option's name, width, verdict kind and whether transport
   * decides (read inside SQLite with its JSON functions, without loading the documents), for result lists.
   */
  resultDigests(ids: string[]): Map<string, ResultDigest>;
  deleteResult(id: string): boolean;
  /** Durable web jobs (accepted evaluations and their finished pieces). */
  jobs: JobStore;
  /**
   * Refuses new work when the data folder's disk is nearly full, so a long evaluation is not computed only to
   * fail at saving. @throws StorageFullError naming DATA_DIR and the space left
   */
  checkSpace(): void;
  close(): void;
}

/**
 * Opens (and on first start creates) the database in `dataDir`.
 * @param dataDir - folder for the database file; created with its parents when missing
 */
export function openStore(dataDir: string, opts: StoreOptions = {}): Store {
  const db = openDatabase(dataDir);
  if (opts.maxPageCount !== undefined) db.pragma(`max_page_count = ${Math.floor(opts.maxPageCount)}`);
  const minFree = opts.minFreeBytes ?? DEFAULT_MIN_FREE_BYTES;
  /** Runs a write; a full disk or unwritable database becomes a StorageFullError. */
  const writing = <T>(fn: () => T): T => {
    try {
      return fn();
    } catch (e) {
      throw storageFailure(e, dataDir) ?? e;
    }
  };
  const q = prepareStatements(db);

  return {
    listScenarios: () => q.listScenarios.all(),
    getScenario(id) {
      const row = q.getScenario.get(id);
      return row ? toScenario(row) : undefined;
    },
    createScenario(scenario) {
      const t = now();
      const info = writing(() => q.insertScenario.run(scenario.title, JSON.stringify(scenario), t, t));
      return { id: Number(info.lastInsertRowid), title: scenario.title, scenario, createdAt: t, updatedAt: t };
    },
    updateScenario(id, scenario) {
      const info = writing(() => q.updateScenario.run(scenario.title, JSON.stringify(scenario), now(), id));
      return info.changes ? this.getScenario(id) : undefined;
    },
    deleteScenario: (id) => writing(() => q.deleteScenario.run(id).changes > 0),
    saveResult({ scenarioRef, scenario, document }) {
      const r: StoredResult = {
        id: randomUUID(),
        scenarioRef,
        title: scenario.title,
        scenario,
        toolName: document.tool.name,
        toolVersion: document.tool.version,
        createdAt: now(),
        document,
      };
      writing(() => q.insertResult.run(r.id, r.scenarioRef, r.title, JSON.stringify(scenario), r.toolName, r.toolVersion, r.createdAt, JSON.stringify(document)));
      return r;
    },
    listResults(filter = {}) {
      const ref = filter.scenarioRef ?? null;
      return q.listResults.all(ref, ref, filter.limit ?? 200).map((r) => ({
        id: r.id,
        scenarioRef: r.scenario_ref,
        title: r.title,
        toolName: r.tool_name,
        toolVersion: r.tool_version,
        createdAt: r.created_at,
      }));
    },
    getResult(id) {
      const row = q.getResult.get(id);
      return row ? toResult(row) : undefined;
    },
    resultDigests: (ids) => resultDigests(q, ids),
    deleteResult: (id) => writing(() => q.deleteResult.run(id).changes > 0),
    jobs: makeJobStore(db),
    checkSpace: () => checkFreeSpace(dataDir, minFree),
    close: () => db.close(),
  };
}

const now = () => new Date().toISOString();

function toScenario(r: ScenarioRow): SavedScenario {
  return {
    id: r.id,
    title: r.title,
    scenario: JSON.parse(r.body) as Scenario,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
  };
}

function toResult(r: ResultRow): StoredResult {
  return {
    id: r.id,
    scenarioRef: r.scenario_ref,
    title: r.title,
    scenario: JSON.parse(r.scenario) as Scenario,
    toolName: r.tool_name,
    toolVersion: r.tool_version,
    createdAt: r.created_at,
    document: JSON.parse(r.document) as ResultDocument,
  };
}

/** The store's statements, prepared once per database. */
function prepareStatements(db: Database.Database) {
  return {
    listScenarios: db.prepare<[], SavedScenarioSummary>(
      'SELECT id, title, updated_at AS updatedAt FROM scenarios ORDER BY updated_at DESC, id DESC',
    ),
    getScenario: db.prepare<[number], ScenarioRow>('SELECT * FROM scenarios WHERE id = ?'),
    insertScenario: db.prepare<[string, string, string, string]>(
      'INSERT INTO scenarios (title, body, created_at, updated_at) VALUES (?, ?, ?, ?)',
    ),
    updateScenario: db.prepare<[string, string, string, number]>(
      'UPDATE scenarios SET title = ?, body = ?, updated_at = ? WHERE id = ?',
    ),
    deleteScenario: db.prepare<[number]>('DELETE FROM scenarios WHERE id = ?'),
    insertResult: db.prepare<[string, string | null, string, string, string, string, string, string]>(
      `INSERT INTO results (id, scenario_ref, title, scenario, tool_name, tool_version, created_at, document)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
    ),
    listResults: db.prepare<[string | null, string | null, number], ResultRow>(
      `SELECT id, scenario_ref, title, tool_name, tool_version, created_at FROM results
       WHERE (? IS NULL OR scenario_ref = ?) ORDER BY created_at DESC LIMIT ?`,
    ),
    getResult: db.prepare<[string], ResultRow>('SELECT * FROM results WHERE id = ?'),
    digestFingerprint: db.prepare<[string], { fp: string | null }>(`SELECT json_extract(document, '$.scenarioFingerprint') AS fp FROM results WHERE id = ?`),
    digestOptions: db.prepare<[string], { k: number; name: string | null; width: number | null; kind: string | null; decides: number | null }>(
      `SELECT o.key AS k, json_extract(o.value, '$.name') AS name, json_extract(o.value, '$.widthM') AS width,
              json_extract(o.value, '$.verdict.kind') AS kind,
              json_extract(r.document, '$.bypass.options[' || o.key || '].transportDecides') AS decides
       FROM results r, json_each(r.document, '$.options') o WHERE r.id = ? ORDER BY o.key`,
    ),
    deleteResult: db.prepare<[string]>('DELETE FROM results WHERE id = ?'),
  };
}

function resultDigests(q: ReturnType<typeof prepareStatements>, ids: string[]): Map<string, ResultDigest> {
  const out = new Map<string, ResultDigest>();
  for (const id of ids) {
    const fp = q.digestFingerprint.get(id);
    if (!fp) continue;
    out.set(id, {
      fingerprint: fp.fp ?? '',
      options: q.digestOptions.all(id).map((o) => ({ name: o.name ?? '', widthM: o.width ?? NaN, kind: o.kind, transportDecides: o.decides === 1 })),
    });
  }
  return out;
}

/** @throws StorageFullError when the data folder's disk has less than `minFree` bytes free */
function checkFreeSpace(dataDir: string, minFree: number): void {
  let free: number;
  try {
    const fs = statfsSync(dataDir);
    free = Number(fs.bavail) * Number(fs.bsize);
  } catch {
    return; // No figure to go on (an unusual file system): the save itself still reports a full disk.
  }
  if (free < minFree) {
    throw new StorageFullError(
      `the disk holding the data folder (DATA_DIR ${dataDir}) has only ${(free / 1048576).toFixed(1)} MB free, less than the ` +
        `${(minFree / 1048576).toFixed(0)} MB an evaluation may need to store its result; free some space or delete old results first`,
    );
  }
}

/**
 * Opens the database and proves it writable (a write transaction), so a data folder that cannot be used stops
 * the start with one message naming DATA_DIR instead of failing at the first save.
 * @throws DataDirError naming the folder and the reason
 */
function openDatabase(dataDir: string): Database.Database {
  const reason = (e: unknown) => {
    const err = e as NodeJS.ErrnoException;
    const code = err.code ?? '';
    if (code === 'EACCES' || code === 'EPERM') return `permission denied (${code})`;
    if (code === 'ENOTDIR' || code === 'EEXIST') return `it is not a folder (${code})`;
    if (code === 'EROFS') return 'it is on a read-only file system (EROFS)';
    if (code === 'ENOSPC' || code === 'SQLITE_FULL') return `the disk is full (${code})`;
    if (code.startsWith('SQLITE_READONLY')) return `the database file ${DATABASE_FILE} in it is read-only (${code})`;
    if (code.startsWith('SQLITE_CANTOPEN')) return `the database file ${DATABASE_FILE} in it cannot be opened (${code})`;
    return code ? `${code}: ${err.message}` : err.message;
  };
  try {
    mkdirSync(dataDir, { recursive: true });
    accessSync(dataDir, constants.W_OK | constants.X_OK);
  } catch (e) {
    throw new DataDirError(dataDir, reason(e));
  }
  let db: Database.Database | undefined;
  try {
    db = new Database(join(dataDir, DATABASE_FILE));
    db.pragma('journal_mode = WAL');
    db.pragma('foreign_keys = ON');
    migrate(db);
    db.exec('BEGIN IMMEDIATE; COMMIT');
    return db;
  } catch (e) {
    db?.close();
    throw new DataDirError(dataDir, reason(e));
  }
}

function migrate(db: Database.Database): void {
  const version = db.pragma('user_version', { simple: true }) as number;
  if (version >= SCHEMA_VERSION) return;
  db.exec(`
    CREATE TABLE IF NOT EXISTS scenarios (
      id INTEGER PRIMARY KEY AUTOINCREMENT,
      title TEXT NOT NULL,
      body TEXT NOT NULL,
      created_at TEXT NOT NULL,
      updated_at TEXT NOT NULL
    );
    CREATE TABLE IF NOT EXISTS results (
      id TEXT PRIMARY KEY,
      scenario_ref TEXT,
      title TEXT NOT NULL,
      scenario TEXT NOT NULL,
      tool_name TEXT NOT NULL,
      tool_version TEXT NOT NULL,
      created_at TEXT NOT NULL,
      document TEXT NOT NULL
    );
    CREATE INDEX IF NOT EXISTS results_by_scenario ON results (scenario_ref, created_at);
  `);
  // Version 2: durable web jobs.
  createJobTables(db);
  db.pragma(`user_version = ${SCHEMA_VERSION}`);
}
