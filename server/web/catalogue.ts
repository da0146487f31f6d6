/**
 * One list of scenarios for pages and API: the read-only demo scenarios (read once at start from the
 * scenarios folder) and the user's saved scenarios (database). A scenario reference is either
 * `demo-<file name>` or the saved scenario's number; references are looked up in these two lists only,
 * so no request text is ever used as a path.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, basename } from 'node:path';
import { parseScenarioText, type Scenario } from '../model/scenario.ts';
import type { Store } from './store.ts';

export interface CatalogueEntry {
  ref: string;
  kind: 'demo' | 'saved';
  title: string;
  description: string;
  scenario: Scenario;
  /** Demo scenarios are read-only; saving one creates a saved copy. */
  readOnly: boolean;
  /** Demo file name (demo entries only). */
  file?: string;
  updatedAt?: string;
}

export interface CatalogueSummary {
  ref: string;
  kind: 'demo' | 'saved';
  title: string;
  updatedAt?: string;
}

export interface Catalogue {
  demos: CatalogueEntry[];
  list(): CatalogueSummary[];
  get(ref: string): CatalogueEntry | undefined;
}

const DEMO_PREFIX = 'demo-';
const SAFE_NAME = /^[a-z0-9][a-z0-9-]{0,79}$/;

/**
 * Reads every `*.json` in `dir` as a demo scenario. A file that does not validate is reported through
 * `warn` and left out (the test suite checks that every shipped demo validates).
 */
export function loadDemos(dir: string, warn: (msg: string) => void = () => {}): CatalogueEntry[] {
  let files: string[];
  try {
    files = readdirSync(dir).filter((f) => f.endsWith('.json')).sort();
  } catch {
    warn(`demo scenario folder ${dir} cannot be read; no demo scenarios`);
    return [];
  }
  const out: CatalogueEntry[] = [];
  for (const file of files) {
    const name = basename(file, '.json');
    if (!SAFE_NAME.test(name)) {
      warn(`demo scenario ${file}: file name must be lower-case letters, digits and dashes; skipped`);
      continue;
    }
    try {
      const scenario = parseScenarioText(readFileSync(join(dir, file), 'utf8'));
      out.push({
        ref: DEMO_PREFIX + name,
        kind: 'demo',
        title: scenario.title,
        description: scenario.description,
        scenario,
        readOnly: true,
        file,
      });
    } catch (e) {
      warn(`demo scenario ${file} does not validate and is skipped: ${(e as Error).message}`);
    }
  }
  return out;
}

export function makeCatalogue(demos: CatalogueEntry[], store: Store): Catalogue {
  const byRef = new Map(demos.map((d) => [d.ref, d]));
  return {
    demos,
    list() {
      return [
        ...demos.map((d) => ({ ref: d.ref, kind: d.kind, title: d.title })),
        ...store.listScenarios().map((s) => ({ ref: String(s.id), kind: 'saved' as const, title: s.title, updatedAt: s.updatedAt })),
      ];
    },
    get(ref) {
      if (byRef.has(ref)) return byRef.get(ref);
      const id = savedId(ref);
      if (id === undefined) return undefined;
      const s = store.getScenario(id);
      if (!s) return undefined;
      return {
        ref: String(s.id),
        kind: 'saved',
        title: s.title,
        description: s.scenario.description,
        scenario: s.scenario,
        readOnly: false,
        updatedAt: s.updatedAt,
      };
    },
  };
}

/** The saved-scenario number in a reference, or undefined when the reference is not a saved one. */
export function savedId(ref: string): number | undefined {
  if (!/^[1-9]\d{0,12}$/.test(ref)) return undefined;
  return Number(ref);
}
