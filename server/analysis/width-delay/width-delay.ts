/**
 * The width–delay curve: window runs from the baseline snapshot with clearings of several widths at the
 * option's near edge, the delay each buys at every protected site, and its slope per 100 m.
 */
import { segmentBreaks } from '../../model/scenario.ts';
import { type Resolution } from '../../problem/discretise.ts';
import { type ClearingSpec } from '../../problem/layout.ts';
import { layoutOf, type Problem } from '../../problem/problem.ts';
import type { WidthDelayRow } from '../result.ts';
import { 
  barrierGeometry,
  isBeyond,
  makeWindowSolver,
  movementLengthKm,
  runWindow,
  windowAheadKm } from '../run/barrier-run.ts';

import { windowBehindKm, type BaselineCrossing } from '../run/baseline.ts';

/** Width–delay curve: runs from the baseline snapshot on the stretch from behind the clearing to the transect end. */
export function widthDelayCurve(
  p: Problem,
  option: ClearingSpec,
  crossing: BaselineCrossing,
  baselineArrivals: (number | null)[],
  widthsM: number[],
  resolution: Resolution,
  shouldCancel?: () => boolean,
): WidthDelayRow[] {
  if (!crossing.snapshot) return [];
  const s = p.scenario;
  const geometry = barrierGeometry(s, option);
  const breaks = segmentBreaks(s.transect);
  const behind = windowBehindKm(s);
  const beyondSites = s.sites.map((site) => isBeyond(geometry, site.atKm));
  const rows: WidthDelayRow[] = [];
  for (const widthM of widthsM) {
    const fromKm = geometry.direction > 0 ? geometry.nearKm : geometry.nearKm - widthM / 1000;
    const clearing: ClearingSpec = { fromKm, widthM, cover: option.cover };
    if (fromKm < breaks[0] - 1e-9 || fromKm + widthM / 1000 > breaks[breaks.length - 1] + 1e-9) continue;
    const g = barrierGeometry(s, clearing);
    // The stretch ahead only needs to reach the farthest site beyond the clearing (plus a few movement lengths).
    const beyondKm = s.sites.filter((_, k) => beyondSites[k]).map((x) => x.atKm);
    // (and at least as far as the critical-width windows: a reflecting cut close behind the fringe moves the pinning threshold).
    const margin = 5 * movementLengthKm(s);
    const ahead = windowAheadKm(s);
    const window: [number, number] =
      g.direction > 0
        ? [g.nearKm - behind, beyondKm.length ? Math.max(Math.max(...beyondKm) + margin, g.farKm + ahead) : breaks[breaks.length - 1]]
        : [beyondKm.length ? Math.min(Math.min(...beyondKm) - margin, g.farKm - ahead) : breaks[0], g.nearKm + behind];
    const solver = makeWindowSolver(p, layoutOf(p, clearing), window, resolution, s.horizonYears);
    const sitesKm = s.sites.map((x) => x.atKm);
    const r = runWindow(solver, {
      start: crossing.snapshot,
      tEnd: s.horizonYears,
      geometry: g,
      stopOnCross: false,
      judge: true,
      sitesKm,
      stopOnArrivals: true,
      shouldCancel,
    });
    rows.push({
      widthM,
      pinned: r.outcome === 'pinned',
      crossingYears: r.crossedYears,
      delayYearsBySite: s.sites.map((site, k) => {
        // Behind a verified pinned front no breeding population arrives (the delay is unbounded); a site in
        // the fringe may still see the detection level, which is not an arrival of the pest.
        if (!beyondSites[k] || !isBeyond(g, site.atKm) || r.outcome === 'pinned') return null;
        const a = r.arrivals[k];
        const b = baselineArrivals[k];
        return a !== null && b !== null ? a - b : null;
      }),
    });
  }
  return rows;
}

/** Default widths of the curve: five evenly spaced up to max(2 × option, 1.5 × upper bracket end). */
export function autoCurveWidths(optionWidthM: number, bracket: [number, number] | null): number[] {
  const top = Math.max(2 * optionWidthM, bracket ? 1.5 * bracket[1] : 0);
  return Array.from({ length: 5 }, (_, k) => Math.round((top * (k + 1)) / 5));
}

/** Least-squares slope through the origin of delay against width, ×100 [yr per 100 m]. */
export function delayPer100m(rows: WidthDelayRow[], siteIndex: number): number | null {
  let sxx = 0;
  let sxy = 0;
  let n = 0;
  for (const r of rows) {
    const d = r.delayYearsBySite[siteIndex];
    if (d === null || d === undefined) continue;
    sxx += r.widthM * r.widthM;
    sxy += r.widthM * d;
    n++;
  }
  return n >= 2 && sxx > 0 ? (100 * sxy) / sxx : null;
}
