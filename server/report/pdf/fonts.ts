/**
 * Fonts for the briefing: DejaVu Sans (from the dejavu-fonts-ttf package) embedded for every piece of text,
 * so km², ±, –, ≥, λ and Δ print correctly and the text stays selectable. pdfkit's built-in Helvetica
 * cannot encode these.
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { readFileSync } from 'node:fs';
import PDFDocument from 'pdfkit';

const require = createRequire(import.meta.url);
const FONT_DIR = join(dirname(require.resolve('dejavu-fonts-ttf/package.json')), 'ttf');

/** Names under which the fonts are registered in each PDF document. */
export const FONT = { regular: 'DejaVu', bold: 'DejaVu-Bold', italic: 'DejaVu-Oblique', mono: 'DejaVu-Mono' } as const;

const FILES: Record<keyof typeof FONT, string> = {
  regular: 'DejaVuSans.ttf',
  bold: 'DejaVuSans-Bold.ttf',
  italic: 'DejaVuSans-Oblique.ttf',
  mono: 'DejaVuSansMono.ttf',
};

let cache: Record<keyof typeof FONT, Buffer> | null = null;

/** The font files, read once per process. */
function fontData(): Record<keyof typeof FONT, Buffer> {
  if (!cache) {
    cache = Object.fromEntries(Object.entries(FILES).map(([k, f]) => [k, readFileSync(join(FONT_DIR, f))])) as Record<keyof typeof FONT, Buffer>;
  }
  return cache;
}

/** Registers the DejaVu fonts with a pdfkit document and selects the regular face. */
export function registerFonts(doc: PDFKit.PDFDocument): void {
  const data = fontData();
  for (const k of Object.keys(FONT) as (keyof typeof FONT)[]) doc.registerFont(FONT[k], data[k]);
  doc.font(FONT.regular);
}

/** fontCallback for svg-to-pdfkit: every SVG font family maps to the embedded DejaVu faces. */
export function svgFontCallback(_family: string, bold: boolean, italic: boolean): string {
  return bold ? FONT.bold : italic ? FONT.italic : FONT.regular;
}

// ---------------------------------------------------------------------------------------------
// What the briefing can draw

/** Right-to-left scripts (Hebrew, Arabic, Syriac, Thaana, N'Ko, and their presentation forms): drawn without bidi layout they read backwards. */
const RIGHT_TO_LEFT = /[\u0590-\u08ff\ufb1d-\ufdff\ufe70-\ufeff]|[\u{10800}-\u{10fff}\u{1e800}-\u{1efff}]/u;

/** What the briefing supports, in words, for every refusal. */
export const BRIEFING_TEXT_SUPPORT =
  'the PDF briefing draws left-to-right text in the Latin, Greek and Cyrillic alphabets and common symbols (DejaVu Sans); ' +
  'it cannot draw Chinese, Japanese or Korean characters, emoji, or right-to-left scripts such as Hebrew and Arabic. ' +
  'The web pages show such text; for the briefing, write the name in a supported alphabet';

let drawable: Set<number> | null = null;

/** Code points every briefing face (regular, bold, italic) has a glyph for; read once per process. */
function drawableCodePoints(): Set<number> {
  if (!drawable) {
    const doc = new PDFDocument({ autoFirstPage: false });
    registerFonts(doc);
    const sets = (['regular', 'bold', 'italic'] as const).map((k) => {
      doc.font(FONT[k]);
      return new Set<number>((doc as unknown as { _font: { font: { characterSet: number[] } } })._font.font.characterSet);
    });
    drawable = new Set([...sets[0]].filter((c) => sets[1].has(c) && sets[2].has(c)));
  }
  return drawable;
}

/** Why the briefing cannot draw this text (the first character it cannot draw), or undefined when it can. */
export function undrawableText(text: string): string | undefined {
  const rtl = RIGHT_TO_LEFT.exec(text);
  if (rtl) return `has right-to-left text ("${rtl[0]}", U+${rtl[0].codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')})`;
  const set = drawableCodePoints();
  for (const ch of text) {
    const cp = ch.codePointAt(0)!;
    // Line breaks and tabs are laid out, not drawn.
    if (cp === 10 || cp === 13 || cp === 9) continue;
    if (!set.has(cp)) return `has "${ch}" (U+${cp.toString(16).toUpperCase().padStart(4, '0')}), which the briefing's font cannot draw`;
  }
  return undefined;
}

/**
 * Every text of a scenario the briefing would print that it cannot draw, by field path (title, names,
 * descriptions, notes). Checked before a briefing is made, so it is refused with the field named instead
 * of printing empty boxes or reversed, overlapping words.
 */
export function briefingTextProblems(scenario: unknown): { path: string; value: string; message: string }[] {
  const out: { path: string; value: string; message: string }[] = [];
  const stack: [unknown, string][] = [[scenario, '']];
  while (stack.length) {
    const [v, path] = stack.pop()!;
    if (typeof v === 'string') {
      const why = undrawableText(v);
      if (why) out.push({ path, value: v.length > 60 ? `${v.slice(0, 57)}...` : v, message: `${why}: ${BRIEFING_TEXT_SUPPORT}` });
    } else if (Array.isArray(v)) v.forEach((x, i) => stack.push([x, `${path}[${i}]`]));
    else if (v !== null && typeof v === 'object') for (const [k, x] of Object.entries(v)) stack.push([x, path ? `${path}.${k}` : k]);
  }
  return out.reverse();
}
