import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText } from '../../server/model/scenario.ts';
import { parameterRows } from '../../server/report/briefing-text.ts';

describe("briefing parameter table: values fitted to survey records", () => {
  const base = parseScenarioText(readFileSync(new URL('../../scenarios/survey-fit.json', import.meta.url), 'utf8'));
  it('shows the provenance sentence as the source of a fitted parameter and nowhere else', () => {
    const sentence = 'Movement in host forest fitted to 37 detections (140 survey records), 2019–2025';
    const s = parseScenario({ ...base, pest: { ...base.pest, diffusionHost: { dist: 'lognormal', median: 0.2, spread: 1.4 } }, calibration: { sentence, paths: ['pest.diffusionHost'] } });
    const rows = parameterRows(s);
    expect(rows.find((r) => r.label === 'Movement in host forest')?.source).toBe(sentence);
    expect(rows.filter((r) => r.source === sentence).length).toBe(1);
    expect(parameterRows(base).some((r) => r.source.includes('fitted to'))).toBe(false);
    // A fitted value later replaced by a plain number no longer claims the fit.
    const edited = parseScenario({ ...base, pest: { ...base.pest, diffusionHost: 0.3 }, calibration: { sentence, paths: ['pest.diffusionHost'] } });
    expect(parameterRows(edited).some((r) => r.source === sentence)).toBe(false);
  });
  it('the provenance field is validated like any other', () => {
    expect(() => parseScenario({ ...base, calibration: { sentence: '' } })).toThrow(/calibration.sentence/);
  });
});
