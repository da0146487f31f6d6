/**
 * Scenario validation: a corpus of bad scenario files (tests/model/bad-scenarios/), each with the field
 * path, value and allowed range its error must name. One zod schema serves files, form, API and CLI, so
 * this corpus covers them all. Ranges come from server/model/fields.ts (units as printed there).
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { parseScenario, parseScenarioText, pointScenario } from '../../server/model/scenario.ts';
import { InputError, LimitError, ScenarioError, type Problem } from '../../server/model/errors.ts';
import { buildLayout } from '../../server/problem/layout.ts';
import { discretise } from '../../server/problem/discretise.ts';

const dir = new URL('./bad-scenarios/', import.meta.url);

interface Expected {
  /** The field path the first problem must name ('' = the whole file). */
  path: string;
  /** The value it must report (undefined: missing). */
  value?: unknown;
  /** What the message must say (the allowed range or rule). */
  message: RegExp;
  /** Raised when the run is set up, not by the schema. */
  limit?: boolean;
}

const MISSING = Symbol('missing');

const corpus: Record<string, Expected & { valueIs?: typeof MISSING }> = {
  'missing-pest-diffusion.json': { path: 'pest.diffusionHost', valueIs: MISSING, message: /is required/ },
  'missing-transect.json': { path: 'transect', valueIs: MISSING, message: /is required/ },
  'missing-title.json': { path: 'title', valueIs: MISSING, message: /is required/ },
  'negative-diffusion.json': { path: 'pest.diffusionOpen', value: -0.5, message: /must be > 0 and ≤ 1000 km²\/yr/ },
  'edge-preference-above-one.json': { path: 'pest.edgePreferenceOpen', value: 1.2, message: /must be ≥ 0.000001 and ≤ 0.999999/ },
  'edge-preference-zero.json': { path: 'pest.edgePreferenceOpen', value: 0, message: /must be ≥ 0.000001 and ≤ 0.999999/ },
  'overlapping-segments.json': { path: 'transect.segments[1].fromKm', value: 8, message: /overlaps the previous segment.*must start at 10 km/ },
  'gap-between-segments.json': { path: 'transect.segments[1].fromKm', value: 12, message: /leaves a gap.*must start at 10 km/ },
  'zero-length-segment.json': { path: 'transect.segments[1].lengthKm', value: 0, message: /must be ≥ 0.001 and ≤ 5000 km/ },
  'horizon-too-long.json': { path: 'horizonYears', value: 10000, message: /must be > 0 and ≤ 500 yr/ },
  'unknown-field.json': { path: 'pest.diffusionForest', value: 0.5, message: /not a known field/ },
  'unknown-top-level-field.json': { path: 'horizon', value: 30, message: /not a known field/ },
  'not-json.json': { path: '', value: "{ title: 'Ossenvale', …", message: /not valid JSON at line 1, column 3: expected a field name in double quotes/ },
  'empty-file.json': { path: '', value: '(empty file)', message: /not valid JSON/ },
  'nan-like-value.json': { path: '', message: /not valid JSON/ },
  'top-level-array.json': { path: '', value: [1, 2, 3], message: /expected object/ },
  'site-inside-infestation.json': { path: 'sites[0].atKm', value: 1, message: /inside the current infestation \[0, 2\] km/ },
  'infestation-outside-transect.json': { path: 'infestation.toKm', value: 50, message: /within the transect \[0, 20\] km/ },
  'infestation-reversed.json': { path: 'infestation.toKm', value: 2, message: /greater than infestation.fromKm \(5\)/ },
  'unknown-habitat.json': { path: 'transect.segments[1].habitat', value: 'meadow', message: /one of "host-forest", "clearing", "non-host-forest"/ },
  'stocking-above-one.json': { path: 'transect.segments[0].stocking', value: 1.5, message: /must be ≥ 0 and ≤ 1/ },
  'mate-scale-missing.json': { path: 'pest.growth.mateScale', valueIs: MISSING, message: /required when mating is 'saturating'/ },
  'unknown-growth-form.json': { path: 'pest.growth.form', value: 'gompertz', message: /one of "logistic", "allee-cubic", "mate-finding"/ },
  'wrong-type.json': { path: 'pest.diffusionHost', value: 'fast', message: /must be > 0 and ≤ 1000 km²\/yr \(a number\), or a distribution/ },
  'distribution-min-above-max.json': { path: 'pest.diffusionHost.max', value: 1, message: /greater than min \(2\)/ },
  'lognormal-on-bounded-field.json': { path: 'pest.edgePreferenceOpen.dist', value: 'lognormal', message: /not allowed for a field with range ≥ 0.000001 and ≤ 0.999999/ },
  'detection-level-one.json': { path: 'detectionLevel', value: 1, message: /must be > 0 and < 1/ },
  'non-host-fields-missing.json': { path: 'pest.diffusionNonHost', valueIs: MISSING, message: /required because .* non-host forest \(> 0 and ≤ 1000 km²\/yr\)/ },
  'barrier-overlaps-infestation.json': { path: 'barrier.options[0].fromKm', value: 1, message: /overlaps the current infestation/ },
  'barrier-outside-transect.json': { path: 'barrier.options[0].fromKm', value: 19.9, message: /must lie within the transect \[0, 20\] km/ },
  'duplicate-site-names.json': { path: 'sites[1].name', value: 'Wendle school', message: /names must be unique/ },
  'negative-mortality.json': { path: 'pest.mortalityOpen', value: -1, message: /must be ≥ 0 and ≤ 1000 1\/yr/ },
  'no-segments.json': { path: 'transect.segments', value: [], message: /at least one segment/ },
  'no-host-in-infestation.json': { path: 'infestation', value: { fromKm: 0.5, toKm: 2.5 }, message: /overlap at least one host-forest segment/ },
  'wrong-version.json': { path: 'version', value: 2, message: /one of 1/ },
  'cell-size-too-small.json': { path: 'numerics.cellM', value: 0.1, message: /must be ≥ 0.5 and ≤ 5000 m/ },
  'negative-barrier-width.json': { path: 'barrier.options[0].widthM', value: -300, message: /must be ≥ 1 and ≤ 100000 m/ },
  'too-many-cells.json': { path: 'numerics.cellM', value: 1, message: /limit is 200000.*at least 26 m/, limit: true },
  'too-many-time-steps.json': { path: 'numerics.stepYears', value: 1e-5, message: /50000000 time steps; the limit is 2000000/, limit: true },
};

/** Validates a file the way every front end does; for limit cases also sets up the run. */
function problemsOf(file: string): { error: InputError; problems: Problem[] } {
  const text = readFileSync(new URL(file, dir), 'utf8');
  try {
    const s = pointScenario(parseScenarioText(text));
    discretise(s, buildLayout(s));
  } catch (e) {
    if (e instanceof InputError) return { error: e, problems: e.problems };
    throw e;
  }
  throw new Error(`${file} was accepted`);
}

describe('scenario validation: bad files name the field, the value and the allowed range (common practice, no source)', () => {
  it('every file in the corpus has an expected error, and the corpus covers the required kinds', () => {
    const files = readdirSync(dir).filter((f) => f.endsWith('.json')).sort();
    expect(files).toEqual(Object.keys(corpus).sort());
    expect(files.length).toBeGreaterThanOrEqual(30);
  });

  for (const [file, exp] of Object.entries(corpus)) {
    it(`${file} → ${exp.path || '(whole file)'}`, () => {
      const { error, problems } = problemsOf(file);
      expect(error).toBeInstanceOf(exp.limit ? LimitError : ScenarioError);
      const first = problems.find((p) => p.path === exp.path);
      expect(first, `problems: ${JSON.stringify(problems)}`).toBeDefined();
      expect(first!.message).toMatch(exp.message);
      if (exp.valueIs === MISSING) expect(first!.value).toBeUndefined();
      else if ('value' in exp) expect(first!.value).toEqual(exp.value);
      // The message the user sees (CLI, web) carries path, value and rule on one line.
      expect(error.message).toContain(exp.path || '(input)');
    });
  }

  /** The error thrown when parsing the CLI fixture with one textual replacement applied. */
  const fixtureError = (edit: (text: string) => string): ScenarioError => {
    const text = edit(readFileSync(new URL('../fixtures/quick-scenario.json', import.meta.url), 'utf8'));
    try {
      parseScenarioText(text);
    } catch (e) {
      if (e instanceof ScenarioError) return e;
      throw e;
    }
    throw new Error('the edited fixture parsed without an error');
  };

  it('a deeply nested value is refused by the JSON reader, and by path in an object, without overflowing the stack (regression: 5000 nested arrays gave a 500)', () => {
    const deep = `${'['.repeat(5000)}1${']'.repeat(5000)}`;
    const error = fixtureError((text) => text.replace(/^\{/, `{"extra": ${deep},`));
    expect(error.problems).toEqual([expect.objectContaining({ path: '', message: expect.stringMatching(/^is not valid JSON at line 1, column \d+: the text is nested more than 64 levels deep/) })]);
    // An object built in code goes straight to the schema: still reported by path, the value kept to a readable depth.
    const raw = JSON.parse(readFileSync(new URL('../fixtures/quick-scenario.json', import.meta.url), 'utf8').replace(/^\{/, `{"extra": ${deep},`));
    let problems: Problem[] = [];
    try {
      parseScenario(raw);
    } catch (e) {
      problems = (e as ScenarioError).problems;
    }
    expect(problems.map((p) => p.path)).toEqual(['extra']);
    expect(problems[0].message).toBe('is not a known field (check the spelling)');
    expect(() => JSON.stringify(problems)).not.toThrow();
  });

  it('a number too large for a double is refused by name and position, never read as Infinity or null (regression)', () => {
    const error = fixtureError((text) => text.replace(/"horizonYears": [0-9.]+/, '"horizonYears": 1e309'));
    expect(error.problems).toEqual([expect.objectContaining({ path: 'horizonYears', value: '1e309', message: expect.stringMatching(/^is too large to be a number \(line \d+, column \d+\)/) })]);
    // In an object (a number computed in code) the schema still names Infinity.
    const raw = JSON.parse(readFileSync(new URL('../fixtures/quick-scenario.json', import.meta.url), 'utf8'));
    raw.horizonYears = Infinity;
    expect(() => parseScenario(raw)).toThrow('horizonYears = Infinity: must be > 0 and ≤ 500 yr');
  });

  it('the small valid fixture used by the CLI tests passes', () => {
    const s = parseScenarioText(readFileSync(new URL('../fixtures/quick-scenario.json', import.meta.url), 'utf8'));
    expect(s.pest.illustrative).toBe(true);
    expect(s.description).toMatch(/Purpose:/);
  });
});
