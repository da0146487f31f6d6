/**
 * Command line: `npm run evaluate -- <scenario.json> [--json] [--out FILE] [--pdf FILE]`.
 * Calls the same analysis as the web routes; writes output files atomically (temporary file, then rename).
 */
import { accessSync, constants, readFileSync, renameSync, statSync, writeFileSync, rmSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';
import { parseScenarioText } from './model/scenario.ts';
import { InputError, formatProblems } from './model/errors.ts';
import { evaluateScenarioParallel } from './analysis/evaluate-parallel.ts';
import { textSummary } from './report/text-summary.ts';
import { renderBriefing } from './report/briefing.ts';
import { isLandscapeText, runLandscapeCli } from './landscape-cli.ts';

const USAGE = `usage: npm run evaluate -- <scenario.json> [--json] [--out FILE] [--pdf FILE]
  --json        print the result document (JSON) instead of the readable summary
  --out FILE    write the output to FILE instead of standard output
  --pdf FILE    also write the PDF briefing to FILE (alone, without --json/--out, nothing else is printed)
  --quiet       no progress bar
  --threads N   worker threads for an ensemble (default: all cores)
  Ctrl-C during an ensemble stops it, reports the draws done so far and exits with 130; a second Ctrl-C quits.`;

export interface CliArgs {
  file: string;
  json: boolean;
  out?: string;
  /** Write the PDF briefing here. */
  pdf?: string;
  quiet: boolean;
  /** Worker threads for ensembles (default: all cores). */
  threads?: number;
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
    } else if (a === '--pdf') {
      const v = argv[++i];
      if (!v || v.startsWith('--')) throw new InputError('USAGE', [{ path: '--pdf', value: v, message: 'needs a file name' }]);
      args.pdf = v;
    } else if (a === '--threads') {
      const v = argv[++i];
      const n = Number(v);
      if (!Number.isInteger(n) || n < 1 || n > 256) throw new InputError('USAGE', [{ path: '--threads', value: v, message: 'needs a whole number from 1 to 256' }]);
      args.threads = n;
    } else if (a.startsWith('--')) {
      throw new InputError('USAGE', [{ path: a, value: a, message: 'is not a known option (--json, --out FILE, --pdf FILE, --quiet, --threads N)' }]);
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

/**
 * Why `path` cannot be written as an output file, or undefined when it can (its folder exists and is writable,
 * and it is not itself a folder). Checked before evaluating, so a long run never ends in a failed write.
 */
export function unwritableReason(path: string): string | undefined {
  const folder = dirname(path);
  try {
    if (!statSync(folder).isDirectory()) return `${folder} is not a folder`;
  } catch (e) {
    return `the folder ${folder} does not exist (${(e as NodeJS.ErrnoException).code ?? 'not found'})`;
  }
  try {
    accessSync(folder, constants.W_OK);
  } catch {
    return `the folder ${folder} is not writable`;
  }
  try {
    if (statSync(path).isDirectory()) return 'is a folder; give a file name';
  } catch {
    // Does not exist yet: fine.
  }
  return undefined;
}

/** A write of an output file failed (after the evaluation); the message names the option and the file. */
class OutputError extends Error {}

function writeOutput(option: string, path: string, data: string | Uint8Array): void {
  try {
    writeAtomically(path, data);
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    throw new OutputError(`cannot write ${option} ${path}: ${err.code ?? err.message}; nothing was written there`);
  }
}

/** Progress bar on standard error (TTY only), with the stage and, for long runs, the time left. */
export function progressBar(enabled: boolean, write: (s: string) => void = (s) => process.stderr.write(s), clock: () => number = () => performance.now()) {
  let last = '';
  const started = clock();
  return (fraction: number, stage: string) => {
    if (!enabled) return;
    const pct = Math.floor(fraction * 100);
    const elapsed = (clock() - started) / 1000;
    // Time left from the average rate so far, once there is enough to go on.
    const left = fraction > 0.02 && fraction < 1 && elapsed > 2 ? `, about ${formatSeconds((elapsed * (1 - fraction)) / fraction)} left` : '';
    const label = `${stage}${left}`;
    const key = `${pct}|${label}`;
    if (key === last) return;
    last = key;
    const width = 30;
    const done = Math.round(fraction * width);
    write(`\r[${'#'.repeat(done)}${'.'.repeat(width - done)}] ${String(pct).padStart(3)} % ${label.padEnd(44).slice(0, 44)}`);
    if (fraction >= 1) write('\n');
  };
}

function formatSeconds(s: number): string {
  return s < 90 ? `${Math.ceil(s)} s` : `${Math.ceil(s / 60)} min`;
}

/** Why a scenario file could not be read, in words. */
const READ_ERRORS: Record<string, string> = {
  ENOENT: 'no such file',
  EISDIR: 'a folder, not a file',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
};

/** Runs the CLI; resolves to the exit code (0 ok, 1 invalid scenario or failed run, 2 usage). */
export async function main(argv: string[]): Promise<number> {
  let args: CliArgs;
  try {
    args = parseArgs(argv);
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n${USAGE}\n`);
    return 2;
  }
  for (const [option, path] of [['--out', args.out], ['--pdf', args.pdf]] as const) {
    const reason = path === undefined ? undefined : unwritableReason(path);
    if (reason) {
      process.stderr.write(`cannot write ${option} ${path}: ${reason}; nothing was written\n`);
      return 1;
    }
  }
  let text: string;
  try {
    text = readFileSync(args.file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code && READ_ERRORS[code] ? `${code} (${READ_ERRORS[code]})` : (code ?? (e as Error).message);
    process.stderr.write(`cannot read scenario file ${args.file}: ${why}\n`);
    return 1;
  }
  try {
    if (isLandscapeText(text)) {
      const progress = progressBar(!args.quiet && process.stderr.isTTY === true);
      return await runLandscapeCli(text, { file: args.file, json: args.json, out: args.out, pdf: args.pdf, progress, write: writeOutput });
    }
    const scenario = parseScenarioText(text);
    // Ctrl-C stops an ensemble cleanly (the draws done so far are reported); a second Ctrl-C quits.
    let cancelled = false;
    let firstSigintAt = 0;
    const onSigint = () => {
      // One key press can arrive twice (from the terminal and relayed by a wrapper such as tsx or npm):
      // a second signal within a second is the same press.
      if (cancelled) {
        if (Date.now() - firstSigintAt > 1000) process.exit(130);
        return;
      }
      firstSigintAt = Date.now();
      cancelled = true;
      process.stderr.write('\nstopping after the current draws (Ctrl-C again to quit)…\n');
    };
    process.on('SIGINT', onSigint);
    let doc;
    try {
      doc = await evaluateScenarioParallel(scenario, {
        threads: args.threads,
        shouldCancel: () => cancelled,
        onProgress: progressBar(!args.quiet && process.stderr.isTTY === true),
      });
    } finally {
      process.off('SIGINT', onSigint);
    }
    if (args.pdf) {
      const pdf = await renderBriefing(doc, { scenario, rawInput: JSON.parse(text) as unknown });
      writeOutput('--pdf', args.pdf, pdf);
      if (!args.json && !args.out) {
        process.stderr.write(`briefing written to ${args.pdf}\n`);
        return 0;
      }
    }
    const output = args.json ? `${JSON.stringify(doc, null, 1)}\n` : `${textSummary(doc)}\n`;
    if (args.out) writeOutput('--out', args.out, output);
    else process.stdout.write(output);
    // Interrupted: the partial result is written, and the exit code says it is partial.
    return cancelled ? 130 : 0;
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`${args.file} is not a valid scenario:\n${formatProblems(e.problems).replace(/^/gm, '  ')}\n`);
      return 1;
    }
    if (e instanceof OutputError) {
      process.stderr.write(`${e.message}\n`);
      return 1;
    }
    process.stderr.write(`evaluation failed: ${(e as Error).message}\n`);
    return 1;
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
