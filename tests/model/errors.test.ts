/** Problem paths and values: dotted paths both ways, values cut for printing, zod issues turned into problems. */
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { boundedValue, describeValue, formatPath, formatProblems, jsonSafeValue, pathFromDotted, problemsFromZod, ScenarioError, valueAt } from '../../server/model/errors.ts';

describe('paths', () => {
  it('formatPath and pathFromDotted are inverse on array/field paths', () => {
    expect(formatPath(['barrier', 'options', 0, 'widthM'])).toBe('barrier.options[0].widthM');
    expect(formatPath([0, 'x'])).toBe('[0].x');
    for (const p of [['a'], ['transect', 'segments', 12, 'stocking'], ['pest', 'growth', 'rate']]) expect(pathFromDotted(formatPath(p))).toEqual(p);
  });
  it('valueAt walks objects and arrays, undefined past a leaf', () => {
    const root = { a: [{ b: 3 }] };
    expect(valueAt(root, ['a', 0, 'b'])).toBe(3);
    expect(valueAt(root, ['a', 0, 'b', 'c'])).toBeUndefined();
    expect(valueAt(root, ['x', 'y'])).toBeUndefined();
  });
});

describe('values in problems', () => {
  it('describeValue: "missing", non-finite numbers, JSON cut at 60 characters', () => {
    expect(describeValue(undefined)).toBe('missing');
    expect(describeValue(Infinity)).toBe('Infinity');
    expect(describeValue('x')).toBe('"x"');
    const long = describeValue('y'.repeat(100));
    expect(long.length).toBe(60);
    expect(long.endsWith('...')).toBe(true);
  });
  it('boundedValue cuts nesting at 12 levels, so a deep value can be printed', () => {
    let deep: unknown = 1;
    for (let k = 0; k < 5000; k++) deep = [deep];
    let cut = boundedValue(deep);
    let depth = 0;
    while (Array.isArray(cut)) {
      cut = cut[0];
      depth++;
    }
    expect(depth).toBe(12);
    expect(cut).toBe('...');
  });
  it('jsonSafeValue writes Infinity and NaN as text at any depth', () => {
    expect(JSON.stringify(jsonSafeValue({ a: [Infinity, 1, NaN], b: -Infinity }))).toBe('{"a":["Infinity",1,"NaN"],"b":"-Infinity"}');
  });
  it('formatProblems: one line per problem, path = value: message', () => {
    expect(formatProblems([{ path: 'pest.diffusionHost', value: -1, message: 'must be > 0' }, { path: '', value: undefined, message: 'bad' }])).toBe('pest.diffusionHost = -1: must be > 0\n(input) = missing: bad');
  });
  it('ScenarioError carries its problems', () => {
    const e = new ScenarioError([{ path: 'x', value: 1, message: 'm' }]);
    expect(e.problems).toEqual([{ path: 'x', value: 1, message: 'm' }]);
    expect(e).toBeInstanceOf(Error);
  });
});

describe('problemsFromZod', () => {
  const schema = z.strictObject({ a: z.number().min(0, { error: 'must be ≥ 0' }), kind: z.enum(['x', 'y']), q: z.union([z.number(), z.strictObject({ dist: z.literal('uniform') })]) });
  const problems = (input: unknown) => {
    const r = schema.safeParse(input);
    return r.success ? [] : problemsFromZod(r.error.issues, input, ['root']);
  };
  it('names path, value and rule; unknown keys and missing fields in plain words', () => {
    const ps = problems({ a: -2, kind: 'z', q: 1, extra: 5 });
    expect(ps).toContainEqual({ path: 'root.a', value: -2, message: 'must be ≥ 0' });
    expect(ps).toContainEqual({ path: 'root.kind', value: 'z', message: 'must be one of "x", "y"' });
    expect(ps).toContainEqual({ path: 'root.extra', value: 5, message: 'is not a known field (check the spelling)' });
    expect(problems({ kind: 'x', q: 1 })).toEqual([{ path: 'root.a', value: undefined, message: 'is required' }]);
  });
  it('a number-or-distribution field of the wrong type gets one line, not one per branch', () => {
    const ps = problems({ a: 1, kind: 'x', q: 'text' });
    expect(ps.length).toBe(1);
    expect(ps[0].path).toBe('root.q');
    expect(ps[0].message).toMatch(/or a distribution/);
  });
});
