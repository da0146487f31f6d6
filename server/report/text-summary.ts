import type { OptionResult, ResultDocument, RunResult } from '../analysis/result.ts';
import { distributionText, fixed, integer, km, num, percent, speed, years } from './format.ts';
import { alleeThresholdText, headline, recommendationWords, siteEvent, spreadBeyondText, transportNote, widthDelayCell } from './decision.ts';

/** Front positions at about `n` evenly spaced years, for a compact table. */
function frontTable(run: RunResult, horizon: number, n = 7): string[] {
  const { timesYears, rightFrontKm, leftFrontKm } = run.series;
  const rows = ['    year   right front (km)   left front (km)'];
  for (let k = 0; k < n; k++) {
    const target = (horizon * k) / (n - 1);
    let best = 0;
    for (let i = 0; i < timesYears.length; i++) if (Math.abs(timesYears[i] - target) < Math.abs(timesYears[best] - target)) best = i;
    rows.push(`    ${fixed(timesYears[best], 1).padStart(5)}   ${km(rightFrontKm[best], 'none').padStart(16)}   ${km(leftFrontKm[best], 'none').padStart(15)}`);
  }
  return rows;
}

/** The readable part of one run: fronts, measured speed, arrivals, host. */
export function runSummary(run: RunResult, horizon: number, siteTexts?: string[]): string[] {
  const lines = ['  Front position over time (farthest point at or above the detection level):', ...frontTable(run, horizon)];
  for (const r of run.spreadRates) {
    // For an option the one spread rate shown is the one beyond the clearing (optionDecision), not this whole-run fit.
    if (r.kmPerYear === null || siteTexts) continue;
    lines.push(`  Measured spread rate ${r.direction}wards: ${speed(r.kmPerYear)} (straight-line fit over years ${years(r.fromYears)}–${years(r.toYears)}, R² ${fixed(r.rSquared ?? 0, 3)})`);
  }
  if (!siteTexts && run.spreadRates.every((r) => r.kmPerYear === null)) lines.push('  Measured spread rate: front did not travel far enough within the transect to measure');
  if (run.arrivals.length) {
    lines.push('  Arrival at protected sites:');
    run.arrivals.forEach((a, i) => {
      const what = siteTexts?.[i] ?? (a.arrivalYears === null ? `not reached within ${years(run.endYears)} yr` : `year ${years(a.arrivalYears)}`);
      lines.push(`    ${a.name} (km ${km(a.atKm)}): ${what}`);
    });
  }
  lines.push(`  Host remaining at year ${years(run.endYears)}: ${percent(run.host.remainingFraction)} of host stems; ${integer(run.host.stemsKilledPerKm)} stems killed per km of front width`);
  return lines;
}

const GROWTH_PLAIN: Record<string, string> = {
  logistic: 'grows even from a few insects (logistic)',
  'allee-cubic': 'small groups die out (strong Allee effect, cubic form)',
  'mate-finding': 'breeds on hosts and needs mates (mate-finding form)',
};

const VERDICT_WORDS: Record<OptionResult['verdict']['kind'], string> = {
  holds: 'HOLDS',
  marginal: 'MARGINAL',
  'not-crossed': 'NOT CROSSED WITHIN THE HORIZON',
  delays: 'DELAYS',
  'speeds-up': 'SPEEDS UP',
  'no-change': 'NO CHANGE',
  'not-reached': 'NOT REACHED',
};

/** The decision part of one option: verdict with its transport risk, reason, per-site outcome, stopping width, curve, trees. */
export function optionDecision(o: OptionResult, doc?: ResultDocument, k = 0): string[] {
  const lines: string[] = [];
  const t = doc ? transportNote(doc, k) : null;
  lines.push(`  Verdict: ${VERDICT_WORDS[o.verdict.kind]}${t?.decides ? ' THE NATURAL FRONT, BUT TRANSPORT DECIDES' : ''} — ${o.verdict.sentence}`);
  if (t) lines.push(`  People carrying the pest: ${t.sentence}`);
  lines.push(`  Why: ${o.verdict.why}`);
  lines.push(`  Stopping checked: ${o.pinning.verified ? 'yes' : 'no'} — ${o.pinning.detail}`);
  if (o.sites.length) {
    lines.push('  Protected sites:');
    o.sites.forEach((site, i) => {
      const cpy = site.costPerYearOfDelay !== null ? ` Cost per year of delay: ${integer(site.costPerYearOfDelay)}${o.trees.costUnit ? ` ${o.trees.costUnit}` : ''}.` : '';
      const event = doc ? siteEvent(doc, k, i).text : VERDICT_WORDS[site.kind].toLowerCase();
      lines.push(`    ${site.name} (km ${km(site.atKm)}${site.beyondBarrier ? ', beyond the clearing' : ''}): ${event} — ${site.sentence}${cpy}`);
    });
  }
  const cw = o.criticalWidth;
  if (!cw.applicable) lines.push(`  Width that stops the front: none (no Allee effect)${cw.delayPer100mYears !== null ? `; delay per 100 m of width: ${fixed(cw.delayPer100mYears, 2)} years` : ''}.`);
  else if (cw.bracketM) {
    lines.push(
      `  Width that stops the front: ${integer(cw.bracketM[1])} m; gets through at ${integer(cw.bracketM[0])} m (tolerance ${num(cw.toleranceM)} m, ${cw.runs} full model runs)` +
        (cw.phasePlaneM !== null ? `; quick estimate (phase-plane) ${integer(cw.phasePlaneM)} m${cw.phasePlaneAssumesIntactHosts ? ' with hosts held at present stocking' : ''}` : '') +
        (cw.marginal ? ' — this option lies in between: too close to call' : ''),
    );
  } else lines.push(`  Width that stops the front: not found within the widths tried.${cw.phasePlaneM !== null ? ` Quick estimate (phase-plane): ${integer(cw.phasePlaneM)} m.` : ''}`);
  if (o.widthDelay.length) {
    const names = o.sites.map((s) => s.name);
    lines.push(`  Years gained against clearing width, site by site:`);
    for (const r of o.widthDelay) {
      const cells = names.map((n, i) => `${n}: ${doc ? widthDelayCell(doc, k, r, i) : years(r.delayYearsBySite[i], 'no value')}`);
      lines.push(`    ${integer(r.widthM).padStart(6)} m (${r.pinned ? 'front stopped' : r.crossingYears === null ? 'front not across within the horizon' : `front across in year ${years(r.crossingYears)}`}): ${cells.join('; ')}`);
    }
  }
  const cost = o.trees.cost !== null ? `; cost ${integer(o.trees.cost)}${o.trees.costUnit ? ` ${o.trees.costUnit}` : ''}` : '';
  lines.push(`  Host trees removed: ${integer(o.trees.stemsRemoved)}${cost}`);
  if (o.speeds.baselineKmPerYear !== null || o.speeds.optionKmPerYear !== null) {
    lines.push(`  Spread rate beyond the clearing: ${spreadBeyondText(o)} (without the clearing ${speed(o.speeds.baselineKmPerYear, 'not measured')} at that place)`);
  }
  return lines;
}

/** Plain-text summary printed by `npm run evaluate`. */
export function textSummary(doc: ResultDocument): string {
  const b = doc.baseline;
  const m = doc.model;
  const out: string[] = [];
  out.push(`${doc.tool.name} ${doc.tool.version} — ${doc.title}`);
  out.push(`Pest profile: ${doc.pest.name}${doc.pest.illustrative ? ' (ILLUSTRATIVE values, not a real species)' : ''}`);
  out.push('', `THE ANSWER IN SHORT: ${headline(doc)}`);
  const rec = recommendationWords(doc);
  out.push(`${rec.short}${rec.basis ? ` ${rec.basis}` : ''}`);
  if (rec.phasePlane) out.push(rec.phasePlane);
  doc.options.forEach((o, k) => {
    const t = transportNote(doc, k);
    out.push(`  ${String.fromCharCode(65 + k)} ${o.name} (${integer(o.widthM)} m): ${VERDICT_WORDS[o.verdict.kind].toLowerCase()}${t ? `; people carrying the pest past it: ${t.short}${t.decides ? ' — transport decides' : ''}` : ''}`);
  });
  out.push('');
  out.push(
    `Growth: ${GROWTH_PLAIN[m.growthForm] ?? m.growthForm}; growth of a small group ${num(m.lowDensityRate)} per year` +
      `; density below which a group declines (Allee threshold): ${alleeThresholdText(m.alleeThreshold)}` +
      (m.hostDepletion ? '; hosts are killed' : '; hosts not depleted'),
  );
  out.push(`Horizon ${years(doc.horizonYears)} yr; detection level ${percent(doc.detectionLevel, doc.detectionLevel < 0.01 ? 1 : 0)} of capacity`);
  const nb = b.numerics;
  out.push(
    `Grid ${integer(nb.nCells)} cells (${num(nb.cellKmMin * 1000)}–${num(nb.cellKmMax * 1000)} m${nb.autoCell ? ', automatic' : ''}), ` +
      `step ${num(nb.stepYears)} yr${nb.autoStep ? ' (automatic)' : ''}, ${integer(nb.steps)} steps, ${integer(nb.wallMs)} ms`,
  );
  out.push('', 'Baseline (the stand as it stands, no clearing)', ...runSummary(b, doc.horizonYears));
  doc.options.forEach((o, k) => {
    out.push('', `Option ${String.fromCharCode(65 + k)} "${o.name}": ${o.cover === 'clearing' ? 'open clearing' : 'non-host forest'} from km ${km(o.fromKm)}, ${integer(o.widthM)} m wide`, ...optionDecision(o, doc, k), ...runSummary(o.run, doc.horizonYears, o.run.arrivals.map((_, i) => siteEvent(doc, k, i).text)));
  });
  out.push(...uncertaintySummary(doc));
  if (doc.mosaics?.length) {
    out.push('', 'Thinning patterns (periodic host-forest / host-free strips):');
    for (const m of doc.mosaics) {
      out.push(`  ${m.sentence}`);
      out.push(
        `    exact (dispersion relation) ${speed(m.exactKmPerYear)}; homogenised estimate ${speed(m.homogenisedKmPerYear)}; ` +
          `measured in a simulated pattern ${speed(m.measuredKmPerYear)}${m.measuredLogCorrected ? ' (log-corrected fit)' : ''}; unbroken forest ${speed(m.intactKmPerYear)}; ` +
          `λ(0) = ${num(m.lambda0)} /yr (${m.persists ? 'persists' : 'does not persist'})`,
      );
    }
  }
  out.push('', 'Limits and cautions:', ...doc.cautions.map((c) => `  - ${c}`));
  return out.join('\n');
}

/** Readable lines for the ensemble and the human-carried bypass sections (empty when absent). */
export function uncertaintySummary(doc: ResultDocument): string[] {
  const out: string[] = [];
  const u = doc.uncertainty;
  if (u) {
    out.push('', `Uncertainty: ${u.completed} of ${u.draws} Latin hypercube draws (seed ${u.seed}) over ${u.parameters.length} uncertain parameter(s)`);
    for (const p of u.parameters) out.push(`  ${p.label}: ${distributionText(p.distribution, p.unit)}${p.clippedDraws ? ` (${p.clippedDraws} draws clipped to the allowed range)` : ''}`);
    for (const o of u.options) {
      for (const line of o.sentences) out.push(`  ${line}`);
      for (const site of o.sites) {
        const d = site.delayYears;
        if (d.n + d.beyondHorizon === 0) continue;
        if (d.n === 0) out.push(`    ${site.name}: not reached within the horizon with the clearing in any draw where it is reached without it`);
        else out.push(`    ${site.name}: delay median ${quant(d.median)}, 5–95 % range ${quant(d.p05)} to ${quant(d.p95)}`);
      }
    }
    out.push(`  ${u.convergence.message}`);
  }
  const b = doc.bypass;
  if (b) {
    out.push('', 'Human-carried introductions (bypass of the clearing):');
    for (const o of b.options) out.push(`  ${o.sentence}`);
    if (!b.options.some((o) => o.transportDecides)) out.push(`  ${b.regulatorNote}`);
  }
  return out;
}

function quant(x: number | null): string {
  return x === null ? 'beyond the horizon' : `${fixed(x, 1)} yr`;
}

