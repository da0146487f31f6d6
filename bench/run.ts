/**
 * `npm run bench`: runs every bench/*.bench.ts in its own process (one after the other, so they do not
 * compete for the two cores) and prints their reports. `npm run bench -- NAME` runs the benches whose file
 * name contains NAME. Speed targets are checked here, never in unit tests.
 */
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const dir = fileURLToPath(new URL('.', import.meta.url));
const filter = process.argv.slice(2);
const files = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => filter.length === 0 || filter.some((x) => f.includes(x)))
  .sort();
let failed = 0;
for (const f of files) {
  process.stdout.write(`\n=== ${f} ===\n`);
  // As the app's own commands run (package.json): V8's garbage collector on the thread that allocates (see
  // DEVELOPERS.md, "Worker threads").
  const r = spawnSync(process.execPath, ['--single-threaded-gc', '--import', 'tsx', `${dir}${f}`], { stdio: 'inherit' });
  if (r.status !== 0) {
    failed++;
    process.stdout.write(`${f}: FAILED (exit ${r.status})\n`);
  }
}
process.stdout.write(`\n${files.length - failed} bench file(s) passed, ${failed} failed\n`);
process.exitCode = failed ? 1 : 0;
