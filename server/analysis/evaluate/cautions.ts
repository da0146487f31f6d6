/**
 * Limits and cautions shown with every result: on the results page, in the CLI summary and in the
 * briefing. Wording is ours; the content is common practice in forest-health work (no single source).
 */
export const MODEL_LIMITS: readonly string[] = [
  'The transect is one-dimensional: it assumes the pest meets the clearing head-on. In the field a clearing of finite length can be bypassed around its ends.',
  'Insects are treated as a continuous density. Very small numbers, chance events and single long flights are not represented unless modelled separately.',
  'People moving infested wood (firewood, logs, nursery stock, vehicles) are not part of the spread model; a clearing does nothing against such transport.',
  'Host trees do not regrow within the horizon, and sprouts, regeneration, ornamental and isolated host trees are assumed absent from the clearing.',
  'Edge behaviour, movement rates, the Allee threshold and growth are taken as constant in space and time; results are sensitive to all of them, edge behaviour especially.',
  'Infestations are usually found years after they start: the real front is likely ahead of the mapped one.',
];

export const CAUTIONS: readonly string[] = [
  'Model output supports a decision; it does not replace field survey, monitoring data or the judgement of the plant-protection authority responsible for the area.',
  'Decisions on quarantine, host removal and movement controls rest with the local regulator. Follow local regulations, quarantine rules and licensed practice for felling and for disposing of infested wood.',
  'Tree felling is hazardous work. It must be planned and carried out by trained, licensed crews under the applicable safety rules.',
  'A clearing can speed spread up when insects move much faster in the open and do not avoid edges. Check the verdict for each option, not only the width.',
];

/** Everything a reader must see with a result, in one list. */
export function allCautions(): string[] {
  return [...MODEL_LIMITS, ...CAUTIONS];
}
