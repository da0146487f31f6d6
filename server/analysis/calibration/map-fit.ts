/**
 * Survey records on a landscape map: the spread rate read from the radial front, converted to a movement
 * rate. Each record's position is turned into its distance from the infestation's centre (the share-weighted
 * centroid of the infested cells); the farthest detection of each year, beyond the infestation's equivalent
 * radius √(A/π), is the front radius of that year, and a straight line through those radii gives the rate
 * with its 90 % interval (front.ts, the transect's own method, on radial distances), after setting aside
 * detections far ahead of the robust front line as possible human-carried introductions.
 *
 * The rate is converted to D with the same inversion as on a transect (inversion.ts): in two dimensions a
 * front from a point release approaches the planar speed c* = 2√(rD) (Aronson & Weinberger 1978) from below,
 * lagging by about ((d + 2)/(2λ*))·ln t with λ* = √(r/D) (Gärtner 1982 — quoted from memory, checked by the
 * radial verification test). A young front is therefore slower than c*: for a pulled front (no Allee
 * effect) the fit takes the lag out (`lagCorrection`); a pushed front has no logarithmic lag. The full-model fit (model-fit.ts) runs on transects only: on a map each
 * likelihood evaluation would be a 2-D run, which this round does not offer.
 */
import type { LandscapeScenario } from '../../model/landscape.ts';
import { coordinatesOf, parseLandscapeScenario } from '../../model/landscape.ts';
import { parseScenario, pointScenario, type Scenario, type ScenarioInput } from '../../model/scenario.ts';
import { FIELDS } from '../../model/fields.ts';
import { centralValue, type Quantity } from '../../model/quantity.ts';
import { SurveyError, surveyProblems, type SurveyRecord, type SurveyTable } from '../../model/survey.ts';
import { RASTER_CLASSES, type RasterLandscape } from '../../domain/raster.ts';
import { fitFront, type FrontFit, type FlaggedRecord } from './front.ts';
import { unitSpeed } from './inversion.ts';
import { studentTQuantile } from './statistics.ts';
import { FIT_CAUTIONS } from './fit.ts';
import { quickEstimate, type QuickEstimate } from './quick.ts';
import { lognormalFor, type FittedParameter } from './ranges.ts';

/** The infestation's centre [map m] and its equivalent radius √(A/π) [km]. */
export interface MapOrigin {
  xM: number;
  yM: number;
  areaKm2: number;
  radiusKm: number;
}

export interface MapCalibrationResult {
  kind: 'map';
  records: { total: number; detections: number; used: number; firstYear: number; lastYear: number; years: number };
  origin: MapOrigin;
  /** The ground between the infestation and the last year's front radius. */
  ground: SweptGround;
  /** The front fit on radial distances: `frontKm` and `atKm` are distances from the origin [km]. */
  front: FrontFit;
  /** The spread rate with the two-dimensional lag of a pulled front taken out (null when not applied). */
  lag: LagCorrection | null;
  /** Flagged records, with their map position. */
  flagged: (FlaggedRecord & { x: number; y: number })[];
  quick: QuickEstimate;
  parameters: FittedParameter[];
  provenance: string;
  messages: string[];
  cautions: string[];
}

/**
 * A pulled front from a point release in the plane: R(t) = c·τ − k·ln τ + O(1), τ = t − t0, with
 * k = (d + 2)/(2λ*) at d = 2 and λ* = c/(2D) (the decay rate of the front's leading edge, √(r/D) for
 * Fisher–KPP), so k = 4D/c = 4c/c(1)² once D = (c/c(1))². Fitted to the yearly front radii by least squares
 * over c and t0 (the O(1) term is absorbed in t0); standard errors from the linearised fit.
 */
export interface LagCorrection {
  kmPerYear: number;
  standardError: number;
  interval90: [number, number];
  /** Fitted start of the radial spread (decimal year). */
  startYear: number;
  /** k [km] at the fitted speed. */
  logCoefficientKm: number;
  /** Raw straight-line rate it replaces [km/yr]. */
  rawKmPerYear: number;
}

/** Smallest time since the start [yr] allowed at the first survey year (the log law is a long-time law). */
const LAG_MIN_YEARS = 1;
const LAG_MAX_YEARS = 80;

export function lagCorrection(front: FrontFit, unitKmPerYear: number): LagCorrection | null {
  const pts = front.years.filter((y) => y.distanceKm !== null && y.frontKm !== null);
  if (pts.length < 3 || front.kmPerYear === null || !(front.kmPerYear > 0)) return null;
  const t = pts.map((y) => y.year);
  // The farthest of m detections spread evenly over a disc of radius R lies at R·2m/(2m + 1) on average
  // (its radius has the distribution (ρ/R)^(2m)); scaled back, so that a front sampled more densely as it
  // grows does not read as faster.
  const R = pts.map((y) => ((y.frontKm as number) * (2 * y.detections + 1)) / (2 * y.detections));
  const kPerC = 4 / (unitKmPerYear * unitKmPerYear); // k = kPerC · c
  const g = (tau: number) => tau - kPerC * Math.log(tau);
  const fitAt = (t0: number) => {
    let sgg = 0;
    let sgr = 0;
    for (let i = 0; i < t.length; i++) {
      const gi = g(t[i] - t0);
      sgg += gi * gi;
      sgr += gi * R[i];
    }
    const c = sgr / sgg;
    let sse = 0;
    for (let i = 0; i < t.length; i++) sse += (R[i] - c * g(t[i] - t0)) ** 2;
    return { c, sse };
  };
  // Profile over the start: τ at the first survey year from LAG_MIN_YEARS to LAG_MAX_YEARS, then refine.
  let best = { t0: t[0] - LAG_MIN_YEARS, ...fitAt(t[0] - LAG_MIN_YEARS) };
  const N = 400;
  for (let j = 0; j <= N; j++) {
    const tau1 = LAG_MIN_YEARS * Math.pow(LAG_MAX_YEARS / LAG_MIN_YEARS, j / N);
    const f = fitAt(t[0] - tau1);
    if (f.c > 0 && f.sse < best.sse) best = { t0: t[0] - tau1, ...f };
  }
  let lo = best.t0 - 0.5;
  let hi = Math.min(best.t0 + 0.5, t[0] - LAG_MIN_YEARS);
  for (let it = 0; it < 60; it++) {
    const a = lo + (hi - lo) / 3;
    const b = hi - (hi - lo) / 3;
    if (fitAt(a).sse < fitAt(b).sse) hi = b;
    else lo = a;
  }
  const t0 = 0.5 * (lo + hi);
  const { c, sse } = fitAt(t0);
  if (!(c > 0)) return null;
  // Linearised covariance of (c, t0): J = [g(τ), −c·g'(τ)], g'(τ) = 1 − kPerC/τ.
  let a11 = 0;
  let a12 = 0;
  let a22 = 0;
  for (let i = 0; i < t.length; i++) {
    const tau = t[i] - t0;
    const j1 = g(tau);
    const j2 = -c * (1 - kPerC / tau);
    a11 += j1 * j1;
    a12 += j1 * j2;
    a22 += j2 * j2;
  }
  const df = t.length - 2;
  const s2 = sse / Math.max(1, df);
  const det = a11 * a22 - a12 * a12;
  const se = det > 0 ? Math.sqrt((s2 * a22) / det) : Infinity;
  const q = studentTQuantile(0.95, Math.max(1, df));
  return { kmPerYear: c, standardError: se, interval90: [c - q * se, c + q * se], startYear: t0, logCoefficientKm: kPerC * c, rawKmPerYear: front.kmPerYear };
}

/** What the front spread over: the cells between the infestation's radius and the farthest front radius. */
export interface SweptGround {
  /** Mean host cover (stocking) of the host cells there (1 when none). */
  hostStocking: number;
  /** Share of the cells there that are not host forest. */
  otherShare: number;
}

export function sweptGround(l: RasterLandscape, origin: MapOrigin, front: FrontFit): SweptGround {
  const radii = front.years.map((y) => y.frontKm).filter((r): r is number => r !== null);
  const outer = (radii.length ? Math.max(...radii) : origin.radiusKm) * 1000;
  const inner = origin.radiusKm * 1000;
  let host = 0;
  let cover = 0;
  let all = 0;
  for (let k = 0; k < l.nx * l.ny; k++) {
    const x = l.originXM + ((k % l.nx) + 0.5) * l.cellM;
    const y = l.originYM - (Math.floor(k / l.nx) + 0.5) * l.cellM;
    const r = Math.hypot(x - origin.xM, y - origin.yM);
    if (r < inner || r > outer) continue;
    all++;
    if (l.classAtCells[k] === HOST_CLASS && l.hostCoverAtCells[k] > 0) {
      host++;
      cover += l.hostCoverAtCells[k];
    }
  }
  return { hostStocking: host ? cover / host : 1, otherShare: all ? 1 - host / all : 0 };
}

const HOST_CLASS = RASTER_CLASSES.indexOf('host');

/** Share-weighted centroid and equivalent radius of the infested cells (cell centres; row 0 at the north edge). */
export function infestationOrigin(l: Pick<RasterLandscape, 'nx' | 'ny' | 'cellM' | 'originXM' | 'originYM' | 'infestedAtCells'>): MapOrigin {
  let w = 0;
  let sx = 0;
  let sy = 0;
  for (let k = 0; k < l.nx * l.ny; k++) {
    const f = l.infestedAtCells[k];
    if (!(f > 0)) continue;
    const col = k % l.nx;
    const row = Math.floor(k / l.nx);
    sx += f * (l.originXM + (col + 0.5) * l.cellM);
    sy += f * (l.originYM - (row + 0.5) * l.cellM);
    w += f;
  }
  if (!(w > 0)) throw new RangeError('the map has no infested cell');
  const areaKm2 = (w * l.cellM * l.cellM) / 1e6;
  return { xM: sx / w, yM: sy / w, areaKm2, radiusKm: Math.sqrt(areaKm2 / Math.PI) };
}

/** A one-stand transect with the landscape's pest: what the speed inversion needs (growth form, rates, ranges). */
function pestTwin(s: LandscapeScenario): Scenario {
  const input: ScenarioInput = {
    title: `${s.title} (pest only, for the speed inversion)`,
    pest: s.pest as ScenarioInput['pest'],
    transect: { segments: [{ habitat: 'host-forest', lengthKm: 50, stocking: 1, stemsPerHa: 400 }] },
    infestation: { fromKm: 0, toKm: 1 },
    horizonYears: centralValue(s.horizonYears as Quantity),
    detectionLevel: s.detectionLevel,
  };
  return parseScenario(input);
}

export interface MapFitOptions {
  /** Map position of a record in the map's CRS [m]; records given as longitude/latitude are projected with it. */
  toMap?: (x: number, y: number) => [number, number];
}

/** What the reader of a map fit is told: the radial method, the young front's lag, the ground it crossed, the set-aside records. */
function mapFitMessages(front: FrontFit, lag: ReturnType<typeof lagCorrection> | null, pulled: boolean, ground: ReturnType<typeof sweptGround>): string[] {
  const messages: string[] = ['On a map the movement rate is read from the radial front only (farthest detection per year from the infestation’s centre); the full-model fit is offered on transects.'];
  if (lag) {
    messages.push(
      `A front spreading out from a small infestation moves slower at first than an established one: its radius lags by a logarithm of the time since the start (fitted start ${lag.startYear.toFixed(1)}). ` +
        `Taking that lag out gives ${sig(lag.kmPerYear)} km/yr where the straight line through the front radii gives ${sig(lag.rawKmPerYear)} km/yr; the movement rate uses the former.`,
    );
  } else if (pulled) messages.push('The front radii were too few or too irregular to take out the slower start of a young front; the range can sit low.');
  if (ground.hostStocking < 0.999) messages.push(`The host forest the front spread through is stocked at ${Math.round(100 * ground.hostStocking)} % of full cover on average; the spread rate is converted at that stocking.`);
  if (ground.otherShare > 0.1) {
    messages.push(
      `${Math.round(100 * ground.otherShare)} % of the ground the front spread over is not host forest (open land, non-host stands, water or built-up). ` +
        'The radial method treats the ground as unbroken host forest, so the fitted movement rate is an effective rate over this mix and sits low; a transect fit across the same ground, or records inside unbroken forest, pin it better.',
    );
  }
  if (front.flagged.length) messages.push(`${front.flagged.length} detection${front.flagged.length > 1 ? 's' : ''} far ahead of the front ${front.flagged.length > 1 ? 'were' : 'was'} left out as possible human-carried introductions (see the flagged records).`);
  return messages;
}

/**
 * Fits the landscape pest's movement rate in host forest to survey records given by map position.
 * @param landscape - the scenario's map, resolved (the GIS loader's result); its infested cells give the origin
 * @throws SurveyError for records off the map, out of order or with fewer than three detection years
 */
export function fitMapSurvey(scenario: LandscapeScenario, landscape: RasterLandscape, table: SurveyTable, opts: MapFitOptions = {}): MapCalibrationResult {
  const lonlat = coordinatesOf(scenario) === 'lonlat';
  const toMap = opts.toMap ?? ((x: number, y: number): [number, number] => [x, y]);
  if (lonlat && !opts.toMap) throw new RangeError('records in longitude/latitude need a projection to the map');
  const x0 = landscape.originXM;
  const x1 = x0 + landscape.nx * landscape.cellM;
  const y1 = landscape.originYM;
  const y0 = y1 - landscape.ny * landscape.cellM;
  const problems = surveyProblems(table, {
    kind: 'map',
    extent: {
      contains: (x, y) => {
        const [mx, my] = toMap(x, y);
        return mx >= x0 && mx <= x1 && my >= y0 && my <= y1;
      },
      describe: lonlat ? `the map (${landscape.crs.name}), given as longitude/latitude` : `x ${x0}–${x1} m, y ${y0}–${y1} m (${landscape.crs.name})`,
    },
  });
  if (problems.length) throw new SurveyError(problems);
  const origin = infestationOrigin(landscape);
  const mapXy = table.records.map((r) => toMap(r.x as number, r.y as number));
  const radial: SurveyRecord[] = table.records.map((r, i) => ({ ...r, x: undefined, y: undefined, atKm: Math.hypot(mapXy[i][0] - origin.xM, mapXy[i][1] - origin.yM) / 1000 }));
  const front = fitFront(radial, table.rowLabels, { fromKm: -origin.radiusKm, toKm: origin.radiusKm });
  const twin = pestTwin(scenario);
  const twinPoint = pointScenario(twin);
  const ground = sweptGround(landscape, origin, front);
  const unit = unitSpeed(twinPoint, ground.hostStocking);
  // Pulled fronts (no Allee effect) lag behind the planar speed by a logarithm; pushed fronts do not.
  const pulled = unit.method === 'fisher-kpp' || unit.method === 'linear-pulled';
  const lag = pulled && unit.kmPerYear !== null ? lagCorrection(front, unit.kmPerYear) : null;
  const forInversion: FrontFit = lag ? { ...front, kmPerYear: lag.kmPerYear, standardError: lag.standardError, interval90: lag.interval90, degreesOfFreedom: Math.max(1, front.degreesOfFreedom) } : front;
  const quick = quickEstimate(twin, twinPoint, forInversion, ground.hostStocking);
  const flagged = front.flagged.map((f) => ({ ...f, x: table.records[f.index].x as number, y: table.records[f.index].y as number, sentence: f.sentence.replace(' km)', ' km from the infestation’s centre)') }));
  const years = [...new Set(table.records.map((r) => r.year))].sort((a, b) => a - b);
  const used = table.records.length - flagged.length;
  const detections = table.records.filter((r) => r.detected).length;
  const messages = mapFitMessages(front, lag, pulled, ground);
  const spec = FIELDS.diffusionHost;
  const ok = quick.diffusion !== null && quick.interval90 !== null && quick.interval90[0] > 0;
  const parameter: FittedParameter = {
    path: 'pest.diffusionHost',
    label: spec.label,
    unit: spec.unit,
    prior: scenario.pest.diffusionHost as Quantity,
    estimate: quick.diffusion,
    interval90: ok ? quick.interval90 : null,
    identifiable: ok,
    method: `radial front spread rate (farthest detection per year${lag ? ', with the logarithmic lag of a young two-dimensional front fitted out' : ', straight line'}), inverted with ${quick.unitSpeed.note}`,
    message: ok ? `${sig(quick.diffusion as number)} ${spec.unit}, 90 % range ${sig(quick.interval90![0])}–${sig(quick.interval90![1])}` : `not identifiable from these records: ${front.kmPerYear === null ? front.message : quick.note}; the entered value is kept`,
    distribution: ok ? lognormalFor(quick.interval90!) : null,
  };
  const detectedUsed = table.records.filter((r, i) => r.detected && !front.flagged.some((f) => f.index === i)).length;
  return {
    kind: 'map',
    records: { total: table.records.length, detections, used, firstYear: years[0], lastYear: years[years.length - 1], years: years.length },
    origin,
    ground,
    front,
    lag,
    flagged,
    quick,
    parameters: [parameter],
    provenance: ok
      ? `Movement in host forest fitted to the radial spread of ${detectedUsed} detections (${used} survey records), ${years[0]}–${years[years.length - 1]}`
      : `Survey records ${years[0]}–${years[years.length - 1]} (${detections} detections) did not pin down the movement rate; value kept as entered`,
    messages,
    cautions: [...FIT_CAUTIONS],
  };
}

/** The landscape scenario with the fitted movement range adopted (when identifiable), the provenance note, and 200 ensemble draws when it had none. */
export function adoptMapFit(scenario: LandscapeScenario, fit: MapCalibrationResult): LandscapeScenario {
  const out = structuredClone(scenario) as unknown as Record<string, unknown> & { pest: Record<string, unknown> };
  const p = fit.parameters[0];
  const paths: string[] = [];
  if (p.identifiable && p.distribution) {
    out.pest.diffusionHost = p.distribution;
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
  if (!out.uncertainty && paths.length) out.uncertainty = { draws: 200, seed: 1 };
  return parseLandscapeScenario(out);
}

function sig(x: number): string {
  return Math.abs(x) >= 100 ? x.toFixed(0) : Number(x.toPrecision(3)).toString();
}
