/** Readable summary of a landscape result (CLI default output): one block per band option, then the cautions. */
import type { LandscapeDocument } from '../../analysis/landscape-scenario.ts';
import { integer, years } from '../format.ts';

const WAY_WORDS: Record<string, string> = {
  through: 'through the band',
  around: 'around the band',
  none: 'not past the band within the horizon',
};

/** Trees and cost in words. */
export function treesCostText(o: LandscapeDocument['options'][number]): string {
  const unit = o.cost.unit ? ` ${o.cost.unit}` : '';
  const cost = o.cost.total !== null ? `; cost ${integer(o.cost.total)}${unit}` : '';
  return `${integer(o.treesRemoved)} host trees removed on ${o.bandAreaHa.toFixed(1)} ha${cost}`;
}

/**
 * People carrying the pest past a band, in one sentence (summary, briefing and web page share it); null
 * without a transport estimate.
 */
export function transportLine(doc: LandscapeDocument, o: LandscapeDocument['options'][number]): string | null {
  const t = o.transport;
  if (!t) return null;
  const p = t.probability < 0.005 ? 'under 1 %' : t.probability > 0.995 ? 'over 99 %' : `${Math.round(100 * t.probability)} %`;
  const half = t.halfYears !== null ? `; it passes 50 % in year ${years(t.halfYears)}` : '';
  return (
    `People carrying infested wood: ${p} chance that at least one carried introduction founds a colony behind the band within ${doc.horizonYears} years ` +
    `(${t.expectedColonies < 0.01 ? t.expectedColonies.toExponential(1) : t.expectedColonies.toFixed(2)} colonies expected${half}). A rough estimate from the transport rates given; the band does nothing against it.`
  );
}

const pct = (p: number, se: number) => `${Math.round(100 * p)} % (± ${Math.round(100 * se)})`;

/**
 * The ensemble in plain lines (one wording for the summary, the briefing and the web page): what was drawn,
 * then per site the chance of arrival within the horizon without a band and with each.
 */
export function ensembleLines(doc: LandscapeDocument): { intro: string; rows: { site: string; baseline: string; options: string[] }[]; wayPast: string[] } | null {
  const e = doc.ensemble;
  if (!e) return null;
  const intro =
    `Chance that each site is reached within ${doc.horizonYears} years, over ${e.draws} draws of the uncertain pest parameters ` +
    `(${e.parameters.map((p) => p.label.toLowerCase()).join(', ')}; Latin hypercube, seed ${e.seed}; ${e.cellM} m cells, a step ${e.stepFactor}× the transect rule). ` +
    'Reached means the detection level without a band; with a band, a thin fringe that never breeds does not count. ± is one standard error.';
  const rows = e.baseline.map((b, i) => ({ site: b.site, baseline: pct(b.p, b.standardError), options: e.options.map((o) => pct(o.sites[i].p, o.sites[i].standardError)) }));
  const wayPast = e.options.map((o) => `${o.key}. ${o.name}: through the band in ${o.wayPast.through}, around it in ${o.wayPast.around}, not past it in ${o.wayPast.none} of ${e.draws} draws.`);
  return { intro, rows, wayPast };
}

export function landscapeTextSummary(doc: LandscapeDocument): string {
  const out: string[] = [];
  out.push(doc.title);
  if (doc.region) out.push(`Area: ${doc.region}`);
  out.push(`Pest: ${doc.pest.name}${doc.pest.illustrative ? ' (ILLUSTRATIVE profile: invented numbers)' : ''}`);
  if (doc.pest.fitted) out.push(`Parameters: ${doc.pest.fitted}.`);
  out.push(`Map: ${doc.map.nx} × ${doc.map.ny} cells of ${doc.map.cellM} m in ${doc.map.crs.name} (${doc.map.crs.code}); horizon ${doc.horizonYears} years.`);
  out.push('');
  out.push('Without any band:');
  for (const a of doc.baseline.arrivals) out.push(`  ${a.site}: ${a.detectedYears !== null ? `detection level in year ${years(a.detectedYears)}${a.breedingYears !== null ? `, breeding population from year ${years(a.breedingYears)}` : ''}` : `not reached within ${doc.horizonYears} years`}`);
  doc.options.forEach((o) => {
    out.push('');
    out.push(`${o.key}. ${o.name}: ${o.verdict.sentence}`);
    out.push(`   Way past: ${WAY_WORDS[o.wayPast] ?? o.wayPast}. ${o.wayPastSentence}`);
    for (const a of o.arrivals) out.push(`   ${a.site}: ${a.sentence}`);
    out.push(`   ${treesCostText(o)}.`);
    const tl = transportLine(doc, o);
    if (tl) out.push(`   ${tl}`);
    if (o.crossSectionCriticalWidthM) out.push(`   Band cross-section (1-D transect across the band): critical width between ${Math.round(o.crossSectionCriticalWidthM[0])} and ${Math.round(o.crossSectionCriticalWidthM[1])} m.`);
  });
  const ens = ensembleLines(doc);
  if (ens) {
    out.push('');
    out.push(ens.intro);
    out.push(`  site: without a band | ${doc.ensemble!.options.map((o) => `with ${o.key}`).join(' | ')}`);
    for (const r of ens.rows) out.push(`  ${r.site}: ${r.baseline} | ${r.options.join(' | ')}`);
    for (const w of ens.wayPast) out.push(`  ${w}`);
  }
  out.push('');
  out.push('Limits and cautions:');
  for (const c of doc.cautions) out.push(`  - ${c}`);
  return out.join('\n');
}
