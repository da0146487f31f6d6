/**
 * View-model of the ensemble (uncertainty, sensitivity) and bypass-risk sections of the result page.
 * Formatting only: every probability, quantile and correlation comes from the analysis (server/analysis/
 * uncertainty.ts, ensemble.ts, bypass.ts).
 */
import type { BypassResult, ProbabilityEstimate, QuantileSummary, ResultDocument } from '../../analysis/result.ts';
import { distributionText, fixed, integer, num, percent, probabilityEstimate, years } from '../../report/format.ts';
import { optionKey } from '../../report/charts/index.ts';
import type { TableView } from './table.ts';

/** "62.5 % ± 1.5 %" (estimate and one Monte Carlo standard error), or the 95 % interval when every draw agreed. */
export function probabilityText(p: ProbabilityEstimate | null | undefined): string {
  return probabilityEstimate(p);
}

/** "12.3 (5–95 %: 9.1–18.0)", with "beyond the horizon" where the quantile lies past the run. */
export function quantileText(q: QuantileSummary | null | undefined, unit = 'yr', format: (x: number) => string = years): string {
  if (!q || (q.n === 0 && q.beyondHorizon === 0)) return 'no draws with a value';
  const v = (x: number | null) => (x === null ? 'beyond' : format(x));
  if (q.median === null) return `beyond the horizon in ${q.beyondHorizon} of ${q.n + q.beyondHorizon} draws`;
  return `${v(q.median)} ${unit} (5–95 %: ${v(q.p05)}–${v(q.p95)})`;
}

export function uncertaintyView(doc: ResultDocument) {
  const u = doc.uncertainty;
  if (!u) return null;
  const key = (k: number) => `${optionKey(k)}: ${u.options[k].name}`;
  const parameters: TableView = {
    name: 'ensemble-parameters',
    caption: 'Parameters drawn',
    head: ['Parameter', 'Range drawn', 'Single-run value', 'Draws moved into the allowed range'],
    rows: u.parameters.map((p) => ({
      label: p.label,
      cells: [distributionText(p.distribution, p.unit), `${num(p.centralValue, 4)}${p.unit ? ` ${p.unit}` : ''}`, integer(p.clippedDraws)],
    })),
  };
  const options: TableView = {
    name: 'ensemble-options',
    caption: 'Chances over the ensemble, option by option',
    head: ['Option', 'Front not past the clearing within the horizon', 'Front stopped for good (checked)', 'Holds, people carrying the pest included', 'Year the front passes the clearing', 'Width at which the front stops', 'Width that holds in 90 % / 95 % of draws'],
    rows: u.options.map((o, k) => ({
      label: `${key(k)} (${integer(o.widthM)} m)`,
      cells: [
        probabilityText(o.holdsWithinHorizon),
        probabilityText(o.pinned),
        o.holdsIncludingTransport ? probabilityText(o.holdsIncludingTransport) : 'not assessed (no transport given)',
        quantileText(o.crossingYears),
        o.criticalWidth.computed ? quantileText(o.criticalWidth.widthM, 'm', (x) => integer(x)) : 'not computed: the width search in every draw was switched off for this scenario (or no front reached the clearing)',
        o.criticalWidth.computed
          ? `${o.criticalWidth.holds90M === null ? 'beyond the range searched' : `${integer(o.criticalWidth.holds90M)} m`} / ${o.criticalWidth.holds95M === null ? 'beyond' : `${integer(o.criticalWidth.holds95M)} m`}`
          : 'not computed',
      ],
    })),
  };
  const siteNames = u.baseline.sites.map((s) => s.name);
  const sites: TableView = {
    name: 'ensemble-sites',
    caption: 'Protected sites over the ensemble',
    head: ['Layout', ...siteNames.flatMap((n) => [`${n}: reached`, `${n}: arrival year`, `${n}: years gained`])],
    rows: [
      {
        label: 'Baseline',
        cells: u.baseline.sites.flatMap((s) => [probabilityText(s.reachedWithinHorizon), quantileText(s.arrivalYears), 'no clearing: nothing gained']),
      },
      ...u.options.map((o, k) => ({
        label: key(k),
        cells: o.sites.flatMap((s) => [probabilityText(s.reachedWithinHorizon), quantileText(s.arrivalYears), quantileText(s.delayYears)]),
      })),
    ],
  };
  const sensitivity = u.options
    .map((o, k) => ({ o, k }))
    .filter(({ o }) => o.sensitivity)
    .map(({ o, k }) => ({
      name: key(k),
      sentence: o.sensitivity!.sentence,
      table: {
        name: `sensitivity-${optionKey(k)}`,
        caption: `What matters most, ${key(k)}`,
        head: ['Parameter', `Influence on ${o.sensitivity!.outcome} (rank correlation, −1 to +1)`, 'Clearly different from no influence (5 % test)'],
        rows: o.sensitivity!.entries.map((e) => ({ label: e.label, cells: [`${e.prcc > 0 ? '+' : ''}${fixed(e.prcc, 2)}`, e.significant ? 'yes' : 'no'] })),
      } satisfies TableView,
    }));
  return {
    summary:
      `${integer(u.completed)} of ${integer(u.draws)} combinations of the uncertain values (draws spread evenly over the ranges: Latin hypercube, seed ${u.seed})` +
      `${u.status === 'cancelled' ? ', stopped early' : ''}; ${num(u.wallMs / 1000, 2)} s on ${u.ranOn ?? `${u.threads} thread${u.threads === 1 ? '' : 's'}`}.`,
    convergence: u.convergence.message,
    adequate: u.convergence.adequate,
    parameters,
    options,
    sites: siteNames.length ? sites : null,
    sensitivity,
    sentences: u.options.flatMap((o) => o.sentences),
  };
}

export function bypassView(doc: ResultDocument) {
  const b: BypassResult | undefined = doc.bypass;
  if (!b) return null;
  const kernel = b.inputs.kernel.shape === 'exponential' ? `exponential, mean ${num(b.inputs.kernel.meanKm)} km` : `table of ${b.inputs.kernel.points.length} distances`;
  return {
    method: b.method,
    inputs:
      `${num(b.inputs.ratePerKm2Year)} introductions per km² per yr; distances ${kernel}; establishment probability ${num(b.inputs.establishmentProbability)}; ` +
      `${percent(b.inputs.forwardShare)} heading towards the protected side; band ${num(b.inputs.bandWidthKm)} km wide.`,
    regulatorNote: b.regulatorNote,
    table: {
      name: 'transport',
      caption: 'People carrying the pest past the clearing',
      head: ['Option', 'Introduction established beyond it by the horizon', 'With the clearing 100 m wider', 'Over the ensemble', 'Holds against natural spread', 'Holds overall', 'Transport decides'],
      rows: b.options.map((o, k) => ({
        label: `${optionKey(k)}: ${o.name} (${integer(o.widthM)} m)`,
        cells: [
          percent(o.probability, 1),
          percent(o.probabilityIf100mWider, 1),
          o.ensemble ? probabilityText(o.ensemble) : 'no ensemble run',
          percent(o.holdsNatural, 0),
          percent(o.holdsOverall, 1),
          o.transportDecides ? 'yes' : 'no',
        ],
      })),
    } satisfies TableView,
    sentences: b.options.map((o) => o.sentence),
  };
}
