/** Rewrites the golden documents: `npx tsx tests/golden/update.ts` (only after a deliberate change). */
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { parseScenarioText } from '../../server/model/scenario.ts';
import { evaluateScenario } from '../../server/analysis/evaluate.ts';
import { GOLDEN_DIR, SCENARIO_DIR, stripVolatile } from './golden.ts';

for (const f of readdirSync(SCENARIO_DIR).filter((n) => n.endsWith('.json'))) {
  const s = parseScenarioText(readFileSync(new URL(f, SCENARIO_DIR), 'utf8'));
  const t0 = performance.now();
  const doc = stripVolatile(evaluateScenario(s));
  writeFileSync(new URL(f, GOLDEN_DIR), JSON.stringify(doc, null, 1) + '\n');
  console.log(`${f}: ${((performance.now() - t0) / 1000).toFixed(1)} s`);
}
