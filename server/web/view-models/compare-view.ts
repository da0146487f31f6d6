/**
 * View-model of the compare page: every option side by side in one table (the same decision words as the
 * result page, from server/report/decision.ts) and one chart whose legend carries each verdict.
 */
import type { ResultDocument } from '../../analysis/result.ts';
import { integer, km, percent, years } from '../../report/format.ts';
import { baselineSpreadText, headline, recommendationWords, siteEvent, spreadBeyondText, transportNote, verdictWords } from '../../report/decision.ts';
import type { StoredResult } from '../store.ts';
import { compareChart } from './charts.ts';
import type { TableView } from './table.ts';
import { NOT_COMPUTED, header, keyed, loose, optionWhat, resultLinks, withCsv, yearOrNot, type LooseOption } from './result-view.ts';

/** The compare page: options side by side in one table and one chart. */
export function comparePageView(stored: StoredResult) {
  const doc = stored.document;
  const opts = doc.options.map(loose);
  const row = (label: string, baseline: string, cell: (o: LooseOption, k: number) => string) => ({ label, cells: [baseline, ...opts.map(cell)] });
  const hasTransport = Boolean(doc.bypass);
  const rec = recommendationWords(doc);
  const rows = [
    row('Verdict', 'no clearing', (o, k) => (o.verdict ? verdictWords(doc, k).label : NOT_COMPUTED)),
    ...(hasTransport
      ? [row('People carrying the pest past it (established colony beyond)', 'not assessed without a clearing', (_, k) => {
          const t = transportNote(doc, k);
          return t ? `${t.short}${t.decides ? ' — transport decides' : ''}` : 'not computed';
        })]
      : []),
    row('Clearing', 'none', (o) => optionWhat(o)),
    row('Recommended minimum width (whole scenario)', rec.widthM === null ? 'none' : `${integer(rec.widthM)} m`, (o) =>
      rec.widthM === null ? 'none' : o.widthM >= rec.widthM ? 'this option is at least as wide' : `${integer(rec.widthM - o.widthM)} m narrower than recommended`,
    ),
    // Each option has its own clearing, so the baseline time for that place is shown in the option's cell.
    row('Front passes the far edge of the clearing', 'no clearing', (o) =>
      o.crossingYears
        ? `${o.pinned ? 'never: held' : yearOrNot(o.crossingYears.option, doc.horizonYears)} (without it: ${yearOrNot(o.crossingYears.baseline, doc.horizonYears)})`
        : NOT_COMPUTED,
    ),
    ...doc.baseline.arrivals.map((a, i) =>
      row(`At ${a.name} (km ${km(a.atKm)})`, a.arrivalYears === null ? `not reached within ${years(doc.horizonYears)} yr` : `pest arrives year ${years(a.arrivalYears)}`, (_, k) => siteEvent(doc, k, i).text),
    ),
    row('Host trees removed', '0', (o) => (o.trees ? integer(o.trees.stemsRemoved) : NOT_COMPUTED)),
    row('Cost', 'nothing cut', (o) => (o.trees ? (o.trees.cost === null ? 'no cost given' : `${integer(o.trees.cost)}${o.trees.costUnit ? ` ${o.trees.costUnit}` : ''}`) : NOT_COMPUTED)),
    row('Spread rate beyond the clearing', `${baselineSpreadText(doc)} (no clearing)`, (o) => spreadBeyondText(o)),
    row('Host stems left at the end', percent(doc.baseline.host.remainingFraction), (o) => percent(o.run.host.remainingFraction)),
    row('Width at which the front stops', 'no clearing', (o) =>
      !o.criticalWidth ? NOT_COMPUTED : !o.criticalWidth.applicable ? 'no width stops it' : o.criticalWidth.bracketM ? `${integer(o.criticalWidth.bracketM[1])} m (gets through at ${integer(o.criticalWidth.bracketM[0])} m)` : 'not found',
    ),
  ];
  const table: TableView = { name: 'side-by-side', caption: 'Options side by side', head: ['', 'No clearing', ...opts.map((_, k) => keyed(doc, k))], rows };
  return {
    ...header(stored),
    headline: headline(doc),
    headlineTone: doc.options.some((_, k) => transportNote(doc, k)?.decides) ? 'partial' : 'plain',
    hasOptions: doc.options.length > 0,
    table: withCsv(table, resultLinks(stored.id).tables),
    chart: compareChart(decoratedForChart(doc)),
  };
}

/** The document with each option's name carrying its verdict and transport risk, for the side-by-side chart's legend. */
function decoratedForChart(doc: ResultDocument): ResultDocument {
  return {
    ...doc,
    options: doc.options.map((o, k) => {
      const w = verdictWords(doc, k);
      const t = w.transport ? `; transport risk ${w.transport.short}` : '';
      return { ...o, name: `${o.name}: ${w.label.toLowerCase()}${t}` };
    }),
  };
}
