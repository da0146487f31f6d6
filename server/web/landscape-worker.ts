/**
 * One landscape evaluation for the web app, run in a child process (landscape-child.ts): loads the map,
 * evaluates every band, draws the maps and prepares every download, so the server only serves bytes.
 * Progress goes through `report`.
 */
import { parseLandscapeScenario } from '../model/landscape.ts';
import { InputError } from '../model/errors.ts';
import type { TaskRunner } from '../jobs/task-runner.ts';
import { evaluateLandscapeScenario, landscapeJson, type LandscapeDocument } from '../analysis/landscape-scenario.ts';
import { mapBaseOf, mapsForLandscape } from '../report/maps/index.ts';
import { renderLandscapeBriefing } from '../report/landscape/briefing.ts';
import { arrivalGeoTiff, bandsGeoJson, contoursGeoJson } from '../domain/gis/downloads.ts';
import { frontStep } from '../report/maps/landscape-maps.ts';

export interface LandscapeTask {
  scenario: unknown;
  files: Record<string, Uint8Array>;
  report?: (fraction: number, message: string) => void;
  /** Where the runs go (the child process's own worker threads); this thread when absent. */
  runner?: TaskRunner;
}

export interface LandscapeDownload {
  name: string;
  label: string;
  type: string;
  bytes: Uint8Array;
}

export type LandscapeTaskResult =
  | { ok: true; doc: LandscapeDocument; maps: { id: string; title: string; hint: string; svg: string }[]; downloads: LandscapeDownload[] }
  | { ok: false; code: string; message: string; problems: { path: string; value: unknown; message: string }[] };

export default async function run(task: LandscapeTask): Promise<LandscapeTaskResult> {
  try {
    const scenario = parseLandscapeScenario(task.scenario);
    let last = 0;
    const ev = await evaluateLandscapeScenario(scenario, task.files, {
      runner: task.runner,
      onProgress: (fraction, message) => {
        const now = Date.now();
        if (now - last > 300) {
          last = now;
          task.report?.(fraction, message);
        }
      },
    });
    task.report?.(0.97, 'drawing the maps and the downloads');
    const base = mapBaseOf(ev.loaded);
    const maps = mapsForLandscape(base, ev.result);
    const pdfMaps = mapsForLandscape(base, ev.result, { width: 560 });
    const grid = { nx: ev.loaded.nx, ny: ev.loaded.ny, cellM: ev.loaded.cellM, originXM: ev.loaded.originXM, originYM: ev.loaded.originYM, crs: ev.loaded.crs };
    const enc = (s: string) => new TextEncoder().encode(s);
    const downloads: LandscapeDownload[] = [
      { name: 'arrival-baseline.tif', label: 'Arrival year without a band (GeoTIFF, map CRS)', type: 'image/tiff', bytes: await arrivalGeoTiff(ev.result.baseline.arrival.years, grid) },
    ];
    for (const [k, o] of ev.result.options.entries()) {
      const key = ev.doc.options[k].key;
      downloads.push({ name: `arrival-${key}.tif`, label: `Arrival year with band ${key} (GeoTIFF, map CRS)`, type: 'image/tiff', bytes: await arrivalGeoTiff(o.run.arrival.years, grid) });
    }
    const runs = [{ run: 'baseline', arrivalYears: ev.result.baseline.arrival.years }, ...ev.result.options.map((o, k) => ({ run: `${ev.doc.options[k].key}: ${o.label}`, arrivalYears: o.run.arrival.years }))];
    downloads.push({ name: 'fronts.geojson', label: 'Front lines per year, every run (GeoJSON, lon/lat)', type: 'application/geo+json', bytes: enc(JSON.stringify(contoursGeoJson(runs, grid, ev.doc.horizonYears, ev.loaded.projector, frontStep(ev.doc.horizonYears)))) });
    downloads.push({
      name: 'bands.geojson',
      label: 'Band polygons (GeoJSON, lon/lat)',
      type: 'application/geo+json',
      bytes: enc(JSON.stringify(bandsGeoJson(ev.loaded.bands.map((b, k) => ({ key: ev.doc.options[k]?.key ?? String(k + 1), label: b.label, polygon: ev.loaded.bandPolygons[k], treatment: b.treatment, widthM: b.widthM, areaM2: b.areaM2 })), ev.loaded.projector))),
    });
    downloads.push({ name: 'result.json', label: 'Result document (JSON)', type: 'application/json', bytes: enc(landscapeJson(ev)) });
    downloads.push({ name: 'scenario.json', label: 'Exact scenario (JSON)', type: 'application/json', bytes: enc(`${JSON.stringify(task.scenario, null, 1)}\n`) });
    downloads.push({ name: 'briefing.pdf', label: 'Briefing (PDF)', type: 'application/pdf', bytes: new Uint8Array(await renderLandscapeBriefing(ev.doc, pdfMaps)) });
    return { ok: true, doc: ev.doc, maps: maps.map((m) => ({ id: m.id, title: m.title, hint: m.hint, svg: m.svg })), downloads };
  } catch (e) {
    if (e instanceof InputError) return { ok: false, code: e.code, message: e.message, problems: e.problems.map((p) => ({ path: p.path, value: p.value, message: p.message })) };
    return { ok: false, code: 'FAILED', message: `the evaluation stopped: ${(e as Error).message}`, problems: [] };
  }
}
