/** The landscape scenario schema: one problem per bad field, naming the path, the value and what is allowed. */
import { describe, expect, it } from 'vitest';
import { parseLandscapeScenario, isLandscapeInput, coordinatesOf } from '../../server/model/landscape.ts';
import { ScenarioError } from '../../server/model/errors.ts';

const base = {
  kind: 'landscape',
  title: 't',
  pest: {
    name: 'p', diffusionHost: 0.4, diffusionOpen: 0.4, edgePreferenceOpen: 0.7,
    growth: { form: 'logistic', rate: 0.8 }, hostKillRate: 0.5, mortalityOpen: 3,
  },
  map: { format: 'geotiff', file: 'maps/host.tif', unit: 'share', stemsPerHaAtFullCover: 400 },
  infestation: { places: [{ point: [1, 2], radiusM: 100 }] },
  horizonYears: 10,
};

function problems(input: unknown) {
  try {
    parseLandscapeScenario(input);
  } catch (e) {
    expect(e).toBeInstanceOf(ScenarioError);
    return (e as ScenarioError).problems;
  }
  throw new Error('expected problems');
}

describe('landscape scenario schema', () => {
  it('accepts a minimal scenario and fills defaults', () => {
    const s = parseLandscapeScenario(base);
    expect(s.outside).toBe('impassable');
    expect(s.detectionLevel).toBe(0.01);
    expect(coordinatesOf(s)).toBe('map');
    expect(isLandscapeInput(base)).toBe(true);
    expect(isLandscapeInput({ transect: {} })).toBe(false);
  });

  it('reuses the transport schema without the transect-only fields (a forward share is refused by name)', () => {
    const transport = { ratePerKm2Year: 0.01, kernel: { shape: 'exponential', meanKm: 20 }, establishmentProbability: 0.2 };
    expect(parseLandscapeScenario({ ...base, transport }).transport).toEqual(transport);
    const bad = problems({ ...base, transport: { ...transport, forwardShare: 0.5 } });
    expect(bad.map((p) => p.path).join(' ')).toMatch(/transport/);
    expect(bad.map((p) => `${p.path} ${p.message}`).join(' ')).toMatch(/forwardShare/);
    expect(problems({ ...base, transport: { ...transport, establishmentProbability: 2 } })[0].path).toBe('transport.establishmentProbability');
  });

  it('reuses the pest schema (a bad pest field is reported under pest.)', () => {
    expect(problems({ ...base, pest: { ...base.pest, diffusionHost: -1 } })).toEqual([
      { path: 'pest.diffusionHost', value: -1, message: 'must be > 0 and ≤ 1000 km²/yr' },
    ]);
  });

  it('names bad map fields, band shapes and units', () => {
    const p = problems({
      ...base,
      map: { ...base.map, unit: 'percent', file: '../secret.tif' },
      bands: { options: [{ name: 'a', line: [[0, 0], [1, 1]] }, { name: 'b', polygon: [[[0, 0], [1, 0], [1, 1]]], widthM: 10 }, { name: 'c' }] },
    });
    const byPath = Object.fromEntries(p.map((x) => [x.path, x.message]));
    expect(byPath['map.unit']).toMatch(/must be one of "share", "stems-per-ha", "basal-area-m2-per-ha"/);
    expect(byPath['map.file']).toMatch(/must not climb out|plain relative file name/);
    expect(byPath['bands.options[0].widthM']).toMatch(/is required with a centre line \(≥ 1 and ≤ 20000 m\)/);
    expect(byPath['bands.options[1].widthM']).toMatch(/only used with a centre line/);
    expect(byPath['bands.options[2]']).toMatch(/either "line".*or "polygon"/);
  });

  it('cross-field rules: basal area needs its full-cover value; GeoJSON maps need lon/lat; codes unique; non-host fields', () => {
    const p = problems({
      ...base,
      map: { ...base.map, unit: 'basal-area-m2-per-ha', classes: { file: 'c.tif', codes: { 'host-forest': [1], 'non-host-forest': [1] } } },
    });
    const paths = p.map((x) => x.path);
    expect(paths).toContain('map.basalAreaAtFullCover');
    expect(paths).toContain('map.classes.codes.non-host-forest');
    expect(paths).toContain('pest.diffusionNonHost');
    const g = problems({ ...base, map: { format: 'geojson', file: 's.geojson' }, coordinates: 'map' });
    expect(g).toEqual([expect.objectContaining({ path: 'coordinates', value: 'map' })]);
  });
});
