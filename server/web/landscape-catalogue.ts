/**
 * The demo landscapes of the web app: every `*.json` in scenarios/landscapes/ with the map files it names,
 * read once at start. A reference is `demo-<file name>`; references are looked up in this list only, so no
 * request text is ever used as a path. The web run uses a coarser model cell than the demo file when the
 * file's own cell would take too long for a page (WEB_CELL_M); the page says so.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { parseLandscapeScenario, type LandscapeScenario } from '../model/landscape.ts';
import { mapFileNames } from '../analysis/landscape-scenario.ts';

/** Model cell of a web run of a demo map [m]: the demo valley at 400 m computes in about 15 s on one core. */
export const WEB_CELL_M = 400;

export interface LandscapeDemo {
  ref: string;
  title: string;
  description: string;
  /** The scenario as in the file (raw JSON), its model cell set to the web cell. */
  raw: Record<string, unknown>;
  scenario: LandscapeScenario;
  files: Record<string, Uint8Array>;
  cellNote: string;
}

const SAFE_NAME = /^[a-z0-9][a-z0-9-]{0,79}$/;

export function loadLandscapeDemos(dir: string, warn: (msg: string) => void = () => {}): LandscapeDemo[] {
  let names: string[];
  try {
    names = readdirSync(dir).filter((f) => f.endsWith('.json')).sort();
  } catch {
    return [];
  }
  const out: LandscapeDemo[] = [];
  for (const file of names) {
    const name = basename(file, '.json');
    if (!SAFE_NAME.test(name)) continue;
    try {
      const raw = JSON.parse(readFileSync(join(dir, file), 'utf8')) as Record<string, unknown>;
      if (raw.kind !== 'landscape') continue; // other JSON beside the maps (e.g. stand tables)
      const map = raw.map as Record<string, unknown>;
      const ownCell = typeof map.cellM === 'number' ? map.cellM : null;
      let cellNote = '';
      if (ownCell === null || ownCell < WEB_CELL_M) {
        map.cellM = WEB_CELL_M;
        cellNote = `This web run uses ${WEB_CELL_M} m model cells${ownCell ? ` (the demo file's own cell is ${ownCell} m)` : ''} so it finishes in well under a minute; fronts and arrival years are coarser than at the file's own cell. The command-line evaluation (npm run evaluate) uses the file's cell.`;
      } else cellNote = `Model cell ${ownCell} m, as in the demo file.`;
      const scenario = parseLandscapeScenario(raw);
      const files: Record<string, Uint8Array> = {};
      for (const f of mapFileNames(scenario)) {
        if (!SAFE_NAME.test(f.replace(/\.(tif|tiff|geojson|json)$/, ''))) throw new Error(`map file name ${f} is not a plain file name`);
        files[f] = new Uint8Array(readFileSync(join(dir, f)));
      }
      out.push({ ref: `demo-${name}`, title: scenario.title, description: scenario.description, raw, scenario, files, cellNote });
    } catch (e) {
      warn(`demo landscape ${file} cannot be used and is skipped: ${(e as Error).message}`);
    }
  }
  return out;
}
