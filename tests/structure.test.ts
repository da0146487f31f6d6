/**
 * The tests mirror server/: every module with logic has tests/<same path>.test.ts, or an entry in
 * COVERED_ELSEWHERE below naming the test files that exercise it and why it has none of its own.
 *
 * "Logic" is decided from the syntax tree (TypeScript's own parser): a module has logic when it holds
 * at least one function, method, accessor or arrow body. Pure type files, one-line re-exports, .d.ts
 * files and constant tables without functions need no test. A new module with logic and neither a
 * mirrored test nor an entry fails this test — so the rule cannot rot silently. An entry whose module
 * has meanwhile gained its mirrored test, or no longer exists, fails as well (keep the map honest).
 *
 * Each entry's `by` files must really reach the module: through the static import graph (value imports,
 * re-exports, dynamic import() and worker files named by new URL('./x.ts', import.meta.url)), or, for a
 * process entry point started by path (`kind: 'process'`), by naming its path in the test's text.
 */
import fs from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const ROOT = path.resolve(import.meta.dirname, '..');

interface Cover {
  /** Test files (repository paths) that exercise the module. */
  by: string[];
  /** Why the module has no test of its own. */
  why: string;
  /** 'process': a program started by path (the test names the path instead of importing it). */
  kind?: 'process';
}

// Shared reasons (one line each, so an entry reads "module → where it is checked, and why there").
const WEB = 'web layer (route, plugin or view-model): exercised end to end through app.inject pages and API calls, where its output is checked as the user sees it';
const CHART = 'chart part: every chart is drawn from fixture results and its SVG checked (axes, legend, escaping, greyscale keys) in the chart tests';
const PDF = 'PDF layout helper: checked through the briefing read back with pdfjs-dist and rasterised with pdftoppm';
const MAP = 'landscape map part: checked through the rendered maps (PNG decode, ramps, contours) in the maps test';
const LANDSCAPE = 'landscape (2-D) analysis step: checked against closed forms on the raster mesh in the landscape verification tests and the landscape evaluation test';
const WORKER = 'worker-thread entry (a file a pool loads by path): exercised by the pool tests that start it';

/** For a module that has no test of its own yet (say so, rather than invent a reason): the next tests to write. */
export const INDIRECT = 'no test of its own yet: exercised only indirectly, through larger runs in the tests named';

/** Modules with logic and no mirrored test: which tests cover them, and why there. */
const COVERED_ELSEWHERE: Record<string, Cover> = {
  // analysis/
  'server/analysis/bypass/analyse-bypass.ts': { by: ['tests/analysis/evaluate/evaluate.test.ts', 'tests/golden/demos.test.ts'], why: 'adds the bypass section around the kernel (bypass.ts, tested on its own); its numbers are pinned by the golden demo documents' },
  'server/analysis/calibration/fit-worker.ts': { by: ['tests/web/fit-pages.test.ts'], why: WORKER + ' (the fit page runs the fit in it)' },
  'server/analysis/calibration/model-fit.ts': { by: ['tests/analysis/calibration/fit.test.ts', 'tests/analysis/calibration/ensemble-adoption.test.ts'], why: 'profile likelihood over D: checked by recovery on simulated records and by the adopted range in the ensemble' },
  'server/analysis/calibration/synthetic.ts': { by: ['tests/analysis/calibration/fit.test.ts', 'tests/analysis/calibration/map-fit.test.ts'], why: 'test-data generator (records from known parameters): it is the truth side of the recovery tests' },
  'server/analysis/calibration/quick.ts': { by: ['tests/analysis/calibration/fit.test.ts', 'tests/analysis/calibration/map-fit.test.ts'], why: 'the quick estimate of the fit (front rate → movement rate, Monte Carlo over the growth rate); checked within the fits, whose recovery tests use known parameters' },
  'server/analysis/calibration/ranges.ts': { by: ['tests/analysis/calibration/fit.test.ts', 'tests/analysis/calibration/ensemble-adoption.test.ts'], why: 'the fitted ranges and the distributions they are adopted as; checked by the fits and by P(holds) = F(D*) after adoption' },
  'server/analysis/evaluate/cautions.ts': { by: ['tests/report/briefing.test.ts'], why: 'a fixed caution list; the briefing test checks the cautions appear' },
  'server/analysis/finite-guard.ts': { by: ['tests/numerics/finite.test.ts'], why: 'tested with the finite checks it wraps (a non-finite run becomes a ComputationError)' },
  'server/analysis/landscape-scenario.ts': { by: ['tests/cli.test.ts', 'tests/cli-files.test.ts'], why: 'dispatch between transect and landscape scenarios for the command lines; checked through their exit codes and outputs' },
  'server/analysis/landscape/cross-section.ts': { by: ['tests/verification/landscape-transect.test.ts', 'tests/analysis/landscape/evaluate.test.ts'], why: LANDSCAPE },
  'server/analysis/landscape/holds.ts': { by: ['tests/analysis/landscape/evaluate.test.ts', 'tests/verification/landscape-rotation.test.ts'], why: LANDSCAPE },
  'server/analysis/landscape/option.ts': { by: ['tests/analysis/landscape/evaluate.test.ts', 'tests/analysis/landscape/evaluate-on.test.ts'], why: LANDSCAPE },
  'server/analysis/landscape/run-tasks.ts': { by: ['tests/analysis/landscape/evaluate-on.test.ts'], why: 'the run and hold tasks, checked bit for bit against the one-thread evaluation' },
  'server/analysis/landscape/paths.ts': { by: ['tests/analysis/landscape/evaluate.test.ts', 'tests/verification/landscape-rotation.test.ts'], why: LANDSCAPE },
  'server/analysis/landscape/problem.ts': { by: ['tests/verification/landscape-critical-patch.test.ts', 'tests/verification/landscape-radial.test.ts'], why: LANDSCAPE },
  'server/analysis/landscape/result.ts': { by: ['tests/analysis/landscape/evaluate.test.ts'], why: LANDSCAPE },
  'server/analysis/landscape/run.ts': { by: ['tests/analysis/calibration/map-fit.test.ts', 'tests/analysis/landscape/evaluate.test.ts'], why: LANDSCAPE },
  'server/analysis/verdict/option.ts': { by: ['tests/analysis/verdict/barrier.test.ts', 'tests/analysis/verdict/barrier-edge-cases.test.ts'], why: 'analyseOption, the verdict of one option: its tests are named after the verdict room\'s entry (verdict/barrier.ts re-exports it)' },
  'server/analysis/verdict/reasons.ts': { by: ['tests/analysis/verdict/barrier.test.ts', 'tests/analysis/verdict/barrier-edge-cases.test.ts'], why: 'the reason lines of a verdict; checked with the verdicts they explain' },
  'server/analysis/words.ts': { by: ['tests/analysis/verdict/barrier-edge-cases.test.ts'], why: 'one plural helper used in verdict sentences; checked in the sentences' },
  // entry points and jobs/
  'server/app.ts': { by: ['tests/web/app.test.ts', 'tests/web/api.test.ts'], why: 'buildApp: every web test builds the app and injects requests; app.test.ts is its test under the folder of the code it wires' },
  'server/cli-output.ts': { by: ['tests/cli-files.test.ts'], why: 'the command lines\' output files (atomic and paired writes, recovery after a killed run): cli-files.test.ts checks them through cli.ts, which re-exports them' },
  'server/main.ts': { by: ['tests/web/main.test.ts', 'tests/web/main-restart.test.ts'], why: 'process entry point: started as a child process (listen, graceful close, restart)', kind: 'process' },
  'server/jobs/evaluation-job.ts': { by: ['tests/jobs/pool-runner.test.ts', 'tests/jobs/queue-runner.test.ts'], why: 'runEvaluation on each runner: the runner tests compare its documents with the inline evaluation' },
  'server/jobs/evaluation-tasks.ts': { by: ['tests/jobs/pool-runner.test.ts'], why: 'registers the two stage task kinds over the analysis functions; checked through the runs that use them' },
  'server/jobs/parallel.ts': { by: ['tests/analysis/ensemble/ensemble.test.ts', 'tests/numerics/finite.test.ts'], why: 'an evaluation or ensemble on a pool of its own: the ensemble test checks pool and inline give identical draws' },
  'server/jobs/pool-worker.ts': { by: ['tests/jobs/pool-runner.test.ts'], why: WORKER },
  'server/jobs/probe-task.ts': { by: ['tests/jobs/pool-runner.test.ts', 'tests/jobs/queue-runner.test.ts'], why: 'a task kind for tests of the runners themselves (sleep, fail, cancel)' },
  'server/jobs/queue-config.ts': { by: ['tests/jobs/queue-runner.test.ts'], why: 'queue settings read from the environment; checked with the queue runner' },
  'server/jobs/queue-worker.ts': { by: ['tests/jobs/queue-runner.test.ts', 'tests/jobs/queue-web.test.ts'], why: 'process entry point (npm run worker): the queue tests start it as a child process', kind: 'process' },
  'server/jobs/tasks.ts': { by: ['tests/jobs/inline-runner.test.ts'], why: 'the task-kind registry (a map and two lookups); checked by the inline runner test' },
  // model/
  'server/model/pest.ts': { by: ['tests/model/scenario-validation.test.ts', 'tests/model/canonical.test.ts'], why: 'zod schema of the pest; the bad-scenario corpus checks each rule\'s path, value and range' },
  'server/model/scenario.ts': { by: ['tests/model/scenario-validation.test.ts', 'tests/model/canonical.test.ts'], why: 'zod schema of a scenario: the bad-scenario corpus (one file per kind of mistake) is its test' },
  // numerics/
  'server/numerics/raster/operator.ts': { by: ['tests/verification/landscape-numerics.test.ts', 'tests/verification/landscape-critical-patch.test.ts'], why: '2-D operator: checked against closed-form eigenvalues and the 1-D transect in the landscape verification tests' },
  'server/numerics/raster/stepper.ts': { by: ['tests/verification/landscape-numerics.test.ts', 'tests/verification/landscape-radial.test.ts'], why: '2-D stepper: convergence order and radial front speed in the landscape verification tests' },
  'server/numerics/steppers/reaction-diffusion-system.ts': { by: ['tests/numerics/steppers/adaptive-loop.test.ts', 'tests/verification/adaptive-fronts.test.ts'], why: 'the engine equations as a stiff system (residual, Jacobian, lockstep solve) for the NDF stepper: its orders and its agreement with the coupled TR-BDF2 runs are the test' },
  // report/
  'server/report/briefing-text.ts': { by: ['tests/report/briefing.test.ts', 'tests/report/briefing-provenance.test.ts'], why: 'the briefing\'s words and tables; read back from the PDF and checked in the briefing tests' },
  'server/report/charts/for-result.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/frame.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/front-position.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/host-profile.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/mosaic.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/parts.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/space-time.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/styles.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/svg.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/text-metrics.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/transect.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/charts/width-delay.ts': { by: ['tests/report/charts/charts.test.ts'], why: CHART },
  'server/report/fit-text.ts': { by: ['tests/fit-cli.test.ts', 'tests/web/fit-pages.test.ts'], why: 'the survey fit in words; checked in the fit command line\'s and fit page\'s output' },
  'server/report/landscape/briefing.ts': { by: ['tests/cli-files.test.ts'], why: 'landscape briefing PDF; checked through the command line\'s --pdf output' },
  'server/report/landscape/summary.ts': { by: ['tests/cli-files.test.ts'], why: 'landscape text summary; checked in the command line\'s output' },
  'server/report/maps/index.ts': { by: ['tests/report/maps/maps.test.ts'], why: MAP },
  'server/report/maps/landscape-maps.ts': { by: ['tests/report/maps/maps.test.ts'], why: MAP },
  'server/report/maps/png.ts': { by: ['tests/report/maps/maps.test.ts'], why: MAP },
  'server/report/maps/ramps.ts': { by: ['tests/report/maps/maps.test.ts'], why: MAP },
  'server/report/pdf/chart.ts': { by: ['tests/report/charts/charts.test.ts', 'tests/report/briefing.test.ts'], why: PDF },
  'server/report/pdf/document.ts': { by: ['tests/report/briefing.test.ts'], why: PDF },
  'server/report/pdf/flow.ts': { by: ['tests/report/briefing.test.ts'], why: PDF + ' (the stress test pins the page count)' },
  'server/report/text-summary.ts': { by: ['tests/web/consistency.test.ts', 'tests/cli.test.ts'], why: 'the text summary: the consistency test checks it says what the web page and briefing say' },
  // No test of its own yet: checked only indirectly, through the tests named (the next ones to write).
  'server/analysis/calibration/inversion.ts': { by: ['tests/analysis/calibration/statistics-inversion.test.ts'], why: 'closed-form Fisher–KPP and Nagumo inversions to round-off, and the engine-measured unit speed: one test file with statistics.ts (not split while the calibration tests are being edited elsewhere)' },
  'server/analysis/calibration/statistics.ts': { by: ['tests/analysis/calibration/statistics-inversion.test.ts'], why: 't quantiles against the printed table and scipy, normal points, Theil–Sen and least squares by hand: one test file with inversion.ts' },
  'server/domain/gis/place.ts': { by: ['tests/domain/gis/load.test.ts'], why: 'placing the infestation, sites and bands is the second half of loading a map: the load tests check the placed cells, the trees in a band and each placement error by field' },
  'server/domain/gis/errors.ts': { by: ['tests/domain/gis/load.test.ts', 'tests/domain/gis/geotiff.test.ts'], why: 'the map error classes (each a field path, value and message); thrown and read back by the load, geotiff and geojson tests of bad files' },
  'server/jobs/task-runner.ts': { by: ['tests/jobs/inline-runner.test.ts', 'tests/jobs/pool-runner.test.ts'], why: 'the TaskRunner interface with two constants and the CancelledError class; the runner tests check the contract (order, cancel, progress) on every runner' },
  // web/
  'server/web/briefing-worker.ts': { by: ['tests/web/api.test.ts'], why: WORKER + ' (the briefing download renders in it)' },
  'server/web/briefings.ts': { by: ['tests/web/api.test.ts'], why: WEB },
  'server/web/catalogue.ts': { by: ['tests/web/app.test.ts', 'tests/web/scenario-pages.test.ts'], why: WEB },
  'server/web/form-layout.ts': { by: ['tests/web/form-state.test.ts'], why: 'the form layout (sections, row tables, applies): the form-state round trips are its test (form-state.ts re-exports it)' },
  'server/web/form-read.ts': { by: ['tests/web/form-state.test.ts', 'tests/web/form-distance.test.ts'], why: 'form text → scenario: the form-state round trips are its test (form-state.ts is the entry that re-exports it)' },
  'server/web/form-write.ts': { by: ['tests/web/form-state.test.ts'], why: 'scenario → form text: the form-state round trips are its test (form-state.ts is the entry that re-exports it)' },
  'server/web/job-state.ts': { by: ['tests/web/durable-jobs.test.ts', 'tests/web/runs-results.test.ts'], why: WEB + ' (the in-memory job table jobs.ts runs on)' },
  'server/web/job-store.ts': { by: ['tests/web/durable-jobs.test.ts', 'tests/web/main.test.ts'], why: 'the jobs tables: checked by resuming stored jobs after a restart' },
  'server/web/jobs.ts': { by: ['tests/web/durable-jobs.test.ts', 'tests/web/runs-results.test.ts'], why: WEB },
  'server/web/landscape-catalogue.ts': { by: ['tests/web/landscape-demo.test.ts', 'tests/web/landscape-upload.test.ts'], why: WEB + ' (the demo maps listed and run at the web cell)' },
  'server/web/landscape-child.ts': { by: ['tests/web/landscape-demo.test.ts', 'tests/web/landscape-durable.test.ts'], why: 'child-process entry of a map evaluation (forked by path): exercised by every map run of the web tests' },
  'server/web/landscape-jobs.ts': { by: ['tests/web/landscape-durable.test.ts', 'tests/web/landscape-upload.test.ts'], why: WEB + ' (durable map jobs: resumed after a stop, cancelled)' },
  'server/web/landscape-pages.ts': { by: ['tests/web/landscape-demo.test.ts', 'tests/web/landscape-upload.test.ts', 'tests/web/landscape-browser.test.ts'], why: WEB + ' (the landscape pages, uploads and downloads)' },
  'server/web/landscape-worker.ts': { by: ['tests/web/landscape-demo.test.ts'], why: 'one map evaluation with its maps and downloads (run in the child process); the demo run reads every download back' },
  'server/web/plugins/errors.ts': { by: ['tests/web/api.test.ts', 'tests/web/input-edges.test.ts'], why: WEB },
  'server/web/plugins/json-body.ts': { by: ['tests/web/input-edges.test.ts', 'tests/web/api.test.ts'], why: WEB },
  'server/web/plugins/openapi.ts': { by: ['tests/web/api.test.ts'], why: WEB },
  'server/web/plugins/security.ts': { by: ['tests/web/security.test.ts'], why: WEB + ' (security.test.ts is its test under a plain name)' },
  'server/web/plugins/views.ts': { by: ['tests/web/app.test.ts'], why: WEB },
  'server/web/routes/api-schemas.ts': { by: ['tests/web/api.test.ts'], why: WEB + ' (the API\'s shared zod schemas; api.test.ts checks their answers and the OpenAPI document)' },
  'server/web/routes/api.ts': { by: ['tests/web/api.test.ts'], why: WEB + ' (api.test.ts is its test)' },
  'server/web/routes/fit-pages.ts': { by: ['tests/web/fit-pages.test.ts'], why: WEB + ' (fit-pages.test.ts is its test)' },
  'server/web/routes/reference-pages.ts': { by: ['tests/web/app.test.ts'], why: WEB },
  'server/web/routes/result-pages.ts': { by: ['tests/web/runs-results.test.ts'], why: WEB },
  'server/web/routes/run-pages.ts': { by: ['tests/web/runs-results.test.ts', 'tests/web/durable-jobs.test.ts'], why: WEB },
  'server/web/routes/scenario-pages.ts': { by: ['tests/web/scenario-pages.test.ts'], why: WEB + ' (scenario-pages.test.ts is its test)' },
  'server/web/store.ts': { by: ['tests/web/store-errors.test.ts', 'tests/web/runs-results.test.ts'], why: 'the sqlite store: failures in store-errors.test.ts, saving and reading back through the result pages' },
  'server/web/streams.ts': { by: ['tests/web/durable-jobs.test.ts'], why: WEB + ' (progress streams)' },
  'server/web/view-models/charts.ts': { by: ['tests/web/runs-results.test.ts'], why: WEB },
  'server/web/view-models/compare-results.ts': { by: ['tests/web/runs-results.test.ts'], why: WEB },
  'server/web/view-models/csv.ts': { by: ['tests/web/runs-results.test.ts'], why: WEB },
  'server/web/view-models/problems.ts': { by: ['tests/web/input-edges.test.ts'], why: WEB },
  'server/web/view-models/result-view.ts': { by: ['tests/web/runs-results.test.ts', 'tests/web/consistency.test.ts'], why: WEB },
  'server/web/view-models/compare-view.ts': { by: ['tests/web/runs-results.test.ts', 'tests/web/consistency.test.ts'], why: WEB },
  'server/web/view-models/scenario-form.ts': { by: ['tests/web/form-state.test.ts', 'tests/web/scenario-pages.test.ts'], why: WEB },
  'server/web/view-models/scenario-view.ts': { by: ['tests/web/scenario-pages.test.ts'], why: WEB },
  'server/web/view-models/strip.ts': { by: ['tests/web/form-state.test.ts'], why: WEB },
  'server/web/view-models/uncertainty-view.ts': { by: ['tests/web/runs-results.test.ts', 'tests/web/consistency.test.ts'], why: WEB },
};

// ---- the check -------------------------------------------------------------------------------------

function walk(dir: string): string[] {
  return fs.readdirSync(path.join(ROOT, dir), { withFileTypes: true }).flatMap((e) => {
    const rel = path.posix.join(dir, e.name);
    return e.isDirectory() ? walk(rel) : [rel];
  });
}

/** Number of function-like bodies (functions, methods, accessors, constructors, arrows) in a file. */
export function logicCount(file: string): number {
  const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
  const sf = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true);
  let n = 0;
  const visit = (node: ts.Node): void => {
    if (ts.isArrowFunction(node) || ts.isFunctionExpression(node)) n++;
    else if ((ts.isFunctionDeclaration(node) || ts.isMethodDeclaration(node) || ts.isConstructorDeclaration(node) || ts.isGetAccessor(node) || ts.isSetAccessor(node)) && node.body) n++;
    ts.forEachChild(node, visit);
  };
  visit(sf);
  return n;
}

const IMPORT_PATTERNS = [
  /^\s*import\s+(?!type\b)[^'"]*?from\s*['"]([^'"]+)['"]/gm, // value imports (not `import type`)
  /^\s*import\s*['"]([^'"]+)['"]/gm, // side-effect imports
  /^\s*export\s+(?!type\b)[^'"]*?from\s*['"]([^'"]+)['"]/gm, // re-exports
  /import\(\s*['"]([^'"]+)['"]\s*\)/g, // dynamic import()
  /new URL\(\s*['"]([^'"]+\.ts)['"]\s*,\s*import\.meta\.url/g, // worker files loaded by path
];

const importCache = new Map<string, string[]>();
function importsOf(file: string): string[] {
  let out = importCache.get(file);
  if (out) return out;
  const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
  const found = new Set<string>();
  for (const re of IMPORT_PATTERNS) {
    for (const m of text.matchAll(re)) {
      if (!m[1].startsWith('.')) continue;
      let p = path.posix.normalize(path.posix.join(path.posix.dirname(file), m[1])).replace(/\.js$/, '.ts');
      if (!p.endsWith('.ts')) p += '.ts';
      if (fs.existsSync(path.join(ROOT, p))) found.add(p);
    }
  }
  out = [...found];
  importCache.set(file, out);
  return out;
}

function reaches(from: string): Set<string> {
  const seen = new Set<string>();
  const stack = [...importsOf(from)];
  while (stack.length) {
    const f = stack.pop()!;
    if (seen.has(f)) continue;
    seen.add(f);
    stack.push(...importsOf(f));
  }
  return seen;
}

const mirrorOf = (module: string): string => `tests/${module.slice('server/'.length).replace(/\.ts$/, '.test.ts')}`;
const exists = (rel: string): boolean => fs.existsSync(path.join(ROOT, rel));

describe('tests mirror server/', () => {
  const modules = walk('server').filter((f) => f.endsWith('.ts') && !f.endsWith('.d.ts')).sort();
  const withLogic = modules.filter((f) => logicCount(f) > 0);
  const mirrored = withLogic.filter((f) => exists(mirrorOf(f)));

  it('the logic detector tells a function from a type file (self-check on two written-out sources)', () => {
    const tmp = fs.mkdtempSync(path.join(ROOT, 'tests', '.structure-'));
    try {
      const rel = (n: string): string => path.relative(ROOT, path.join(tmp, n)).split(path.sep).join('/');
      fs.writeFileSync(path.join(tmp, 'types.ts'), "export interface A { f: (x: number) => number }\nexport type B = { g(): void };\nexport const T = { a: 1 } as const;\nexport { x } from './y.ts';\n");
      fs.writeFileSync(path.join(tmp, 'logic.ts'), 'export const f = (x: number): number => 2 * x;\nexport class C { get v(): number { return 1 } }\n');
      expect(logicCount(rel('types.ts'))).toBe(0);
      expect(logicCount(rel('logic.ts'))).toBe(2);
    } finally {
      fs.rmSync(tmp, { recursive: true, force: true });
    }
  });

  it('every server module with logic has a mirrored test or an entry saying which tests cover it', () => {
    const missing = withLogic.filter((f) => !exists(mirrorOf(f)) && !(f in COVERED_ELSEWHERE));
    console.log(`mirror: ${mirrored.length} of ${withLogic.length} server modules with logic have tests at the mirrored path (${modules.length} modules in all); ${Object.keys(COVERED_ELSEWHERE).length} covered elsewhere`);
    expect(missing.map((f) => `${f}: add ${mirrorOf(f)} or an entry in COVERED_ELSEWHERE (tests/structure.test.ts)`)).toEqual([]);
  });

  it('no stale entries: each names an existing module with logic that still lacks its mirrored test', () => {
    const stale = Object.keys(COVERED_ELSEWHERE).flatMap((f) => {
      if (!exists(f)) return [`${f}: module no longer exists`];
      if (logicCount(f) === 0) return [`${f}: has no logic any more`];
      if (exists(mirrorOf(f))) return [`${f}: has ${mirrorOf(f)} now; remove its entry`];
      return [];
    });
    expect(stale).toEqual([]);
  });

  it('each entry gives a reason and its test files exist and reach the module', () => {
    const bad: string[] = [];
    for (const [module, cover] of Object.entries(COVERED_ELSEWHERE)) {
      if (cover.why.trim().length < 10) bad.push(`${module}: give a reason`);
      if (cover.by.length === 0) bad.push(`${module}: name at least one test file`);
      for (const t of cover.by) {
        if (!exists(t)) { bad.push(`${module}: ${t} does not exist`); continue; }
        const reached = reaches(t);
        if (cover.kind === 'process') {
          // A process entry is started by path: the test (or a tests/ helper it imports) names the path.
          const texts = [t, ...[...reached].filter((f) => f.startsWith('tests/'))].map((f) => fs.readFileSync(path.join(ROOT, f), 'utf8'));
          if (!texts.some((s) => s.includes(module))) bad.push(`${module}: ${t} does not start it by path`);
        } else if (!reached.has(module)) {
          bad.push(`${module}: ${t} does not import it (directly or through other modules)`);
        }
      }
    }
    expect(bad).toEqual([]);
  });
});
