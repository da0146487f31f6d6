/**
 * Command line: `npm run fit -- <scenario.json> <records.csv> [--start FROM:TO] [--out FILE] [--json]`.
 * Fits the scenario's movement rate (and, where given as ranges and the records allow, growth rate and edge
 * preference) to survey records, prints the fit and writes the scenario with the fitted ranges adopted.
 * A landscape scenario takes records with map positions (x, y) and is fitted from its radial front
 * (analysis/calibration/map-fit.ts); its map files are read from the scenario's folder.
 */
import { readFileSync } from 'node:fs';
import { basename, dirname } from 'node:path';
import { parseScenarioText } from './model/scenario.ts';
import { InputError, formatProblems } from './model/errors.ts';
import { parseSurveyCsv } from './model/survey.ts';
import { adoptFit, fitSurvey, type FitOptions } from './analysis/calibration/fit.ts';
import { fitSummaryText, mapFitSummaryText } from './report/fit-text.ts';
import { coordinatesOf, parseLandscapeScenario } from './model/landscape.ts';
import { parseJsonText } from './model/json-text.ts';
import { loadLandscape } from './domain/gis/load.ts';
import { mapFileNames } from './analysis/landscape-scenario.ts';
import { adoptMapFit, fitMapSurvey } from './analysis/calibration/map-fit.ts';
import { isLandscapeText, readMapFiles } from './landscape-cli.ts';
import { unwritableReason, writeAtomically } from './cli.ts';

const USAGE = `usage: npm run fit -- <scenario.json> <records.csv> [--start FROM:TO] [--lead YEARS] [--out FILE] [--json]
  --start FROM:TO  the stretch [km] the pest spread from at the start (default: the scenario's infestation)
  --lead YEARS     how many years before the first survey the spread may have started (default: automatic)
  --out FILE       where to write the scenario with the fitted ranges (default: <scenario>-fitted.json here)
  --json           print the fit as JSON instead of the readable summary`;

export interface FitArgs {
  scenario: string;
  records: string;
  out?: string;
  json: boolean;
  start?: { fromKm: number; toKm: number };
  lead?: number;
}

/** @throws InputError naming the bad argument */
export function parseFitArgs(argv: string[]): FitArgs {
  const files: string[] = [];
  const a: Partial<FitArgs> = { json: false };
  for (let i = 0; i < argv.length; i++) {
    const x = argv[i];
    const value = () => {
      const v = argv[++i];
      if (v === undefined || v.startsWith('--')) throw new InputError('USAGE', [{ path: x, value: v, message: 'needs a value' }]);
      return v;
    };
    if (x === '--json') a.json = true;
    else if (x === '--out') a.out = value();
    else if (x === '--start') {
      const v = value();
      const m = /^(-?[\d.]+):(-?[\d.]+)$/.exec(v);
      if (!m || !(Number(m[2]) > Number(m[1]))) throw new InputError('USAGE', [{ path: '--start', value: v, message: 'must be FROM:TO in km with FROM < TO, e.g. 0:1' }]);
      a.start = { fromKm: Number(m[1]), toKm: Number(m[2]) };
    } else if (x === '--lead') {
      const v = value();
      const t = Number(v);
      if (!(t >= 0 && t <= 60)) throw new InputError('USAGE', [{ path: '--lead', value: v, message: 'must be a number of years from 0 to 60' }]);
      a.lead = t;
    } else if (x.startsWith('--')) throw new InputError('USAGE', [{ path: x, value: x, message: 'is not a known option (--start FROM:TO, --lead YEARS, --out FILE, --json)' }]);
    else files.push(x);
  }
  if (files.length !== 2) throw new InputError('USAGE', [{ path: 'arguments', value: files.join(' ') || undefined, message: 'need a scenario file and a records file' }]);
  return { ...a, scenario: files[0], records: files[1] } as FitArgs;
}

function readText(path: string, what: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    throw new InputError('FILE', [{ path: what, value: path, message: `cannot be read (${(e as NodeJS.ErrnoException).code ?? 'error'})` }]);
  }
}

export async function main(argv: string[], out: (s: string) => void = (s) => process.stdout.write(s), err: (s: string) => void = (s) => process.stderr.write(s)): Promise<number> {
  try {
    const args = parseFitArgs(argv);
    const text = readText(args.scenario, 'scenario file');
    const table = parseSurveyCsv(readText(args.records, 'records file'));
    const target = args.out ?? `${basename(args.scenario, '.json')}-fitted.json`;
    const why = unwritableReason(target);
    if (why) throw new InputError('USAGE', [{ path: '--out', value: target, message: why }]);
    if (isLandscapeText(text)) {
      if (args.start || args.lead !== undefined) throw new InputError('USAGE', [{ path: args.start ? '--start' : '--lead', value: args.start ? `${args.start.fromKm}:${args.start.toKm}` : args.lead, message: 'applies to transects only (on a map the spread starts from the scenario’s infestation)' }]);
      const landscape = parseLandscapeScenario(parseJsonText(text));
      const loaded = await loadLandscape(landscape, readMapFiles(mapFileNames(landscape), dirname(args.scenario)));
      const toMap = coordinatesOf(landscape) === 'lonlat' ? loaded.projector.fromLonLat : undefined;
      const fit = fitMapSurvey(landscape, loaded, table, { toMap });
      writeAtomically(target, JSON.stringify(adoptMapFit(landscape, fit), null, 2) + '\n');
      out(args.json ? JSON.stringify(fit, null, 2) + '\n' : mapFitSummaryText(fit) + `\nScenario with the fitted range written to ${target}.\n`);
      return 0;
    }
    const scenario = parseScenarioText(text);
    const opts: FitOptions = { start: args.start, leadYears: args.lead };
    const fit = fitSurvey(scenario, table, opts);
    const adopted = adoptFit(scenario, fit);
    writeAtomically(target, JSON.stringify(adopted, null, 2) + '\n');
    out(args.json ? JSON.stringify(fit, null, 2) + '\n' : fitSummaryText(fit) + `\nScenario with the fitted ranges written to ${target}.\n`);
    return 0;
  } catch (e) {
    if (e instanceof InputError) {
      err(`${formatProblems(e.problems)}\n`);
      if (e.code === 'USAGE') err(`${USAGE}\n`);
      return 1;
    }
    err(`fit failed: ${(e as Error).message}\n`);
    return 1;
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
