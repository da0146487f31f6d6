/**
 * The parts of a result document the charts read, as narrow structural types: a full ResultDocument
 * fits, and so does a hand-built object with only these fields (web pages, tests, future analyses).
 */
import type { OptionResult, PieceSummary, RunResult } from '../../analysis/result.ts';
import { isNum } from './svg.ts';

export type RunPart = Pick<RunResult, 'series' | 'layout' | 'profiles' | 'spaceTime' | 'arrivals'>;
/** An option as the charts need it; the full verdict fields are not required. */
export type OptionPart = Pick<OptionResult, 'name' | 'fromKm' | 'widthM'> &
  Partial<Pick<OptionResult, 'cover' | 'pinned' | 'crossingYears' | 'verdict'>> & { run: Pick<RunResult, 'series' | 'profiles'> };
export interface SitePart {
  name: string;
  atKm: number;
}
export interface Interval {
  fromKm: number;
  toKm: number;
}

/** Start and end of the transect [km] from a layout. */
export function transectExtent(layout: PieceSummary[]): [number, number] {
  if (!layout.length) return [0, 1];
  return [layout[0].fromKm, layout[layout.length - 1].toKm];
}

/** The clearing of an option as a km interval. */
export function optionInterval(o: { fromKm: number; widthM: number }): Interval {
  return { fromKm: o.fromKm, toKm: o.fromKm + o.widthM / 1000 };
}

/**
 * The current infestation: taken from the document when it carries it, otherwise read from the
 * baseline fronts at the first recorded time (the infested stretch's edges at year 0).
 */
export function infestationOf(doc: { infestation?: Interval; baseline: Pick<RunResult, 'series'> }): Interval | null {
  if (doc.infestation && isNum(doc.infestation.fromKm) && isNum(doc.infestation.toKm)) return doc.infestation;
  const s = doc.baseline.series;
  const l = s.leftFrontKm[0];
  const r = s.rightFrontKm[0];
  return isNum(l) && isNum(r) && r >= l ? { fromKm: l, toKm: r } : null;
}

/** Which front meets the option's clearing: the right front when the clearing lies right of the infestation. */
export function sideOf(o: { fromKm: number; widthM: number }, infestation: Interval | null): 'right' | 'left' {
  if (!infestation) return 'right';
  const c = optionInterval(o);
  return (c.fromKm + c.toKm) / 2 >= (infestation.fromKm + infestation.toKm) / 2 ? 'right' : 'left';
}
