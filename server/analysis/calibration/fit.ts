/**
 * Parameters from the team's own survey records: the entry point shared by the command line, the API and
 * the web page. `fitSurvey` validates the records against the scenario, reads the spread rate from the
 * front (front.ts) and converts it to a movement rate (inversion.ts), runs the full-model fit (model-fit.ts)
 * and turns both into parameter ranges with diagnostics; `adoptFit` writes the ranges into the scenario as
 * its distributions, with the provenance sentence the briefing shows.
 */
import type { Scenario, ScenarioInput, PointScenario } from '../../model/scenario.ts';
import { pointScenario, segmentBreaks } from '../../model/scenario.ts';
import { isDistribution, quantile, centralValue, type Distribution } from '../../model/quantity.ts';
import { InputError } from '../../model/errors.ts';
import { SurveyError, surveyProblems, type SurveyRecord, type SurveyTable } from '../../model/survey.ts';
import { buildLayout } from '../../problem/layout.ts';
import { runLayout } from '../run/simulate.ts';
import { fitFront, type FrontFit, type FlaggedRecord } from './front.ts';
import { densitiesAtStart, detectionProbability, recordArrays, simulateAtPositions, type StartStretch } from './likelihood.ts';
import { fitModel, withValue, type ConditionalProfile, type GridParameter, type ModelFitOutcome } from './model-fit.ts';
import { quickEstimate, type QuickEstimate } from './quick.ts';
import { STRATA, capital, fmt, growthPath, joinWords, specOf, summariseParameters, valueAtPath, type FittedParameter } from './ranges.ts';

export type { FittedParameter } from './ranges.ts';
export type { QuickEstimate } from './quick.ts';

export interface FitOptions {
  /** The stretch the pest spread from at the start year [km]; the scenario's infestation when absent. */
  start?: { fromKm: number; toKm: number };
  /** Earliest start year allowed, in years before the first survey year (automatic when absent). */
  leadYears?: number;
  /** Cells and steps of the fit's runs, times the automatic choice (default 2). */
  resolutionFactor?: number;
  /** Grid points per fitted growth or edge parameter (default 5; 3 when two are fitted). */
  gridPoints?: number;
  /** Largest number of model runs. */
  maxRuns?: number;
  shouldCancel?: () => boolean;
  onProgress?: (fraction: number) => void;
}



export interface RecordResidual {
  row: string;
  year: number;
  atKm: number;
  detected: boolean;
  /** Predicted detection probability at the best fit. */
  predicted: number;
  /** Deviance residual sign(y − p)·√(−2 ln P(y)). */
  residual: number;
}

export interface CalibrationResult {
  records: { total: number; detections: number; used: number; firstYear: number; lastYear: number; years: number };
  start: StartStretch;
  front: FrontFit;
  flagged: FlaggedRecord[];
  quick: QuickEstimate;
  parameters: FittedParameter[];
  model: {
    logLik: number;
    startYear: number;
    startAtBound: boolean;
    detectionChance: number;
    runs: number;
    wallMs: number;
    cellKm: number;
    stepYears: number;
    /** Model front [km] at each survey year at the best fit and at the ends of D's range. */
    fronts: { year: number; bestKm: number | null; lowKm: number | null; highKm: number | null }[];
  };
  diagnostics: {
    residuals: RecordResidual[];
    /** Detections seen and expected by the best fit, per year. */
    byYear: { year: number; records: number; detected: number; expected: number }[];
    largestResidual: number;
    identifiable: string[];
    notIdentifiable: string[];
  };
  provenance: string;
  messages: string[];
  cautions: string[];
}

/** Cautions shown with every fit (deferring to regulators where decisions follow). */
export const FIT_CAUTIONS: readonly string[] = [
  'Fitted ranges describe these records under this model; they are not a measurement of the pest. Check them against field knowledge before they inform a decision.',
  'A detection flagged as a possible human-carried introduction needs confirmation on the ground; report it to the plant-protection regulator, who decides on delimitation surveys and movement controls.',
  'Decisions on quarantine, host removal and movement controls rest with the local regulator; felling follows local regulations and licensed practice.',
];




/** Habitats other than host forest that the records reach across from the starting stretch. */
function crossedHabitats(s: PointScenario, positions: number[], start: { fromKm: number; toKm: number }): Set<string> {
  const out = new Set<string>();
  for (const p of buildLayout(s)) {
    if (p.habitat === 'host-forest') continue;
    const crossedRight = p.fromKm >= start.toKm && positions.some((x) => x >= p.toKm);
    const crossedLeft = p.toKm <= start.fromKm && positions.some((x) => x <= p.fromKm);
    if (crossedRight || crossedLeft) out.add(p.habitat);
  }
  return out;
}







/**
 * Fits the scenario's movement rate (and, where the scenario gives them as ranges and the records allow,
 * the growth rate and edge preference) to survey records.
 * @throws SurveyError for records that cannot be fitted (off the transect, out of order, fewer than three years)
 */
export function fitSurvey(scenario: Scenario, table: SurveyTable, opts: FitOptions = {}): CalibrationResult {
  const breaks = segmentBreaks(scenario.transect);
  const problems = surveyProblems(table, { kind: 'transect', startKm: breaks[0], endKm: breaks[breaks.length - 1] });
  if (problems.length) throw new SurveyError(problems);
  const point = pointScenario(scenario);
  const start: StartStretch = { fromKm: opts.start?.fromKm ?? scenario.infestation.fromKm, toKm: opts.start?.toKm ?? scenario.infestation.toKm, density: scenario.infestation.density };
  if (!(start.toKm > start.fromKm)) throw new InputError('FIT_INVALID', [{ path: 'start.toKm', value: start.toKm, message: `must be greater than start.fromKm (${start.fromKm})` }]);
  const first = fitOnce(scenario, point, table, start, [], opts);
  // A detection far ahead of every front the fitted model allows (its 90 % range) is set aside too, and the
  // fit repeated without it: the front line alone misses such records when the front stalls at an edge.
  const late = modelFlags(first, table);
  if (!late.length) return first;
  const second = fitOnce(scenario, point, table, start, late, opts);
  return second;
}

/** Detection lies ahead of the farthest model front of its year (best fit and both ends of D's range). */
const MODEL_FLAG_YEARS_OF_SPREAD = 3;
const MODEL_FLAG_MIN_KM = 2;

function modelFlags(fit: CalibrationResult, table: SurveyTable): FlaggedRecord[] {
  const dir = fit.front.direction;
  const fr = fit.model.fronts.filter((f) => f.bestKm !== null);
  if (fr.length < 2) return [];
  const rate = Math.abs(((fr[fr.length - 1].bestKm as number) - (fr[0].bestKm as number)) / (fr[fr.length - 1].year - fr[0].year || 1));
  const threshold = Math.max(MODEL_FLAG_YEARS_OF_SPREAD * rate, MODEL_FLAG_MIN_KM);
  const already = new Set(fit.flagged.map((f) => f.index));
  const out: FlaggedRecord[] = [...fit.flagged];
  table.records.forEach((r, i) => {
    if (!r.detected || already.has(i) || r.atKm === undefined) return;
    const f = fit.model.fronts.find((x) => x.year === r.year);
    if (!f || f.bestKm === null) return;
    const fronts = [f.bestKm, f.lowKm, f.highKm].filter((x): x is number => x !== null);
    const farthest = dir === 1 ? Math.max(...fronts) : Math.min(...fronts);
    const ahead = dir * (r.atKm - farthest);
    if (ahead > threshold) {
      out.push({
        index: i,
        row: table.rowLabels[i],
        year: r.year,
        atKm: r.atKm,
        aheadKm: ahead,
        sentence:
          `${table.rowLabels[i]} (${r.year}, ${fmt(r.atKm)} km): a detection ${fmt(ahead)} km ahead of the farthest front the fitted model allows that year (${fmt(farthest)} km; about ${fmt(ahead / (rate || 1))} years of spread). ` +
          'Natural spread cannot explain it: a possible human-carried introduction (firewood, logs, nursery stock). It is left out of the fit; confirm it on the ground and report it to the regulator.',
      });
    }
  });
  return out.length > fit.flagged.length ? out : [];
}

/**
 * Parameters held on a grid: the growth rate, and the edge preference of each kind of edge that detections
 * lie beyond, when the scenario gives them ranges; a range the records say nothing about is kept (with a message).
 */
function gridParameters(scenario: Scenario, point: PointScenario, used: SurveyTable['records'], start: StartStretch, opts: FitOptions, messages: string[]): GridParameter[] {
  const crossed = crossedHabitats(point, used.filter((r) => r.detected).map((r) => r.atKm as number), start);
  const candidates: (string | number)[][] = [growthPath(scenario)];
  if (crossed.has('clearing')) candidates.push(['pest', 'edgePreferenceOpen']);
  if (crossed.has('non-host-forest')) candidates.push(['pest', 'edgePreferenceNonHost']);
  const gridParams = candidates.filter((p) => isDistribution(valueAtPath(scenario, p)));
  for (const p of [['pest', 'edgePreferenceOpen'], ['pest', 'edgePreferenceNonHost']]) {
    const v = valueAtPath(scenario, p);
    if (isDistribution(v) && !gridParams.some((g) => g.join('.') === p.join('.'))) {
      messages.push(`${specOf(p).label} is not fitted: no detection lies beyond that kind of edge, so the records say nothing about it; its range is kept.`);
    }
  }
  const nPts = opts.gridPoints ?? (gridParams.length >= 2 ? 3 : 5);
  return gridParams.map((p) => ({ path: p, values: STRATA(nPts).map((u) => quantile(valueAtPath(scenario, p) as Distribution, u)) }));
}

function fitOnce(scenario: Scenario, point: PointScenario, table: SurveyTable, start: StartStretch, setAside: FlaggedRecord[], opts: FitOptions): CalibrationResult {
  const { records, rowLabels } = table;
  const front = fitFront(records, rowLabels, start, setAside);
  const quick = quickEstimate(scenario, point, front);
  const flaggedSet = new Set(front.flagged.map((f) => f.index));
  const usedIdx = records.map((_, i) => i).filter((i) => !flaggedSet.has(i));
  const used = usedIdx.map((i) => records[i]);
  const years = [...new Set(records.map((r) => r.year))].sort((a, b) => a - b);
  const firstYear = years[0];
  const lastYear = years[years.length - 1];
  const messages: string[] = [];

  const grid = gridParameters(scenario, point, used, start, opts, messages);

  const lead = opts.leadYears ?? autoLead(front, quick);
  const initialDiffusion = [point.pest.diffusionHost, ...(quick.diffusion && quick.diffusion > 0 ? [quick.diffusion] : [])];
  const rec = recordArrays(used);
  const outcome = fitModel(point, rec, {
    start,
    leadYears: lead,
    firstYear,
    lastYear,
    initialDiffusion,
    grid,
    resolutionFactor: opts.resolutionFactor,
    maxRuns: opts.maxRuns,
    shouldCancel: opts.shouldCancel,
    onProgress: opts.onProgress,
  });
  const parameters = summariseParameters(scenario, outcome, grid, messages);
  const bestProfile = outcome.profiles.reduce((a, b) => (b.best.logLik > a.best.logLik ? b : a));
  let bestPoint = point;
  grid.forEach((g, i) => (bestPoint = withValue(bestPoint, g.path, bestProfile.gridValues[i])));
  const best = bestProfile.best;
  if (best.startAtBound) messages.push(`The best start year is the earliest allowed (${best.startYear.toFixed(1)}): the pest may have spread from the starting stretch for longer; give an earlier lead (more years before ${firstYear}) or check the starting stretch.`);

  // Residuals and the fitted fronts for the chart.
  const { residuals, byYear } = bestFitResiduals(bestPoint, best, outcome, start, used, usedIdx.map((i) => rowLabels[i]), years, firstYear - lead, lastYear);
  const fronts = fittedFronts(bestPoint, best, outcome, parameters[0], start, years, front.direction);

  const detections = records.filter((r) => r.detected).length;
  const fitted = parameters.filter((p) => p.identifiable).map((p) => p.label.charAt(0).toLowerCase() + p.label.slice(1));
  const provenance = fitted.length
    ? `${capital(joinWords(fitted))} fitted to ${used.filter((r) => r.detected).length} detections (${used.length} survey records), ${firstYear}–${lastYear}`
    : `Survey records ${firstYear}–${lastYear} (${detections} detections) did not pin down the parameters; ranges kept as entered`;
  if (front.flagged.length) messages.push(`${front.flagged.length} detection${front.flagged.length > 1 ? 's' : ''} far ahead of the front ${front.flagged.length > 1 ? 'were' : 'was'} left out as possible human-carried introductions (see the flagged records).`);
  const largestResidual = residuals.reduce((a, r) => Math.max(a, Math.abs(r.residual)), 0);
  return {
    records: { total: records.length, detections, used: used.length, firstYear, lastYear, years: years.length },
    start,
    front,
    flagged: front.flagged,
    quick,
    parameters,
    model: {
      logLik: best.logLik,
      startYear: best.startYear,
      startAtBound: best.startAtBound,
      detectionChance: best.detectionChance,
      runs: outcome.runs,
      wallMs: Math.round(outcome.wallMs),
      cellKm: outcome.resolution.cellKm,
      stepYears: outcome.resolution.stepYears,
      fronts,
    },
    diagnostics: {
      residuals,
      byYear,
      largestResidual,
      identifiable: parameters.filter((p) => p.identifiable).map((p) => p.path),
      notIdentifiable: parameters.filter((p) => !p.identifiable).map((p) => p.path),
    },
    provenance,
    messages,
    cautions: [...FIT_CAUTIONS],
  };
}

interface BestFit {
  diffusion: number;
  startYear: number;
  detectionChance: number;
}

/** Deviance residual of each used record at the best fit, and detections seen vs expected per year. */
function bestFitResiduals(bestPoint: PointScenario, best: BestFit, outcome: ModelFitOutcome, start: StartStretch, used: SurveyRecord[], labels: string[], years: number[], runFrom: number, lastYear: number) {
  const rec = recordArrays(used);
  const bestRun = simulateAtPositions(withValue(bestPoint, ['pest', 'diffusionHost'], best.diffusion), start, rec.positionsKm, lastYear - runFrom, outcome.resolution);
  const u = densitiesAtStart(bestRun, rec, best.startYear, new Float64Array(used.length));
  const residuals: RecordResidual[] = used.map((r, k) => {
    const p = detectionProbability(u[k], r.effort ?? 1, best.detectionChance, bestPoint.detectionLevel);
    const py = r.detected ? p : 1 - p;
    return { row: labels[k], year: r.year, atKm: r.atKm as number, detected: r.detected, predicted: p, residual: Math.sign((r.detected ? 1 : 0) - p) * Math.sqrt(-2 * Math.log(py)) };
  });
  const byYear = years.map((y) => {
    const rs = residuals.filter((r) => r.year === y);
    return { year: y, records: rs.length, detected: rs.filter((r) => r.detected).length, expected: rs.reduce((a, r) => a + r.predicted, 0) };
  });
  return { residuals, byYear };
}

/** Model front at each survey year at the best fit and at both ends of D's range (each with its own best start). */
function fittedFronts(bestPoint: PointScenario, best: BestFit, outcome: ModelFitOutcome, dParam: FittedParameter, start: StartStretch, years: number[], direction: 1 | -1): CalibrationResult['model']['fronts'] {
  const frontAt = (d: number | null, t0: number) => (d === null ? null : modelFronts(withValue(bestPoint, ['pest', 'diffusionHost'], d), start, t0, years, direction));
  const fBest = frontAt(best.diffusion, best.startYear);
  const ends = dParam.interval90 ?? null;
  const endStart = (d: number) => {
    const evals = outcome.profiles.flatMap((p) => p.evaluations);
    return evals.reduce((a, b) => (Math.abs(Math.log(b.diffusion / d)) < Math.abs(Math.log(a.diffusion / d)) ? b : a)).startYear;
  };
  const fLow = ends ? frontAt(ends[0], endStart(ends[0])) : null;
  const fHigh = ends ? frontAt(ends[1], endStart(ends[1])) : null;
  return years.map((y, k) => ({ year: y, bestKm: fBest?.[k] ?? null, lowKm: fLow?.[k] ?? null, highKm: fHigh?.[k] ?? null }));
}

/** Lead before the first survey year: the time the front needs from the stretch to the first year's front at the quick rate, plus margin. */
function autoLead(front: FrontFit, quick: QuickEstimate): number {
  const first = front.years.find((y) => y.distanceKm !== null);
  const c = front.kmPerYear && front.kmPerYear > 0 ? front.kmPerYear : null;
  if (!first || c === null || quick.diffusion === null) return 10;
  return Math.min(40, Math.max(4, (2 * Math.max(0, first.distanceKm as number)) / c + 3));
}

/** Model front [km] (farthest point at the detection level on the spreading side) at each survey year. */
function modelFronts(s: PointScenario, start: StartStretch, startYear: number, years: number[], direction: 1 | -1): (number | null)[] {
  const last = years[years.length - 1];
  const run: PointScenario = { ...s, infestation: { ...start }, horizonYears: Math.max(1e-3, last - startYear), sites: [], barrier: undefined, uncertainty: undefined, transport: undefined, mosaics: undefined };
  const out = runLayout({ scenario: run, pieces: buildLayout(run), record: false });
  const t = out.front.times;
  const x = direction === 1 ? out.front.rightKm : out.front.leftKm;
  return years.map((y) => {
    const tau = y - startYear;
    if (tau < 0) return null;
    let k = 0;
    while (k < t.length - 1 && t[k + 1] <= tau) k++;
    return Number.isFinite(x[k]) ? x[k] : null;
  });
}


/**
 * The scenario with the fitted ranges adopted as its distributions (identifiable parameters only), the
 * provenance the briefing shows, and an ensemble block (200 draws) when it had none, so that the ranges
 * reach P(holds).
 */
export function adoptFit(scenario: Scenario, fit: CalibrationResult): ScenarioInput {
  const out = structuredClone(scenario) as unknown as Record<string, unknown>;
  const paths: string[] = [];
  for (const p of fit.parameters) {
    if (!p.identifiable || !p.distribution) continue;
    const path = p.path.split('.');
    let cur = out as Record<string, unknown>;
    for (let i = 0; i < path.length - 1; i++) cur = cur[path[i]] as Record<string, unknown>;
    cur[path[path.length - 1]] = p.distribution;
    paths.push(p.path);
  }
  out.calibration = {
    sentence: fit.provenance,
    paths,
    records: fit.records.used,
    detections: fit.records.detections - fit.flagged.length,
    firstYear: fit.records.firstYear,
    lastYear: fit.records.lastYear,
  };
  if (!out.uncertainty) out.uncertainty = { draws: 200, seed: 1 };
  return out as unknown as ScenarioInput;
}




export { centralValue };
export type { ConditionalProfile };
