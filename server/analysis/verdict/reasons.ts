/** Verdict words: why a clearing helps or hurts, in plain words, and the smallest arrival change that counts. */
import type { PointScenario } from '../../model/scenario.ts';
import { habitatCoefficients } from '../../model/habitat.ts';
import { type ClearingSpec } from '../../problem/layout.ts';
import type { VerdictKind } from '../result.ts';
import { hasStrongAllee } from '../../model/growth.ts';


/** Why a clearing helps or hurts, in words (movement ratio, edge preference, mortality, growth form). */
export function reasonInWords(s: PointScenario, cover: ClearingSpec['cover'], kind: VerdictKind): string {
  const p = s.pest;
  const host = habitatCoefficients(p, 'host-forest');
  const open = habitatCoefficients(p, cover);
  const ratio = open.diffusion / host.diffusion;
  const alpha = cover === 'clearing' ? p.edgePreferenceOpen : (p.edgePreferenceNonHost ?? 0.5);
  const ground = cover === 'clearing' ? 'the open' : 'non-host forest';
  const moveWords =
    ratio > 1.05 ? `insects move ${fmt(ratio)}× faster in ${ground} than in host forest` : ratio < 0.95 ? `insects move ${fmt(1 / ratio)}× slower in ${ground} than in host forest` : `insects move as fast in ${ground} as in host forest`;
  const edgeWords =
    alpha > 0.55
      ? `at an edge they turn back into host forest with probability ${fmt(alpha)} (edge avoidance)`
      : alpha < 0.45
        ? `at an edge they step into ${ground} with probability ${fmt(1 - alpha)} (they are drawn out of the forest)`
        : `they do not avoid the edge (edge preference ${fmt(alpha)})`;
  const jump = open.residence / host.residence;
  const mort = `mortality in ${ground} is ${fmt(open.mortality)} /yr`;
  const allee = hasStrongAllee(p.growth, 1);
  const growthWords = allee
    ? 'small groups of this pest die out (a strong Allee effect): the few insects that get across are too sparse to breed unless enough of them arrive together'
    : 'the pest has no Allee effect: even a few insects that get across found a growing population';
  const jumpWords = Math.abs(jump - 1) < 1e-6 ? 'so the density is continuous across the edge' : `so the density just inside the cut is ${fmt(jump)} times that at the forest edge`;
  const core = `${moveWords}; ${edgeWords}, ${jumpWords}; ${mort}; ${growthWords}.`;
  switch (kind) {
    case 'speeds-up':
      return `Faster, not slower: ${core} Insects cross the cut quickly and little of the flow is lost there, so the stand beyond is reached sooner than through unbroken forest.`;
    case 'holds':
    case 'marginal':
      return `Held: ${core}`;
    case 'delays':
    case 'not-crossed':
      return `Slowed: ${core}`;
    default:
      return core;
  }
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return '—';
  return Number(x.toPrecision(x >= 10 ? 3 : 2)).toString();
}

/** Smallest arrival difference that counts as a change [yr]: one time step or 0.05 yr. */
export function changeThreshold(stepYears: number): number {
  return Math.max(stepYears, 0.05);
}
