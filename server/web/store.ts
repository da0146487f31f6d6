/**
 * Saved scenarios and past results in an embedded SQLite database (better-sqlite3) under the data folder.
 * The file name is fixed; nothing from a request reaches the file system. Every result row keeps the exact
 * scenario it was computed from and the tool version that computed it.
 */
import Database from 'better-sqlite3';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import type { Scenario } from '../model/scenario.ts';
import type { ResultDocument } from '../analysis/result.ts';

/** File name of the database inside the data folder. */
export const DATABASE_FILE = 'barrier-evaluator.sqlite';

/** Schema version (PRAGMA user_version); bump with a migration step when a table changes. */
const SCHEMA_VERSION = 1;

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
  close(): void;
}

/**
 * Opens (and on first start creates) the database in `dataDir`.
 * @param dataDir - folder for the database file; created with its parents when missing
 */
export function openStore(dataDir: string): Store {
  mkdirSync(dataDir, { recursive: true });
  const db = new Database(join(dataDir, DATABASE_FILE));
  db.pragma('journal_mode = WAL');
  db.pragma('foreign_keys = ON');
  migrate(db);

  const now = () => new Date().toISOString();
  const toScenario = (r: ScenarioRow): SavedScenario => ({
    id: r.id,
    title: r.title,
    scenario: JSON.parse(r.body) as Scenario,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
  });
  const toResult = (r: ResultRow): StoredResult => ({
    id: r.id,
    scenarioRef: r.scenario_ref,
    title: r.title,
    scenario: JSON.parse(r.scenario) as Scenario,
    toolName: r.tool_name,
    toolVersion: r.tool_version,
    createdAt: r.created_at,
    document: JSON.parse(r.document) as ResultDocument,
  });

  const q = {
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

  return {
    listScenarios: () => q.listScenarios.all(),
    getScenario(id) {
      const row = q.getScenario.get(id);
      return row ? toScenario(row) : undefined;
    },
    createScenario(scenario) {
      const t = now();
      const info = q.insertScenario.run(scenario.title, JSON.stringify(scenario), t, t);
      return { id: Number(info.lastInsertRowid), title: scenario.title, scenario, createdAt: t, updatedAt: t };
    },
    updateScenario(id, scenario) {
      const info = q.updateScenario.run(scenario.title, JSON.stringify(scenario), now(), id);
      return info.changes ? this.getScenario(id) : undefined;
    },
    deleteScenario: (id) => q.deleteScenario.run(id).changes > 0,
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
      q.insertResult.run(r.id, r.scenarioRef, r.title, JSON.stringify(scenario), r.toolName, r.toolVersion, r.createdAt, JSON.stringify(document));
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
    resultDigests(ids) {
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
    },
    deleteResult: (id) => q.deleteResult.run(id).changes > 0,
    close: () => db.close(),
  };
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
  db.pragma(`user_version = ${SCHEMA_VERSION}`);
}
