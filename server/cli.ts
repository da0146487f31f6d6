/**
 * Command line: `npm run evaluate -- <scenario.json> [--json] [--out FILE]`.
 * Calls the same analysis as the web routes; writes output files atomically (temporary file, then rename).
 */
import { readFileSync, renameSync, writeFileSync, rmSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';
import { parseScenarioText } from './model/scenario.ts';
import { InputError, formatProblems } from './model/errors.ts';
import { evaluateScenario } from './analysis/evaluate.ts';
import { textSummary } from './report/text-summary.ts';

const USAGE = `usage: npm run evaluate -- <scenario.json> [--json] [--out FILE]
  --json        print the result document (JSON) instead of the readable summary
  --out FILE    write the output to FILE instead of standard output
  --quiet       no progress bar`;

export interface CliArgs {
  file: string;
  json: boolean;
  out?: string;
  quiet: boolean;
}

/** Parses argv (without node and script). @throws InputError naming the bad argument */
export function parseArgs(argv: string[]): CliArgs {
  const args: Partial<CliArgs> = { json: false, quiet: false };
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === '--json') args.json = true;
    else if (a === '--quiet') args.quiet = true;
    else if (a === '--out') {
      const v = argv[++i];
      if (!v || v.startsWith('--')) throw new InputError('USAGE', [{ path: '--out', value: v, message: 'needs a file name' }]);
      args.out = v;
    } else if (a.startsWith('--')) {
      throw new InputError('USAGE', [{ path: a, value: a, message: 'is not a known option (--json, --out FILE, --quiet)' }]);
    } else if (args.file === undefined) args.file = a;
    else throw new InputError('USAGE', [{ path: 'arguments', value: a, message: 'only one scenario file may be given' }]);
  }
  if (args.file === undefined) throw new InputError('USAGE', [{ path: 'scenario file', value: undefined, message: 'is required' }]);
  return args as CliArgs;
}

/** Writes text to a file via a temporary file in the same folder, so a failed run leaves nothing half-written. */
export function writeAtomically(path: string, data: string | Uint8Array): void {
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
  }
}

function progressBar(enabled: boolean) {
  let last = -1;
  return (fraction: number, stage: string) => {
    if (!enabled) return;
    const pct = Math.floor(fraction * 100);
    if (pct === last) return;
    last = pct;
    const width = 30;
    const done = Math.round((fraction * width));
    process.stderr.write(`\r[${'#'.repeat(done)}${'.'.repeat(width - done)}] ${String(pct).padStart(3)} % ${stage.padEnd(30).slice(0, 30)}`);
    if (fraction >= 1) process.stderr.write('\n');
  };
}

/** Runs the CLI; returns the exit code (0 ok, 1 invalid scenario or failed run, 2 usage). */
export function main(argv: string[]): number {
  let args: CliArgs;
  try {
    args = parseArgs(argv);
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n${USAGE}\n`);
    return 2;
  }
  let text: string;
  try {
    text = readFileSync(args.file, 'utf8');
  } catch (e) {
    process.stderr.write(`cannot read scenario file ${args.file}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}\n`);
    return 1;
  }
  try {
    const scenario = parseScenarioText(text);
    const doc = evaluateScenario(scenario, { onProgress: progressBar(!args.quiet && process.stderr.isTTY === true) });
    const output = args.json ? `${JSON.stringify(doc, null, 1)}\n` : `${textSummary(doc)}\n`;
    if (args.out) writeAtomically(args.out, output);
    else process.stdout.write(output);
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`${args.file} is not a valid scenario:\n${formatProblems(e.problems).replace(/^/gm, '  ')}\n`);
      return 1;
    }
    process.stderr.write(`evaluation failed: ${(e as Error).message}\n`);
    return 1;
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  process.exitCode = main(process.argv.slice(2));
}
