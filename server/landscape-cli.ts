/**
 * The command line for landscape scenarios (`"kind": "landscape"`): `npm run evaluate -- FILE [--json]
 * [--out FILE] [--pdf FILE]` as for transects. Map files are read from the scenario file's folder.
 * Called from cli.ts once the file is seen to be a landscape scenario.
 */
import { readFileSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { parseLandscapeScenario, isLandscapeInput, MAX_MAP_FILE_BYTES } from './model/landscape.ts';
import { ScenarioError, InputError, formatProblems } from './model/errors.ts';
import { MapFileTooLargeError, MapFileError } from './domain/gis/errors.ts';
import { evaluateLandscapeScenario, landscapeJson, mapFileNames } from './analysis/landscape-scenario.ts';
import { makePoolRunner, defaultThreads } from './jobs/pool-runner.ts';
import { landscapeTextSummary } from './report/landscape/summary.ts';
import { renderLandscapeBriefing } from './report/landscape/briefing.ts';
import { mapBaseOf, mapsForLandscape } from './report/maps/index.ts';

export interface LandscapeCliIo {
  file: string;
  json: boolean;
  out?: string;
  pdf?: string;
  progress: (fraction: number, stage: string) => void;
  /** Writes an output file atomically; throws an error naming the option and file on failure. */
  write: (option: string, path: string, data: string | Uint8Array) => void;
}

/** True when the text is JSON of a landscape scenario (`"kind": "landscape"`). */
export function isLandscapeText(text: string): boolean {
  try {
    return isLandscapeInput(JSON.parse(text));
  } catch {
    return false;
  }
}

/** Reads the map files a scenario names from `folder`, refusing oversized files before reading them. */
export function readMapFiles(names: string[], folder: string): Record<string, Uint8Array> {
  const files: Record<string, Uint8Array> = {};
  names.forEach((name, i) => {
    const path = i === 0 ? 'map.file' : 'map.classes.file';
    const full = join(folder, name);
    let size: number;
    try {
      size = statSync(full).size;
    } catch {
      throw new MapFileError([{ path, value: name, message: `was not found beside the scenario (looked for ${full})` }]);
    }
    if (size > MAX_MAP_FILE_BYTES) throw new MapFileTooLargeError({ path, value: name, message: `is ${(size / 1048576).toFixed(1)} MB; map files may be at most ${MAX_MAP_FILE_BYTES / 1048576} MB` });
    files[name] = readFileSync(full);
  });
  return files;
}

/** Runs a landscape scenario given as JSON text; resolves to the exit code. */
export async function runLandscapeCli(text: string, io: LandscapeCliIo): Promise<number> {
  try {
    let raw: unknown;
    try {
      raw = JSON.parse(text);
    } catch (e) {
      throw new ScenarioError([{ path: '', value: text.trim().slice(0, 40), message: `is not valid JSON (${(e as Error).message})` }]);
    }
    const scenario = parseLandscapeScenario(raw);
    const files = readMapFiles(mapFileNames(scenario), dirname(io.file));
    // The baseline and the options run side by side on this machine's cores (the same numbers as one thread).
    const runner = makePoolRunner({ threads: Math.min(defaultThreads(), 1 + scenario.bands.options.length) });
    let ev: Awaited<ReturnType<typeof evaluateLandscapeScenario>>;
    try {
      ev = await evaluateLandscapeScenario(scenario, files, { onProgress: io.progress, runner });
    } finally {
      await runner.close();
    }
    io.progress(1, 'done');
    if (io.pdf) {
      const maps = mapsForLandscape(mapBaseOf(ev.loaded), ev.result, { width: 560 });
      io.write('--pdf', io.pdf, await renderLandscapeBriefing(ev.doc, maps));
      if (!io.json && !io.out) {
        process.stderr.write(`briefing written to ${io.pdf}\n`);
        return 0;
      }
    }
    const output = io.json ? landscapeJson(ev) : `${landscapeTextSummary(ev.doc)}\n`;
    if (io.out) io.write('--out', io.out, output);
    else process.stdout.write(output);
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`${io.file} is not a valid landscape scenario (${e.code}):\n${formatProblems(e.problems).replace(/^/gm, '  ')}\n`);
      return 1;
    }
    throw e;
  }
}
