/**
 * Problems for the problems partial on pages that do not keep the typed text beside a field (upload, JSON
 * editor, error page): each names the value found as well as the path and the allowed range.
 */
import { describeValue, type Problem } from '../../model/errors.ts';

export interface ProblemItem extends Problem {
  /** The value found, as short JSON text ('' when there was none). */
  found: string;
}

export function problemItems(problems: readonly Problem[]): ProblemItem[] {
  return problems.map((p) => ({ ...p, found: p.value === undefined ? '' : describeValue(p.value) }));
}
