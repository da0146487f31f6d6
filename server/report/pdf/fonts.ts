/**
 * Fonts for the briefing: DejaVu Sans (from the dejavu-fonts-ttf package) embedded for every piece of text,
 * so km², ±, –, ≥, λ and Δ print correctly and the text stays selectable. pdfkit's built-in Helvetica
 * cannot encode these.
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { readFileSync } from 'node:fs';

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
