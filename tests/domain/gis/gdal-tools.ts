/**
 * Debian's gdal-bin as the independent reference for GIS files (gdalinfo, gdaltransform, gdal_rasterize,
 * gdal_translate). Tests that need it skip with a printed "SKIPPED …" line where it is missing.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

let available: boolean | null = null;

/** True when gdalinfo runs here. */
export function hasGdal(): boolean {
  if (available === null) available = spawnSync('gdalinfo', ['--version'], { encoding: 'utf8' }).status === 0;
  return available;
}

/** Prints the skip line once per caller and returns true when GDAL is missing. */
export function skipWithoutGdal(what: string): boolean {
  if (hasGdal()) return false;
  console.warn(`SKIPPED: gdal-bin (gdalinfo) not found; ${what} did not run`);
  return true;
}

/** Runs a GDAL command; throws with its stderr on failure. */
export function gdal(cmd: string, args: string[], input?: string): string {
  const r = spawnSync(cmd, args, { encoding: 'utf8', input, maxBuffer: 64 << 20 });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} failed: ${r.stderr || r.error}`);
  return r.stdout;
}

/** A fresh temporary folder, removed by the returned function. */
export function tempDir(): { dir: string; done: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'gis-test-'));
  return { dir, done: () => rmSync(dir, { recursive: true, force: true }) };
}
