/**
 * SVG as plain strings (no DOM): escaping, number printing and a few element helpers shared by every chart.
 * Every piece of text goes through `esc`, so names typed by users cannot inject markup.
 */

/** Escapes text for SVG/XML content and attribute values. */
export function esc(s: string): string {
  return s.replace(/[&<>"']/g, (c) => (c === '&' ? '&amp;' : c === '<' ? '&lt;' : c === '>' ? '&gt;' : c === '"' ? '&quot;' : '&#39;'));
}

/**
 * A coordinate for SVG output, rounded to 0.01 px.
 * @throws RangeError for NaN or ±Infinity: charts filter missing values before drawing, so this is a bug
 */
export function f(x: number): string {
  if (!Number.isFinite(x)) throw new RangeError(`chart coordinate is not a finite number: ${x}`);
  const r = Math.round(x * 100) / 100;
  return Object.is(r, -0) ? '0' : String(r);
}

/** True for a finite number (null, undefined and NaN are missing values in result documents). */
export function isNum(x: number | null | undefined): x is number {
  return typeof x === 'number' && Number.isFinite(x);
}

export type Attrs = Record<string, string | number | undefined | null>;

/** Serialises attributes; numbers through `f`, strings escaped, undefined/null left out. */
export function attrs(a: Attrs): string {
  let out = '';
  for (const [k, v] of Object.entries(a)) {
    if (v === undefined || v === null) continue;
    out += ` ${k}="${typeof v === 'number' ? f(v) : esc(v)}"`;
  }
  return out;
}

export function el(name: string, a: Attrs, children = ''): string {
  return children ? `<${name}${attrs(a)}>${children}</${name}>` : `<${name}${attrs(a)}/>`;
}

export function line(x1: number, y1: number, x2: number, y2: number, a: Attrs = {}): string {
  return el('line', { x1, y1, x2, y2, ...a });
}

export function rect(x: number, y: number, width: number, height: number, a: Attrs = {}): string {
  return el('rect', { x, y, width: Math.max(0, width), height: Math.max(0, height), ...a });
}

export interface TextOptions {
  anchor?: 'start' | 'middle' | 'end';
  size?: number;
  bold?: boolean;
  fill?: string;
  /** Rotation in degrees about (x, y). */
  rotate?: number;
  /** Vertical placement of the text relative to y: baseline (default), middle or top. */
  valign?: 'baseline' | 'middle' | 'top';
  italic?: boolean;
}

/**
 * A text element. Vertical alignment is done with a numeric offset instead of dominant-baseline, which not
 * every SVG reader (nor svg-to-pdfkit) handles the same way.
 */
export function text(x: number, y: number, s: string, o: TextOptions = {}): string {
  const size = o.size ?? 11;
  const dy = o.valign === 'middle' ? 0.35 * size : o.valign === 'top' ? 0.8 * size : 0;
  return el(
    'text',
    {
      x,
      y: y + dy,
      'text-anchor': o.anchor && o.anchor !== 'start' ? o.anchor : undefined,
      'font-size': size,
      'font-weight': o.bold ? 'bold' : undefined,
      'font-style': o.italic ? 'italic' : undefined,
      fill: o.fill,
      transform: o.rotate ? `rotate(${f(o.rotate)} ${f(x)} ${f(y)})` : undefined,
    },
    esc(s),
  );
}

/** Font stack: DejaVu Sans (embedded in the PDF), then fonts of similar width. */
export const FONT_FAMILY = 'DejaVu Sans, Verdana, Arial, sans-serif';

/**
 * Wraps chart content in an <svg> root with a title and description for screen readers.
 * The viewBox lets web pages scale the chart and the PDF embed it at any width.
 */
export function svgRoot(width: number, height: number, title: string, desc: string, body: string, defs = ''): string {
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="${f(width)}" height="${f(height)}" viewBox="0 0 ${f(width)} ${f(height)}"` +
    ` font-family="${esc(FONT_FAMILY)}" font-size="11" role="img">` +
    `<title>${esc(title)}</title><desc>${esc(desc)}</desc>` +
    (defs ? `<defs>${defs}</defs>` : '') +
    `<rect x="0" y="0" width="${f(width)}" height="${f(height)}" fill="#ffffff"/>` +
    body +
    '</svg>'
  );
}
