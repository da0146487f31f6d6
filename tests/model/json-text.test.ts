/**
 * One JSON reader for API bodies, CLI files, uploads and the JSON editor (server/model/json-text.ts).
 * Syntax per RFC 8259 (The JavaScript Object Notation Data Interchange Format), checked against JSON.parse
 * as the independent reference for what is valid.
 */
import { describe, expect, it } from 'vitest';
import { JsonTextError, lineColumn, parseJsonText } from '../../server/model/json-text.ts';

const problems = (text: string) => {
  try {
    parseJsonText(text);
  } catch (e) {
    if (e instanceof JsonTextError) return e.problems;
    throw e;
  }
  return [];
};

describe('parseJsonText', () => {
  it('accepts what JSON.parse accepts, with or without a byte-order mark', () => {
    for (const t of ['{}', '[]', '0', '-1.5e-3', '"a\\u00e9\\n"', '{"a":[1,{"b":null,"c":true,"d":false}]}', ' \n{"x" : 1 }\n']) {
      expect(parseJsonText(t)).toEqual(JSON.parse(t));
      expect(parseJsonText(`\ufeff${t}`)).toEqual(JSON.parse(t));
    }
  });

  it('refuses what JSON.parse refuses, with the line and column', () => {
    const cases: [string, RegExp][] = [
      ['{"a":1,}', /line 1, column 8: expected a field name in double quotes/],
      ['{\n  "a": 1\n  "b": 2\n}', /line 3, column 3: expected "," or "}" after a value/],
      ['{"a": tru}', /line 1, column 7: expected a value/],
      ['[1, 2', /line 1, column 6: the text ends before the JSON is complete/],
      ['', /the text is empty/],
      ['{} x', /there is more text after the end/],
      ['"a\u0007"', /raw control character/],
      ['{"a": "\\x"}', /not a valid escape/],
      ['{"a": NaN}', /expected a value/],
      ["{'a': 1}", /expected a field name in double quotes/],
    ];
    for (const [text, message] of cases) {
      expect(() => JSON.parse(text), text).toThrow();
      expect(problems(text)[0]?.message, text).toMatch(message);
    }
  });

  it('refuses duplicate keys, naming the path and both positions (JSON.parse keeps the last silently)', () => {
    expect(JSON.parse('{"a":1,"a":2}')).toEqual({ a: 2 });
    expect(problems('{"p": {"rate": 1,\n "rate": 2}}')).toEqual([
      { path: 'p.rate', value: 'rate', message: 'appears twice in the same object (line 1, column 8 and line 2, column 2); give each field once' },
    ]);
    expect(problems('[{"a":1},{"a":2}]')).toEqual([]);
  });

  it('refuses __proto__, constructor and prototype keys with their position', () => {
    expect(problems('{"__proto__": {"polluted": 1}}')).toEqual([
      { path: '__proto__', value: '__proto__', message: 'is not allowed as a field name (line 1, column 2): no scenario field has this name' },
    ]);
    expect(problems('{"pest": {"constructor": {"prototype": {}}}}').map((p) => p.path)).toEqual(['pest.constructor', 'pest.constructor.prototype']);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });

  it('refuses numbers that would change on reading, and nesting deeper than 64', () => {
    expect(problems('{"x": 1e-400}')[0]).toMatchObject({ path: 'x', value: '1e-400', message: expect.stringMatching(/too small to be told from 0/) });
    expect(problems('{"x": [1e999]}')[0]).toMatchObject({ path: 'x[0]', value: '1e999', message: expect.stringMatching(/too large/) });
    expect(problems('{"x": 0e-400, "y": 0.0}')).toEqual([]);
    expect(problems(`${'['.repeat(65)}${']'.repeat(65)}`)[0].message).toMatch(/nested more than 64 levels/);
    expect(problems(`${'['.repeat(64)}${']'.repeat(64)}`)).toEqual([]);
  });

  it('counts lines and columns from 1', () => {
    expect(lineColumn('ab\ncd', 4)).toEqual({ line: 2, column: 2 });
  });
});
