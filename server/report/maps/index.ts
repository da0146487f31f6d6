/** Maps of a landscape result: the list the web page and the briefing show, in reading order. */
import type { Chart } from '../charts/frame.ts';
import type { LoadedLandscape } from '../../domain/gis/load.ts';
import type { LandscapeResult } from '../../analysis/landscape/result.ts';
import { arrivalMap, hostCoverMap, type MapBase, type MapSize } from './landscape-maps.ts';
import { optionKey } from '../charts/styles.ts';

export { arrivalMap, hostCoverMap, frontStep, VECTOR_MAX_CELLS, type MapBase, type ArrivalMapInput } from './landscape-maps.ts';

/** The map base of a loaded landscape (plain data; typed arrays kept). */
export function mapBaseOf(l: LoadedLandscape): MapBase {
  return {
    grid: { nx: l.nx, ny: l.ny, cellM: l.cellM, originXM: l.originXM, originYM: l.originYM, crs: l.crs },
    classAtCells: l.classAtCells,
    hostCoverAtCells: l.hostCoverAtCells,
    bands: l.bands.map((b, k) => ({ label: b.label, polygon: l.bandPolygons[k] })),
    infested: l.infestedPolygons,
    sites: l.sitePlaces,
  };
}

/** A map with a stable id for the page (anchors) and the briefing. */
export interface IdMap extends Chart {
  id: string;
}

/**
 * The maps of a result: the host map with all bands, then arrival time without any band (baseline) and
 * with each band (side by side on the page, two per row in the briefing).
 * @throws Error when the result's grid is not the map's grid (a bug: both come from the same load)
 */
export function mapsForLandscape(base: MapBase, result: Pick<LandscapeResult, 'grid' | 'baseline' | 'options' | 'horizonYears'>, size: MapSize = {}): IdMap[] {
  if (result.grid.nx !== base.grid.nx || result.grid.ny !== base.grid.ny) {
    throw new Error(`result grid ${result.grid.nx}×${result.grid.ny} is not the map grid ${base.grid.nx}×${base.grid.ny}`);
  }
  const out: IdMap[] = [{ id: 'map-host', ...hostCoverMap(base, size) }];
  out.push({ id: 'map-arrival-baseline', ...arrivalMap(base, { arrivalYears: result.baseline.arrival.years, horizonYears: result.horizonYears, band: null, title: 'Arrival time without any band (baseline)' }, size) });
  result.options.forEach((o, k) => {
    const band = base.bands.findIndex((b) => b.label === o.label);
    out.push({
      id: `map-arrival-${optionKey(k).toLowerCase()}`,
      ...arrivalMap(base, { arrivalYears: o.run.arrival.years, horizonYears: result.horizonYears, band: band >= 0 ? band : null, title: `Arrival time with band ${optionKey(k)}: ${o.label}` }, size),
    });
  });
  return out;
}
