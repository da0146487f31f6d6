/**
 * The survey fit in words: shared by the command line and the fit page. Plain words first, the method after.
 */
import type { CalibrationResult } from '../analysis/calibration/fit.ts';
import type { MapCalibrationResult } from '../analysis/calibration/map-fit.ts';

function n(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return Math.abs(x) >= 100 ? x.toFixed(0) : Number(x.toPrecision(digits)).toString();
}

/** One line per fitted parameter: "Movement in host forest: 0.31 km²/yr (90 % range 0.22–0.45), fitted". */
export function parameterLines(fit: Pick<CalibrationResult, 'parameters'>): string[] {
  return fit.parameters.map((p) =>
    p.identifiable && p.interval90
      ? `${p.label}: ${n(p.estimate)} ${p.unit} (90 % range ${n(p.interval90[0])}–${n(p.interval90[1])})`.replace(/ \(/, p.unit ? ' (' : '(')
      : `${p.label}: not pinned down by these records — ${p.message}`,
  );
}

/** The readable summary printed by `npm run fit`. */
export function fitSummaryText(fit: CalibrationResult): string {
  const r = fit.records;
  const out: string[] = [];
  out.push(`Survey records: ${r.total} (${r.detections} detections) in ${r.years} survey years, ${r.firstYear}–${r.lastYear}.`);
  out.push(`Provenance: ${fit.provenance}.`);
  out.push('');
  out.push('Fitted values');
  for (const l of parameterLines(fit)) out.push(`  ${l}`);
  out.push(`  Detection chance of one survey unit in an established stand: ${n(fit.model.detectionChance, 2)}; start of spread from ${n(fit.start.fromKm)}–${n(fit.start.toKm)} km in ${fit.model.startYear.toFixed(1)}.`);
  out.push('');
  out.push('Spread rate read from the front (farthest detection per year)');
  out.push(`  ${fit.front.message}.`);
  if (fit.quick.diffusion !== null && fit.quick.interval90) {
    out.push(`  Movement rate from it: ${n(fit.quick.diffusion)} km²/yr (90 % range ${n(fit.quick.interval90[0])}–${n(fit.quick.interval90[1])}); ${fit.quick.note}.`);
  } else out.push(`  No movement rate from the front: ${fit.quick.note}.`);
  if (fit.flagged.length) {
    out.push('');
    out.push('Flagged records (possible human-carried introductions)');
    for (const f of fit.flagged) out.push(`  ${f.sentence}`);
  }
  out.push('');
  out.push('Diagnostics');
  out.push(`  Records used: ${r.used} of ${r.total}; identifiable: ${fit.diagnostics.identifiable.join(', ') || 'none'}; not identifiable: ${fit.diagnostics.notIdentifiable.join(', ') || 'none'}.`);
  out.push('  Year   records  detected  expected by the fit   model front [km] (range)');
  for (const y of fit.diagnostics.byYear) {
    const f = fit.model.fronts.find((x) => x.year === y.year);
    out.push(`  ${y.year}  ${String(y.records).padStart(7)}  ${String(y.detected).padStart(8)}  ${y.expected.toFixed(1).padStart(19)}   ${n(f?.bestKm)} (${n(f?.lowKm)}–${n(f?.highKm)})`);
  }
  out.push(`  Largest deviance residual: ${n(fit.diagnostics.largestResidual, 2)} (above about 3 a record is poorly explained).`);
  out.push(`  Method: ${fit.parameters[0].method}; ${fit.model.runs} model runs, ${(fit.model.wallMs / 1000).toFixed(1)} s, cells ${n(fit.model.cellKm * 1000)} m, step ${n(fit.model.stepYears)} yr.`);
  if (fit.messages.length) {
    out.push('');
    for (const m of fit.messages) out.push(`Note: ${m}`);
  }
  out.push('');
  for (const c of fit.cautions) out.push(`Caution: ${c}`);
  return out.join('\n') + '\n';
}

/** The readable summary of a fit on a landscape map (radial front). */
export function mapFitSummaryText(fit: MapCalibrationResult): string {
  const r = fit.records;
  const out: string[] = [];
  out.push(`Survey records on the map: ${r.total} (${r.detections} detections) in ${r.years} survey years, ${r.firstYear}–${r.lastYear}.`);
  out.push(`Provenance: ${fit.provenance}.`);
  out.push('');
  out.push('Fitted values');
  for (const l of parameterLines(fit)) out.push(`  ${l}`);
  out.push('');
  out.push(`Spread read from the front: farthest detection per year from the infestation's centre (x ${fit.origin.xM.toFixed(0)}, y ${fit.origin.yM.toFixed(0)}; infested area ${n(fit.origin.areaKm2)} km², as a disc of radius ${n(fit.origin.radiusKm)} km)`);
  out.push(`  Straight line: ${fit.front.message}.`);
  if (fit.lag) out.push(`  With the slower start of a young front taken out: ${n(fit.lag.kmPerYear)} km/yr (90 % interval ${n(fit.lag.interval90[0])}–${n(fit.lag.interval90[1])}), spread starting about ${fit.lag.startYear.toFixed(1)}.`);
  if (fit.quick.diffusion !== null && fit.quick.interval90) out.push(`  Movement rate from it: ${n(fit.quick.diffusion)} km²/yr (90 % range ${n(fit.quick.interval90[0])}–${n(fit.quick.interval90[1])}); ${fit.quick.note}.`);
  else out.push(`  No movement rate from the front: ${fit.quick.note}.`);
  out.push('  Year   records  detected  front radius [km]');
  for (const y of fit.front.years) out.push(`  ${y.year}  ${String(y.records).padStart(7)}  ${String(y.detections).padStart(8)}  ${n(y.frontKm).padStart(17)}`);
  if (fit.flagged.length) {
    out.push('');
    out.push('Flagged records (possible human-carried introductions)');
    for (const f of fit.flagged) out.push(`  ${f.sentence} Map position x ${f.x}, y ${f.y}.`);
  }
  out.push('');
  for (const m of fit.messages) out.push(`Note: ${m}`);
  out.push('');
  for (const c of fit.cautions) out.push(`Caution: ${c}`);
  return out.join('\n') + '\n';
}
