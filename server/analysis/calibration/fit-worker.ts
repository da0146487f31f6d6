/**
 * Worker-thread task for web fits (piscina): the fit runs off the server's event loop. Problems come back as
 * data (an error's class does not survive the thread boundary).
 */
import { parseScenario } from '../../model/scenario.ts';
import { InputError, type Problem } from '../../model/errors.ts';
import type { SurveyTable } from '../../model/survey.ts';
import { adoptFit, fitSurvey, type CalibrationResult } from './fit.ts';
import type { ScenarioInput } from '../../model/scenario.ts';

export interface FitTask {
  scenario: unknown;
  table: SurveyTable;
  start?: { fromKm: number; toKm: number };
  /** Longest the fit may compute [s]. */
  wallSeconds: number;
}

export type FitTaskResult = { ok: true; fit: CalibrationResult; adopted: ScenarioInput } | { ok: false; code: string; problems: Problem[] };

export default function runFitTask(task: FitTask): FitTaskResult {
  const started = Date.now();
  try {
    const scenario = parseScenario(task.scenario);
    const fit = fitSurvey(scenario, task.table, { start: task.start, shouldCancel: () => Date.now() - started > task.wallSeconds * 1000 });
    return { ok: true, fit, adopted: adoptFit(scenario, fit) };
  } catch (e) {
    if (e instanceof InputError) {
      const problems = e.code === 'FIT_CANCELLED' ? [{ path: '', value: `${task.wallSeconds} s`, message: `the fit needed more than this server's ${task.wallSeconds} s of computing; fit fewer parameters (give the growth rate or edge preference as a number) or use the command line (npm run fit)` }] : e.problems;
      return { ok: false, code: e.code, problems };
    }
    throw e;
  }
}
