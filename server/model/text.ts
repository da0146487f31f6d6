/**
 * Free-text fields (titles, names, descriptions) as the schema accepts them: printable text only. Control
 * characters (NUL, BEL, ESC …, DEL and the C1 range) and direction-override marks are refused with the
 * character and where it is, so a title can never drive a terminal or reorder the text around it; a
 * required name must have more than spaces. Tab and line breaks are allowed in multi-line fields.
 */
import { z } from 'zod';

/** Characters refused in one-line fields: C0 controls, DEL, C1 controls, bidi embedding/override/isolate marks. */
const CONTROL_ONE_LINE = /[\u0000-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/u;
/** The same, but tab, line feed and carriage return allowed. */
const CONTROL_MULTI_LINE = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/u;

/** Names a refused character for the problem message. */
function describeChar(c: string): string {
  const code = c.codePointAt(0)!;
  const hex = `U+${code.toString(16).toUpperCase().padStart(4, '0')}`;
  return code >= 0x202a ? `${hex}, a text-direction mark` : `${hex}, a control character`;
}

/** Where the first refused character is, or undefined. */
export function firstControlCharacter(s: string, multiline = false): { at: number; char: string } | undefined {
  const m = (multiline ? CONTROL_MULTI_LINE : CONTROL_ONE_LINE).exec(s);
  return m ? { at: m.index, char: m[0] } : undefined;
}

/**
 * A free-text field of at most `max` characters.
 * @param opts.required - must have a character other than spaces
 * @param opts.multiline - tab and line breaks allowed (descriptions, notes)
 */
export function textField(max: number, opts: { required?: boolean; multiline?: boolean } = {}) {
  let s = z.string();
  if (opts.required) s = s.min(1, { error: 'must not be empty' });
  return s.max(max, { error: `must be at most ${max} characters` }).superRefine((v, ctx) => {
    if (opts.required && v.trim() === '') ctx.addIssue({ code: 'custom', input: v, message: 'must not be only spaces; type a name' });
    const bad = firstControlCharacter(v, opts.multiline);
    if (bad) {
      ctx.addIssue({
        code: 'custom',
        input: v,
        message: `must be plain text: character ${bad.at + 1} is ${describeChar(bad.char)}, which is not allowed${opts.multiline ? '' : ' (nor are line breaks)'}`,
      });
    }
  });
}
