/** JSON that keeps every double: ±∞, NaN and −0 survive a round trip that plain JSON loses (encoding written out). */
import { describe, expect, it } from 'vitest';
import { fromJsonSafe, parseSafe, stringifySafe, toJsonSafe } from '../../server/jobs/json-safe.ts';

describe('json-safe', () => {
  it('the markers, written out', () => {
    expect(stringifySafe([1, -0, Infinity, -Infinity, NaN])).toBe('[1,{"$float":"-0"},{"$float":"Infinity"},{"$float":"-Infinity"},{"$float":"NaN"}]');
    expect(JSON.stringify([Infinity, -0])).toBe('[null,0]'); // what plain JSON would have stored
  });
  it('round trip keeps every value bit for bit, at any depth, and drops undefined like JSON', () => {
    const value = { a: [1.5, -0, { b: Infinity }], c: { d: NaN, e: 'text', f: null, g: true }, h: -Infinity, u: undefined };
    const back = parseSafe<typeof value>(stringifySafe(value));
    expect(Object.is(back.a[1], -0)).toBe(true);
    expect((back.a[2] as { b: number }).b).toBe(Infinity);
    expect(back.c.d).toBeNaN();
    expect(back.h).toBe(-Infinity);
    expect(back.c).toMatchObject({ e: 'text', f: null, g: true });
    expect('u' in back).toBe(false);
    expect(Object.is(fromJsonSafe(toJsonSafe(-0)), -0)).toBe(true);
  });
  it('an object that only looks like a marker with an unknown tag is refused', () => {
    expect(() => fromJsonSafe({ $float: 'Huge' })).toThrow(/bad \$float marker/);
    expect(fromJsonSafe({ $float: 'NaN', other: 1 })).toEqual({ $float: 'NaN', other: 1 }); // two keys: plain data
  });
});
