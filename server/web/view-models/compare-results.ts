/**
 * Two stored results side by side (two saved scenarios, or two runs of one): the answer, the recommended
 * width, each option's verdict with its transport risk, what reaches each site, trees and cost, and the
 * parameters that differ. Formatting only; the words come from server/report/decision.ts.
 */
import type { StoredResult } from '../store.ts';
import { integer } from '../../report/format.ts';
import { headline, recommendationWords, siteEvent, verdictWords } from '../../report/decision.ts';
import { parameterRows } from '../../report/briefing-text.ts';
import { optionKey } from '../../report/charts/index.ts';
import type { TableView } from './table.ts';
import { resultLinks } from './result-view.ts';

function describe(r: StoredResult) {
  const doc = r.document;
  return {
    id: r.id,
    title: doc.title,
    link: resultLinks(r.id).page,
    when: doc.runAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC'),
    fingerprint: doc.scenarioFingerprint.slice(0, 8),
  };
}

const lines = (xs: string[]) => (xs.length ? xs.join('\n') : 'none');

/** The comparison of results a and b. */
export function compareResultsView(a: StoredResult, b: StoredResult) {
  const cell = (r: StoredResult, f: (r: StoredResult) => string) => f(r);
  const row = (label: string, f: (r: StoredResult) => string) => ({ label, cells: [cell(a, f), cell(b, f)] });
  const verdicts = (r: StoredResult) =>
    lines(
      r.document.options.map((o, k) => {
        const w = verdictWords(r.document, k);
        return `${optionKey(k)} ${o.name} (${integer(o.widthM)} m): ${w.label}${w.transport ? `; people carrying the pest: ${w.transport.short}` : ''}`;
      }),
    );
  const siteNames = [...new Set([...a.document.baseline.arrivals, ...b.document.baseline.arrivals].map((s) => s.name))];
  const siteRows = siteNames.map((name) =>
    row(`At ${name}`, (r) => {
      const i = r.document.baseline.arrivals.findIndex((s) => s.name === name);
      if (i < 0) return 'not a protected site in this scenario';
      const base = r.document.baseline.arrivals[i].arrivalYears;
      return lines([
        `no clearing: ${base === null ? `not reached within ${r.document.horizonYears} yr` : `pest arrives year ${base.toFixed(1)}`}`,
        ...r.document.options.map((_, k) => `${optionKey(k)}: ${siteEvent(r.document, k, i).text}`),
      ]);
    }),
  );
  const trees = (r: StoredResult) =>
    lines(r.document.options.map((o, k) => `${optionKey(k)}: ${o.trees ? `${integer(o.trees.stemsRemoved)} trees${o.trees.cost !== null ? `, ${integer(o.trees.cost)}${o.trees.costUnit ? ` ${o.trees.costUnit}` : ''}` : ''}` : 'not computed'}`));
  // Parameters that differ (by label and group), so the reader sees what changed between the two scenarios.
  const pa = parameterRows(a.scenario);
  const pb = parameterRows(b.scenario);
  const keyOf = (p: { group: string; label: string }) => `${p.group} / ${p.label}`;
  const ma = new Map(pa.map((p) => [keyOf(p), p]));
  const mb = new Map(pb.map((p) => [keyOf(p), p]));
  const keys = [...new Set([...ma.keys(), ...mb.keys()])];
  const diff: TableView = {
    name: 'parameters-that-differ',
    caption: 'Parameters that differ',
    head: ['Parameter', 'First result', 'Second result'],
    rows: keys
      .filter((k) => ma.get(k)?.value !== mb.get(k)?.value)
      .map((k) => ({
        label: k,
        cells: [ma.get(k) ? `${ma.get(k)!.value} ${ma.get(k)!.unit === 'no unit' ? '' : ma.get(k)!.unit}`.trim() : 'not given', mb.get(k) ? `${mb.get(k)!.value} ${mb.get(k)!.unit === 'no unit' ? '' : mb.get(k)!.unit}`.trim() : 'not given'],
      })),
  };
  const table: TableView = {
    name: 'two-results',
    caption: 'Two results side by side',
    head: ['', 'First result', 'Second result'],
    rows: [
      row('Scenario', (r) => `${r.document.title} (scenario ${r.document.scenarioFingerprint.slice(0, 8)})`),
      row('Computed', (r) => `${r.document.runAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC')} with ${r.toolName} ${r.toolVersion}`),
      row('The answer in short', (r) => headline(r.document)),
      row('Recommended minimum width', (r) => recommendationWords(r.document).short),
      row('Verdict for each option', verdicts),
      ...siteRows,
      row('Trees removed and cost', trees),
      row('Horizon', (r) => `${r.document.horizonYears} yr`),
    ],
  };
  return { a: describe(a), b: describe(b), table, diff, same: a.document.scenarioFingerprint === b.document.scenarioFingerprint };
}
