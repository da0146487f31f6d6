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
    if (o.crossSectionCriticalWidthM) out.push(`   Band cross-section (1-D transect across the band): critical width between ${Math.round(o.crossSectionCriticalWidthM[0])} and ${Math.round(o.crossSectionCriticalWidthM[1])} m.`);
  });
  out.push('');
  out.push('Limits and cautions:');
  for (const c of doc.cautions) out.push(`  - ${c}`);
  return out.join('\n');
}
