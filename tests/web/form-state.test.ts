/**
 * The scenario form's text ↔ scenario conversion and its row buttons. The reference is the scenario
 * schema itself (parseScenario): a scenario shown in the form and posted back unchanged must validate to
 * the very same scenario, and typed text that is not a number must come back as the schema's problem.
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText, type Scenario } from '../../server/model/scenario.ts';
import { ScenarioError } from '../../server/model/errors.ts';
import {
  applyRowAction,
  extraSettings,
  formStateFromBody,
  formToScenario,
  parseRowAction,
  readNumber,
  rowIndices,
  scenarioToForm,
  type FormState,
} from '../../server/web/form-state.ts';
import { formView } from '../../server/web/view-models/scenario-form.ts';

const demoDir = new URL('../../scenarios/', import.meta.url);
const fixtureDir = new URL('./fixtures/scenarios/', import.meta.url);
const load = (dir: URL, f: string) => parseScenarioText(readFileSync(new URL(f, dir), 'utf8'));
const demos: [string, Scenario][] = [
  ...readdirSync(demoDir).filter((f) => f.endsWith('.json')).map((f) => [f, load(demoDir, f)] as [string, Scenario]),
  ['quick-check.json', load(fixtureDir, 'quick-check.json')],
];
const quick = () => structuredClone(demos.find(([f]) => f === 'quick-check.json')![1]);

function problemsOf(state: FormState) {
  const { input, problems } = formToScenario(state);
  try {
    parseScenario(input);
  } catch (e) {
    if (e instanceof ScenarioError) return [...problems, ...e.problems];
    throw e;
  }
  return problems;
}

describe('scenario → form text → scenario', () => {
  for (const [name, scenario] of demos) {
    it(`${name} comes back unchanged`, () => {
      const { input, problems } = formToScenario(scenarioToForm(scenario));
      expect(problems).toEqual([]);
      expect(parseScenario(input)).toEqual(scenario);
    });
  }

  it('keeps distributions of every kind, in plain fields and in segment rows', () => {
    const s = quick();
    s.pest.diffusionHost = { dist: 'triangular', min: 0.1, mode: 0.2, max: 0.5 };
    s.pest.edgePreferenceOpen = { dist: 'uniform', min: 0.55, max: 0.9 };
    s.pest.mortalityOpen = { dist: 'lognormal', median: 2, spread: 1.5 };
    const seg = s.transect.segments[0];
    if (seg.habitat !== 'host-forest') throw new Error('fixture changed');
    seg.stemsPerHa = { dist: 'lognormal', median: 400, spread: 1.3 };
    const state = scenarioToForm(s);
    expect(state['pest.diffusionHost~kind']).toBe('triangular');
    expect(state['pest.diffusionHost~mode']).toBe('0.2');
    expect(parseScenario(formToScenario(state).input)).toEqual(s);
  });
});

describe('ensemble and transport blocks', () => {
  const withBlocks = (kernel: Record<string, unknown>) => {
    const raw = JSON.parse(readFileSync(new URL('quick-check.json', fixtureDir), 'utf8'));
    raw.uncertainty = { draws: 200, seed: 7, targetStandardError: 0.03, criticalWidth: false };
    raw.transport = { ratePerKm2Year: { dist: 'uniform', min: 0.001, max: 0.01 }, kernel, establishmentProbability: 0.2, forwardShare: 0.4, bandWidthKm: 5 };
    return parseScenario(raw);
  };

  it('come back unchanged, with an exponential or a table kernel', () => {
    for (const kernel of [
      { shape: 'exponential', meanKm: 20 },
      { shape: 'table', points: [{ distanceKm: 0, shareBeyond: 1 }, { distanceKm: 10, shareBeyond: 0.3 }, { distanceKm: 50, shareBeyond: 0 }] },
    ]) {
      const s = withBlocks(kernel);
      const state = scenarioToForm(s);
      expect(state._uncertainty).toBe('on');
      expect(state._transport).toBe('on');
      expect(parseScenario(formToScenario(state).input)).toEqual(s);
    }
  });

  it('are left out when their switch is off, and get their defaults when it is ticked', () => {
    const state = scenarioToForm(withBlocks({ shape: 'exponential', meanKm: 20 }));
    state._uncertainty = '';
    delete state._transport;
    const off = parseScenario(formToScenario(state).input);
    expect(off.uncertainty).toBeUndefined();
    expect(off.transport).toBeUndefined();
    const fresh = scenarioToForm(quick());
    expect(fresh['uncertainty.draws']).toBe('1000');
    expect(fresh['uncertainty.criticalWidth']).toBe('on');
    fresh._uncertainty = 'on';
    expect(parseScenario(formToScenario(fresh).input).uncertainty).toEqual({ draws: 1000, seed: 1, targetStandardError: 0.02, criticalWidth: true });
  });

  it('a kernel table row that grows is reported in its row', () => {
    const state = scenarioToForm(withBlocks({ shape: 'table', points: [{ distanceKm: 0, shareBeyond: 1 }, { distanceKm: 10, shareBeyond: 0.3 }] }));
    state['transport.kernel.points[1].shareBeyond'] = '1.2';
    const problems = problemsOf(state);
    expect(problems[0]).toMatchObject({ path: 'transport.kernel.points[1].shareBeyond', value: 1.2 });
    expect(formView(state, problems).kernel.rows[1].cells[1].errors[0]).toMatch(/≤ 1/);
  });
});

describe('strip patterns (mosaics)', () => {
  it('round-trip with the yes/no choice left at its default, set to no, or set to yes', () => {
    for (const measure of [undefined, false, true]) {
      const s = quick();
      const raw = JSON.parse(JSON.stringify(s));
      raw.mosaics = [{ name: 'Narrow strips', forestM: 200, gapM: 100, cover: 'clearing', ...(measure === undefined ? {} : { measure }) }, { name: 'Thin', forestM: 500, gapM: 50, stocking: 0.5 }];
      const withMosaics = parseScenario(raw);
      const state = scenarioToForm(withMosaics);
      expect(state['mosaics[0].measure']).toBe(measure === undefined ? '' : String(measure));
      expect(parseScenario(formToScenario(state).input)).toEqual(withMosaics);
    }
  });

  it('are left out when the table is empty', () => {
    const state = applyRowAction(applyRowAction(scenarioToForm(quick()), { kind: 'add', group: 'mosaics' }), { kind: 'remove', group: 'mosaics', index: 0 });
    expect(formToScenario(state).input.mosaics).toBeUndefined();
  });
});

describe('lists of numbers', () => {
  it('the widths of the delay curve round-trip, and a bad entry is reported by its index', () => {
    const s = quick();
    s.barrier!.curveWidthsM = [100, 250.5, 600];
    const state = scenarioToForm(s);
    expect(state['barrier.curveWidthsM']).toBe('100, 250.5, 600');
    expect(parseScenario(formToScenario(state).input)).toEqual(s);
    state['barrier.curveWidthsM'] = '100; wide';
    const problems = problemsOf(state);
    expect(problems).toEqual([expect.objectContaining({ path: 'barrier.curveWidthsM[1]', value: 'wide' })]);
    const field = formView(state, problems).sections.barrier.fields.find((f) => f.name === 'barrier.curveWidthsM')!;
    expect(field.errors[0]).toMatch(/^entry 2: must be ≥ 1 and ≤ 100000 m/);
    expect(field.value).toBe('100; wide');
  });
});

describe('reading typed numbers', () => {
  it.each([
    ['12', 12],
    [' 0.5 ', 0.5],
    ['0,5', 0.5],
    ['\u22122', -2],
    ['1e-3', 0.001],
    ['.25', 0.25],
    ['1 000', 1000],
    ['', undefined],
    ['   ', undefined],
    ['fast', 'fast'],
    ['1.2.3', '1.2.3'],
    ['0x10', '0x10'],
  ])('%j → %j', (text, expected) => {
    expect(readNumber(text)).toEqual(expected);
  });
});

describe('problems land beside their input with the typed text kept', () => {
  it('a word where a rate belongs', () => {
    const state = scenarioToForm(quick());
    state['pest.growth.rate'] = 'fast';
    const problems = problemsOf(state);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatchObject({ path: 'pest.growth.rate', value: 'fast' });
    expect(problems[0].message).toMatch(/> 0 and ≤ 50 1\/yr/);
    const view = formView(state, problems);
    const field = view.sections.pest.fields.find((f) => f.name === 'pest.growth.rate')!;
    expect(field.value).toBe('fast');
    expect(field.errors[0]).toMatch(/> 0 and ≤ 50/);
    expect(view.problems[0].anchor).toBe(`#${field.id}`);
  });

  it('a distribution with a missing part and max below min', () => {
    const state = scenarioToForm(quick());
    Object.assign(state, { 'pest.diffusionHost~kind': 'triangular', 'pest.diffusionHost~min': '0.5', 'pest.diffusionHost~mode': '', 'pest.diffusionHost~max': '0.2' });
    const problems = problemsOf(state);
    expect(problems.map((p) => p.path)).toContain('pest.diffusionHost.mode');
    const field = formView(state, problems).sections.pest.fields.find((f) => f.name === 'pest.diffusionHost')!;
    expect(field.errors.join(' ')).toMatch(/most likely: is required/);
    expect(field.dist?.open).toBe(true);
    expect(field.dist?.parts.find((p) => p.name.endsWith('~max'))?.value).toBe('0.2');
  });

  it('a segment row error is shown in that row', () => {
    const state = scenarioToForm(quick());
    state['transect.segments[1].lengthKm'] = '-3';
    const problems = problemsOf(state);
    const view = formView(state, problems);
    const cell = view.segments.rows[1].cells.find((c) => c.name === 'transect.segments[1].lengthKm')!;
    expect(cell.value).toBe('-3');
    expect(cell.errors[0]).toMatch(/≥ 0.001 and ≤ 5000 km/);
  });

  it('a cross-field problem (site inside the infestation) is placed at the site position', () => {
    const state = scenarioToForm(quick());
    state['sites[0].atKm'] = '0.2';
    const problems = problemsOf(state);
    expect(problems).toEqual([expect.objectContaining({ path: 'sites[0].atKm', value: 0.2 })]);
    expect(formView(state, problems).sites.rows[0].cells[1].errors[0]).toMatch(/inside the current infestation/);
  });

  it('an empty required number reports "is required"', () => {
    const state = scenarioToForm(quick());
    state.horizonYears = '';
    expect(problemsOf(state)).toEqual([{ path: 'horizonYears', value: undefined, message: 'is required' }]);
  });
});

describe('inputs that do not apply are left out', () => {
  it('growth inputs of another growth form', () => {
    const state = scenarioToForm(quick());
    state['pest.growth.alleeThreshold'] = '0.3';
    state['pest.growth.birthRate'] = '2';
    const { input } = formToScenario(state);
    expect((input.pest as { growth: unknown }).growth).toEqual({ form: 'logistic', rate: 1 });
  });

  it('stocking of a clearing row, and an empty barrier', () => {
    const state = scenarioToForm(quick());
    state['transect.segments[1].habitat'] = 'clearing';
    for (const k of Object.keys(state)) if (k.startsWith('barrier.')) delete state[k];
    const { input } = formToScenario(state);
    expect((input.transect as { segments: unknown[] }).segments[1]).toEqual({ habitat: 'clearing', name: 'Orrin stand', lengthKm: 3 });
    expect(input.barrier).toBeUndefined();
  });
});

describe('settings the form does not show', () => {
  it('are carried in a hidden input and merged back', () => {
    const raw = { title: 't', futureSetting: { members: 20 }, pest: { name: 'p', newPestKey: 2, growth: { form: 'logistic', extra: 1 } } };
    expect(extraSettings(raw)).toEqual({ futureSetting: { members: 20 }, pest: { newPestKey: 2, growth: { extra: 1 } } });
    const state = scenarioToForm(raw);
    const { input } = formToScenario(state);
    expect(input.futureSetting).toEqual({ members: 20 });
    expect((input.pest as Record<string, unknown>).newPestKey).toBe(2);
    expect(formView(state).extraKeys).toEqual(['futureSetting', 'pest']);
  });

  it('a damaged hidden input is a problem, not a crash, and cannot reach object prototypes', () => {
    const state = scenarioToForm(quick());
    state._extra = '{"__proto__": {"polluted": true}, "constructor": 1}';
    const { input, problems } = formToScenario(state);
    expect(problems).toEqual([]);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(Object.getPrototypeOf(input)).toBe(Object.prototype);
    state._extra = 'not json';
    expect(formToScenario(state).problems[0].path).toBe('_extra');
  });
});

describe('row buttons', () => {
  const names = (state: FormState) => rowIndices(state, 'transect.segments').map((i) => state[`transect.segments[${i}].name`]);

  it('parse only known actions', () => {
    expect(parseRowAction('add:segments')).toEqual({ kind: 'add', group: 'segments' });
    expect(parseRowAction('remove:sites:3')).toEqual({ kind: 'remove', group: 'sites', index: 3 });
    expect(parseRowAction('remove:sites')).toBeUndefined();
    expect(parseRowAction('drop:tables:1')).toBeUndefined();
    expect(parseRowAction(undefined)).toBeUndefined();
  });

  it('add, move and remove rows, renumbering from 0', () => {
    let state = scenarioToForm(quick());
    state = applyRowAction(state, { kind: 'add', group: 'segments' });
    expect(names(state)).toEqual(['Wendle stand', 'Orrin stand', '']);
    expect(state['transect.segments[2].habitat']).toBe('host-forest');
    expect(state['transect.segments[2].stocking']).toBe('1');
    state['transect.segments[2].name'] = 'New';
    state = applyRowAction(state, { kind: 'up', group: 'segments', index: 2 });
    expect(names(state)).toEqual(['Wendle stand', 'New', 'Orrin stand']);
    state = applyRowAction(state, { kind: 'up', group: 'segments', index: 0 });
    expect(names(state)).toEqual(['Wendle stand', 'New', 'Orrin stand']);
    state = applyRowAction(state, { kind: 'down', group: 'segments', index: 0 });
    expect(names(state)).toEqual(['New', 'Wendle stand', 'Orrin stand']);
    state = applyRowAction(state, { kind: 'remove', group: 'segments', index: 0 });
    expect(names(state)).toEqual(['Wendle stand', 'Orrin stand']);
    expect(parseScenario(formToScenario(state).input)).toEqual(quick());
  });

  it('do not add more options than the schema allows', () => {
    let state = scenarioToForm(quick());
    for (let k = 0; k < 12; k++) state = applyRowAction(state, { kind: 'add', group: 'options' });
    expect(rowIndices(state, 'barrier.options')).toHaveLength(8);
  });
});

describe('form bodies', () => {
  it('keep one string per input and drop names that are not form inputs', () => {
    const state = formStateFromBody({
      title: 'a',
      'pest.growth.rate': ['1', '2'],
      '__proto__.x': '1',
      'constructor.prototype': 'x',
      'bad name!': '1',
      _action: 'save',
      n: 5,
    });
    expect({ ...state }).toEqual({ title: 'a', 'pest.growth.rate': '2', _action: 'save' });
  });
});

describe('form view', () => {
  it('gives every number its unit, allowed and typical range, help, default and source', () => {
    const view = formView(scenarioToForm(quick()));
    const f = view.sections.pest.fields.find((x) => x.name === 'pest.diffusionHost')!;
    expect(f).toMatchObject({ label: 'Movement in host forest', unit: 'km²/yr', allowed: '> 0 and ≤ 1000 km²/yr', defaultText: '0.5 km²/yr' });
    expect(f.typical).toMatch(/0\.001–12 km²\/yr/);
    expect(f.help).toMatch(/diffusion coefficient/i);
    expect(f.help).toMatch(/distance an insect moves in a year/);
    expect(f.source).toMatch(/Fisher 1937/);
    expect(view.segments.columns.map((c) => c.unit)).toEqual(['', '', 'km', 'of full stocking', 'trees/ha']);
  });

  it('draws the strip from the typed layout', () => {
    const view = formView(scenarioToForm(quick()));
    expect(view.strip.segments.map((s) => s.grow)).toEqual([3, 3]);
    expect(view.strip.bands.map((b) => [b.kind, b.left])).toEqual([
      ['infestation', '0.000%'],
      ['option', '33.333%'],
    ]);
    expect(view.strip.pins).toEqual([{ left: '66.667%', label: 'Wendle hut', flip: true }]);
  });
});
