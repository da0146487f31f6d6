/** Plain-text fields: which characters are refused (Unicode C0/C1 controls, DEL, bidi marks), where, and why. */
import { describe, expect, it } from 'vitest';
import { firstControlCharacter, textField } from '../../server/model/text.ts';

describe('firstControlCharacter', () => {
  it('finds C0, DEL, C1 and direction marks; tab and line breaks only in multi-line text', () => {
    expect(firstControlCharacter('plain title')).toBeUndefined();
    expect(firstControlCharacter('bell\u0007x')).toEqual({ at: 4, char: '\u0007' });
    expect(firstControlCharacter('a\u007f')).toEqual({ at: 1, char: '\u007f' });
    expect(firstControlCharacter('c1\u0085')).toEqual({ at: 2, char: '\u0085' }); // NEL, a C1 control
    expect(firstControlCharacter('x\u202ey')).toEqual({ at: 1, char: '\u202e' }); // right-to-left override
    expect(firstControlCharacter('x\u2067y')).toEqual({ at: 1, char: '\u2067' }); // right-to-left isolate
    expect(firstControlCharacter('line\nbreak')).toEqual({ at: 4, char: '\n' });
    expect(firstControlCharacter('line\nbreak\ttab\r\n', true)).toBeUndefined();
    expect(firstControlCharacter('esc\u001b[31m', true)).toEqual({ at: 3, char: '\u001b' });
    expect(firstControlCharacter('Ossenvale — Ünïcødé ✓')).toBeUndefined(); // ordinary non-ASCII text is fine
  });
});

describe('textField', () => {
  const messages = (schema: ReturnType<typeof textField>, v: unknown) => {
    const r = schema.safeParse(v);
    return r.success ? [] : r.error.issues.map((i) => i.message);
  };
  it('length limit, required, and only-spaces', () => {
    expect(messages(textField(5), 'abcdef')).toEqual(['must be at most 5 characters']);
    expect(messages(textField(5, { required: true }), '')).toContain('must not be empty');
    expect(messages(textField(5, { required: true }), '   ')).toEqual(['must not be only spaces; type a name']);
    expect(messages(textField(5), '')).toEqual([]);
  });
  it('names the refused character and its position (1-based)', () => {
    expect(messages(textField(50), 'ab\u0000')).toEqual(['must be plain text: character 3 is U+0000, a control character, which is not allowed (nor are line breaks)']);
    expect(messages(textField(50, { multiline: true }), 'a\u202db')).toEqual(['must be plain text: character 2 is U+202D, a text-direction mark, which is not allowed']);
  });
});
