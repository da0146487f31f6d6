/**
 * Output files of the command lines, written so a failed or killed run never leaves one half-written: each
 * file through a hidden temporary in its folder and a rename; several files as one unit with a small journal
 * (writeTogether); what an interrupted run left behind is completed or removed by the next run
 * (recoverOutputs). unwritableReason checks an output before any work is done.
 */
import { accessSync, closeSync, constants, existsSync, fsyncSync, openSync, readdirSync, readFileSync, renameSync, statSync, writeSync, rmSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';

/** Hidden temporary file of an output, in the output's folder: `.<name>.<pid>.tmp`. */
function tempName(path: string): string {
  return join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
}

/** Writes data and flushes it to the disk before returning. */
function writeDurably(path: string, data: string | Uint8Array): void {
  const fd = openSync(path, 'w');
  try {
    const bytes = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
    let off = 0;
    while (off < bytes.length) off += writeSync(fd, bytes, off, bytes.length - off);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** Writes text to a file via a temporary file in the same folder, so a failed run leaves nothing half-written. */
export function writeAtomically(path: string, data: string | Uint8Array): void {
  writeTogether([{ path, data }]);
}

/**
 * Writes several output files as one unit: every temporary file is written and flushed first; then a
 * journal naming the renames is written (`.<first name>.<pid>.pair`), then the renames, then the journal is
 * removed. Killed before the journal exists, the old files stay as they were (and the next run removes the
 * temporaries); killed after, the next run finds the journal and completes the renames (recoverOutputs).
 */
export function writeTogether(files: readonly { path: string; data: string | Uint8Array }[]): void {
  const temps = files.map((f) => tempName(f.path));
  const journal = files.length > 1 ? join(dirname(files[0].path), `.${basename(files[0].path)}.${process.pid}.pair`) : undefined;
  try {
    files.forEach((f, i) => writeDurably(temps[i], f.data));
    if (journal) {
      writeDurably(`${journal}.tmp`, JSON.stringify({ renames: files.map((f, i) => [temps[i], f.path]) }));
      renameSync(`${journal}.tmp`, journal);
    }
    files.forEach((f, i) => renameSync(temps[i], f.path));
    if (journal) rmSync(journal, { force: true });
  } catch (e) {
    for (const t of temps) rmSync(t, { force: true });
    if (journal) rmSync(`${journal}.tmp`, { force: true });
    if (journal && existsSync(journal)) recoverJournal(journal);
    throw e;
  }
}

/** True when a process with this id is running (so its temporaries are not stale). */
function alive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Completes the renames a journal lists (their temporaries were complete before it was written), then removes it. */
function recoverJournal(journal: string): void {
  try {
    const { renames } = JSON.parse(readFileSync(journal, 'utf8')) as { renames: [string, string][] };
    for (const [from, to] of renames) if (existsSync(from)) renameSync(from, to);
  } catch {
    // A journal that cannot be read was never complete (it is renamed into place whole): nothing to finish.
  }
  rmSync(journal, { force: true });
}

/**
 * Cleans up after an earlier run killed while writing into the folders of these outputs: completes the pair
 * writes whose journal exists, then removes hidden temporaries of processes that no longer run.
 * @returns the names of what was completed or removed (for a note on standard error)
 */
export function recoverOutputs(paths: readonly string[]): string[] {
  const done: string[] = [];
  for (const folder of new Set(paths.map((p) => dirname(p)))) {
    let names: string[];
    try {
      names = readdirSync(folder);
    } catch {
      continue;
    }
    const stale = (n: string, ext: string) => {
      const m = new RegExp(`^\\..+\\.(\\d+)\\.${ext}$`).exec(n);
      return m !== null && !alive(Number(m[1]));
    };
    for (const n of names.filter((x) => stale(x, 'pair'))) {
      recoverJournal(join(folder, n));
      done.push(`completed the interrupted write recorded in ${join(folder, n)}`);
    }
    for (const n of readdirSync(folder).filter((x) => stale(x, 'tmp') || stale(x, 'pair\\.tmp'))) {
      rmSync(join(folder, n), { force: true });
      done.push(`removed ${join(folder, n)}, left by an interrupted run`);
    }
  }
  return done;
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
