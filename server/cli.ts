/**
 * Command line: `npm run evaluate -- <scenario.json> [--json] [--out FILE] [--pdf FILE]`.
 * Calls the same analysis as the web routes. Output files are written atomically (a hidden temporary file in
 * the same folder, then a rename); `--pdf` with `--out` are written as one pair (both temporaries first, then
 * a small journal, then both renames), and a run killed midway is cleaned up or completed by the next run
 * that writes to the same folder (cli-output.ts). Text from the scenario is never written raw to the terminal.
 */
import { readFileSync } from 'node:fs';
import { parseScenarioText, type Scenario } from './model/scenario.ts';
import { InputError, formatProblems } from './model/errors.ts';
import { evaluateScenarioParallel } from './jobs/parallel.ts';
import { parseJsonText } from './model/json-text.ts';
import { NON_FINITE_CODE } from './numerics/finite.ts';
import { textSummary } from './report/text-summary.ts';
import { renderBriefing } from './report/briefing.ts';
import { briefingTextProblems } from './report/pdf/fonts.ts';
import { isLandscapeText, runLandscapeCli } from './landscape-cli.ts';
import { recoverOutputs, unwritableReason, writeTogether } from './cli-output.ts';

export { recoverOutputs, unwritableReason, writeAtomically, writeTogether } from './cli-output.ts';

const USAGE = `usage: npm run evaluate -- <scenario.json> [--json] [--out FILE] [--pdf FILE]
  --json        print the result document (JSON) instead of the readable summary
  --out FILE    write the output to FILE instead of standard output
  --pdf FILE    also write the PDF briefing to FILE (alone, without --json/--out, nothing else is printed)
  --quiet       no progress bar
  --threads N   worker threads for an ensemble (default: all cores)
  --help, -h    show this help
  Ctrl-C during an ensemble stops it, reports the draws done so far and exits with 130; a second Ctrl-C quits.`;

export interface CliArgs {
  file: string;
  /** Only print the usage. */
  help?: boolean;
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
    if (a === '--help' || a === '-h') return { file: '', json: false, quiet: true, help: true };
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
      throw new InputError('USAGE', [{ path: a, value: a, message: 'is not a known option (--json, --out FILE, --pdf FILE, --quiet, --threads N, --help)' }]);
    } else if (args.file === undefined) args.file = a;
    else throw new InputError('USAGE', [{ path: 'arguments', value: a, message: 'only one scenario file may be given' }]);
  }
  if (args.file === undefined) throw new InputError('USAGE', [{ path: 'scenario file', value: undefined, message: 'is required' }]);
  return args as CliArgs;
}

/**
 * Text safe to print on a terminal: control characters (except line breaks and tabs) and direction marks
 * shown as `\u{…}` escapes, so no scenario text can move the cursor, ring the bell or recolour the screen.
 */
export function terminalSafe(s: string): string {
  return s.replace(/[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/gu, (c) => `\\u{${c.codePointAt(0)!.toString(16)}}`);
}

/** A write of an output file failed (after the evaluation); the message names the options and the files. */
class OutputError extends Error {}

function writeOutputs(files: readonly { option: string; path: string; data: string | Uint8Array }[]): void {
  try {
    writeTogether(files);
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    const what = files.map((f) => `${f.option} ${f.path}`).join(' and ');
    throw new OutputError(`cannot write ${what}: ${err.code ?? err.message}; ${files.length > 1 ? 'neither file was changed' : 'nothing was written there'}`);
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

/** JSON text with the characters JSON.stringify leaves raw (DEL, C1 controls, direction marks) escaped as \\uXXXX. */
function jsonSafe(text: string): string {
  return text.replace(/[\u007f-\u009f\u202a-\u202e\u2066-\u2069]/gu, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/**
 * Runs fn with SIGTERM and SIGHUP held: writes are synchronous, so a signal arriving meanwhile is handled
 * after them; the process then exits (143 / 129) with the files complete instead of half-written.
 */
async function withSignalsHeld<T>(fn: () => T): Promise<T> {
  let received: NodeJS.Signals | undefined;
  const hold = (sig: NodeJS.Signals) => {
    received ??= sig;
  };
  const signals: NodeJS.Signals[] = ['SIGTERM', 'SIGHUP'];
  for (const sig of signals) process.on(sig, hold);
  try {
    return fn();
  } finally {
    // Let a signal that arrived during the writes reach its handler before the handlers are removed.
    await new Promise((r) => setImmediate(r));
    for (const sig of signals) process.off(sig, hold);
    if (received) {
      process.stderr.write(`stopped by ${received}; the output files were completed first\n`);
      process.exit(received === 'SIGTERM' ? 143 : 129);
    }
  }
}

/** Runs the CLI; resolves to the exit code (0 ok, 1 invalid scenario or failed run, 2 usage). */
export async function main(argv: string[]): Promise<number> {
  let args: CliArgs;
  try {
    args = parseArgs(argv);
  } catch (e) {
    err(`${(e as Error).message}\n${USAGE}\n`);
    return 2;
  }
  if (args.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  if (!outputsWritable(args)) return 1;
  const text = readScenarioFile(args.file);
  if (text === undefined) return 1;
  try {
    if (isLandscapeText(text)) {
      const progress = progressBar(!args.quiet && process.stderr.isTTY === true);
      return await runLandscapeCli(text, { file: args.file, json: args.json, out: args.out, pdf: args.pdf, progress, write: (option, path, data) => writeOutputs([{ option, path, data }]) });
    }
    return await evaluateTransect(args, text);
  } catch (e) {
    return failure(args, e);
  }
}

/** Writes to standard error, terminal-safe. */
const err = (s: string) => process.stderr.write(terminalSafe(s));

/** Checks the output files can be written (before any work), then finishes what an interrupted run left. */
function outputsWritable(args: CliArgs): boolean {
  const outputs = [args.out, args.pdf].filter((p): p is string => p !== undefined);
  for (const [option, path] of [['--out', args.out], ['--pdf', args.pdf]] as const) {
    const reason = path === undefined ? undefined : unwritableReason(path);
    if (reason) {
      err(`cannot write ${option} ${path}: ${reason}; nothing was written\n`);
      return false;
    }
  }
  for (const note of recoverOutputs(outputs)) err(`note: ${note}\n`);
  return true;
}

/** The scenario file's text, or undefined after saying why it cannot be read. */
function readScenarioFile(file: string): string | undefined {
  try {
    return readFileSync(file, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code && READ_ERRORS[code] ? `${code} (${READ_ERRORS[code]})` : (code ?? (e as Error).message);
    err(`cannot read scenario file ${file}: ${why}\n`);
    return undefined;
  }
}

/** A transect scenario: evaluated, then its summary or document printed or written (with the briefing). */
async function evaluateTransect(args: CliArgs, text: string): Promise<number> {
  const scenario = parseScenarioText(text);
  if (args.pdf) {
    // Refused before the run: text the briefing's fonts cannot draw (report/pdf/fonts.ts).
    const unsupported = briefingTextProblems(scenario);
    if (unsupported.length) {
      err(`cannot write --pdf ${args.pdf}:\n${formatProblems(unsupported).replace(/^/gm, '  ')}\nnothing was written\n`);
      return 1;
    }
  }
  const { doc, cancelled } = await evaluateStoppable(scenario, args);
  const files: { option: string; path: string; data: string | Uint8Array }[] = [];
  if (args.pdf) files.push({ option: '--pdf', path: args.pdf, data: await renderBriefing(doc, { scenario, rawInput: parseJsonText(text) }) });
  const output = args.json ? jsonSafe(`${JSON.stringify(doc, null, 1)}\n`) : terminalSafe(`${textSummary(doc)}\n`);
  if (args.out) files.push({ option: '--out', path: args.out, data: output });
  if (files.length) await withSignalsHeld(() => writeOutputs(files));
  if (args.pdf && !args.json && !args.out) err(`briefing written to ${args.pdf}\n`);
  else if (!args.out) process.stdout.write(output);
  // Interrupted: the partial result is written, and the exit code says it is partial.
  return cancelled ? 130 : 0;
}

/** Evaluates with Ctrl-C stopping an ensemble cleanly (the draws done so far are reported); a second Ctrl-C quits. */
async function evaluateStoppable(scenario: Scenario, args: CliArgs) {
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
  try {
    const doc = await evaluateScenarioParallel(scenario, {
      threads: args.threads,
      shouldCancel: () => cancelled,
      onProgress: progressBar(!args.quiet && process.stderr.isTTY === true),
    });
    return { doc, cancelled };
  } finally {
    process.off('SIGINT', onSigint);
  }
}

/** The exit code of a failed run, after saying why in words. */
function failure(args: CliArgs, e: unknown): number {
  if (e instanceof InputError && e.code === NON_FINITE_CODE) {
    err(`evaluation stopped, no result: ${e.message}\n`);
    return 1;
  }
  if (e instanceof InputError) {
    err(`${args.file} is not a valid scenario:\n${formatProblems(e.problems).replace(/^/gm, '  ')}\n`);
    return 1;
  }
  if (e instanceof OutputError) {
    err(`${e.message}\n`);
    return 1;
  }
  err(`evaluation failed: ${(e as Error).message}\n`);
  return 1;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
