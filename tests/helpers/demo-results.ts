/**
 * Result documents of the demo scenarios (scenarios/*.json) for presentation tests: the real engine, run once
 * and kept in test-output/demo-cache/ under a key made of the scenario file and every engine source file
 * (server/model, server/numerics, server/analysis, server/domain, server/problem when present), so any change
 * to the engine or the scenario recomputes them. The run date is fixed so pages and PDFs are reproducible.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseScenario, type Scenario } from '../../server/model/scenario.ts';
import { evaluateScenario } from '../../server/analysis/evaluate/evaluate.ts';
import type { ResultDocument } from '../../server/analysis/result.ts';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const CACHE = join(ROOT, 'test-output', 'demo-cache');
export const DEMO_NAMES = ['clearing-holds', 'clearing-delays', 'clearing-speeds-up', 'clearing-not-crossed', 'transport-decides'] as const;
export type DemoName = (typeof DEMO_NAMES)[number];
/** Fixed run date of the cached demo results. */
export const DEMO_RUN_AT = new Date('2031-05-04T09:30:00Z');

function filesUnder(dir: string): string[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .sort()
    .flatMap((n) => {
      const p = join(dir, n);
      return statSync(p).isDirectory() ? filesUnder(p) : p.endsWith('.ts') ? [p] : [];
    });
}

let engineHash: string | null = null;
function engineKey(): string {
  if (engineHash) return engineHash;
  const h = createHash('sha256');
  for (const d of ['model', 'numerics', 'analysis', 'domain', 'problem']) for (const f of filesUnder(join(ROOT, 'server', d))) h.update(f.slice(ROOT.length)).update(readFileSync(f));
  engineHash = h.digest('hex').slice(0, 16);
  return engineHash;
}

export interface DemoResult {
  name: DemoName;
  raw: unknown;
  scenario: Scenario;
  doc: ResultDocument;
}

/** The demo's scenario and its result document (computed once per engine version). */
export function demoResult(name: DemoName): DemoResult {
  const text = readFileSync(join(ROOT, 'scenarios', `${name}.json`), 'utf8');
  const raw = JSON.parse(text) as unknown;
  const scenario = parseScenario(raw);
  const key = createHash('sha256').update(text).update(engineKey()).digest('hex').slice(0, 16);
  const file = join(CACHE, `${name}-${key}.json`);
  if (existsSync(file)) return { name, raw, scenario, doc: JSON.parse(readFileSync(file, 'utf8')) as ResultDocument };
  const doc = evaluateScenario(scenario, { now: () => DEMO_RUN_AT });
  mkdirSync(CACHE, { recursive: true });
  writeFileSync(file, JSON.stringify(doc));
  return { name, raw, scenario, doc };
}
