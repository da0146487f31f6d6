/**
 * A small flowing layout on top of pdfkit: a cursor that moves down the page, headings kept with what
 * follows, paragraphs, bullet lists, tables with measured rows (header repeated on each page) and charts.
 * Everything is placed inside the content box; anything that would cross its bottom starts a new page.
 */
import type { Chart } from '../charts/frame.ts';
import { drawChart } from './chart.ts';
import { FONT } from './fonts.ts';

export interface PageBox {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  /** Lowest y content may reach (the footer lives below). */
  bottom: number;
}

export type FontName = (typeof FONT)[keyof typeof FONT];

export interface TextStyle {
  font?: FontName;
  size?: number;
  color?: string;
  /** Space after the block [pt]. */
  after?: number;
  indent?: number;
  align?: 'left' | 'right' | 'center' | 'justify';
}

export interface Column {
  header: string;
  /** Width [pt]. */
  width: number;
  align?: 'left' | 'right';
  font?: FontName;
}

/** Cell padding [pt]. */
const PAD = 3;
/** Tallest a table row may grow before its text is cut with an ellipsis [pt]. */
const MAX_ROW = 220;

export class Flow {
  readonly doc: PDFKit.PDFDocument;
  readonly box: PageBox;
  /** Section titles by page (1-based page numbers), for tests and the table of contents. */
  readonly sections: { title: string; page: number }[] = [];

  constructor(doc: PDFKit.PDFDocument, box: PageBox) {
    this.doc = doc;
    this.box = box;
    doc.y = box.top;
  }

  get width(): number {
    return this.box.right - this.box.left;
  }

  get y(): number {
    return this.doc.y;
  }

  /** Current page number (1-based). */
  get page(): number {
    const r = this.doc.bufferedPageRange();
    return r.start + r.count;
  }

  newPage(): void {
    this.doc.addPage();
    this.doc.x = this.box.left;
    this.doc.y = this.box.top;
  }

  /** Starts a new page unless `h` points fit below the cursor. */
  ensure(h: number): void {
    if (this.doc.y + h > this.box.bottom && this.doc.y > this.box.top + 0.5) this.newPage();
  }

  space(h: number): void {
    if (this.doc.y + h > this.box.bottom) this.newPage();
    else this.doc.y += h;
  }

  private setStyle(s: TextStyle): void {
    this.doc.font(s.font ?? FONT.regular).fontSize(s.size ?? 9.5).fillColor(s.color ?? '#000000');
  }

  /** Height of `text` in a style at a width [pt]. */
  measure(text: string, s: TextStyle = {}, width = this.width - (s.indent ?? 0)): number {
    this.setStyle(s);
    return this.doc.heightOfString(text, { width, lineGap: 1 });
  }

  /** A paragraph; long paragraphs continue on the next page line by line. */
  text(text: string, s: TextStyle = {}): void {
    const indent = s.indent ?? 0;
    this.setStyle(s);
    // Keep short paragraphs whole; let long ones break across pages.
    const h = this.measure(text, s);
    if (h < 0.4 * (this.box.bottom - this.box.top)) this.ensure(h);
    this.doc.text(text, this.box.left + indent, this.doc.y, { width: this.width - indent, lineGap: 1, align: s.align ?? 'left' });
    this.doc.x = this.box.left;
    this.doc.y += s.after ?? 4;
  }

  /**
   * A heading kept with at least `keep` points of what follows. Level 1 headings are recorded as sections.
   */
  heading(text: string, level: 1 | 2 | 3 = 1, keep = 90): void {
    const size = level === 1 ? 14 : level === 2 ? 11 : 9.5;
    const before = level === 1 ? 10 : 6;
    const h = this.measure(text, { font: FONT.bold, size });
    if (this.doc.y > this.box.top + 0.5) this.space(before);
    this.ensure(h + keep);
    if (level === 1) this.sections.push({ title: text, page: this.page });
    this.text(text, { font: FONT.bold, size, after: level === 1 ? 6 : 3 });
  }

  /** A bullet list (each item a paragraph with a hanging indent). */
  bullets(items: string[], s: TextStyle = {}): void {
    const size = s.size ?? 9.5;
    for (const item of items) {
      const h = this.measure(item, { ...s, size }, this.width - 12);
      this.ensure(Math.min(h, 3 * size));
      const y = this.doc.y;
      this.setStyle({ ...s, size });
      this.doc.text('•', this.box.left + 2, y, { width: 10, lineBreak: false });
      this.doc.text(item, this.box.left + 12, y, { width: this.width - 12, lineGap: 1 });
      this.doc.x = this.box.left;
      this.doc.y += s.after ?? 3;
    }
  }

  /**
   * A table: header row in bold on a grey band (repeated after each page break), rows measured so that no
   * cell text leaves its cell; rows taller than MAX_ROW are cut with an ellipsis.
   */
  table(columns: Column[], rows: string[][], opts: { size?: number; group?: (row: number) => string | null } = {}): void {
    const size = opts.size ?? 8;
    const total = columns.reduce((a, c) => a + c.width, 0);
    const scale = total > this.width ? this.width / total : 1;
    const cols = columns.map((c) => ({ ...c, width: c.width * scale }));
    const rowHeight = (cells: string[], font: FontName) =>
      Math.min(MAX_ROW, Math.max(...cells.map((t, i) => this.measure(t || ' ', { font: cols[i].font ?? font, size }, cols[i].width - 2 * PAD))) + 2 * PAD);
    const headerH = rowHeight(cols.map((c) => c.header), FONT.bold);
    const drawRow = (cells: string[], font: FontName, h: number, shade: string | null) => {
      const y = this.doc.y;
      let x = this.box.left;
      if (shade) this.doc.rect(this.box.left, y, this.width, h).fill(shade);
      cells.forEach((t, i) => {
        this.setStyle({ font: cols[i].font ?? font, size });
        this.doc.text(t, x + PAD, y + PAD, { width: cols[i].width - 2 * PAD, height: h - 2 * PAD + 0.5, ellipsis: true, lineGap: 1, align: cols[i].align ?? 'left' });
        x += cols[i].width;
      });
      this.doc.moveTo(this.box.left, y + h).lineTo(this.box.left + this.width, y + h).lineWidth(0.4).strokeColor('#999999').stroke();
      this.doc.x = this.box.left;
      this.doc.y = y + h;
    };
    const header = () => drawRow(cols.map((c) => c.header), FONT.bold, headerH, '#e6e6e6');
    this.ensure(headerH + (rows.length ? rowHeight(rows[0], FONT.regular) : 0));
    header();
    let lastGroup: string | null = null;
    rows.forEach((r, k) => {
      const g = opts.group?.(k) ?? null;
      const groupH = g && g !== lastGroup ? this.measure(g, { font: FONT.bold, size }) + 2 * PAD : 0;
      const h = rowHeight(r, FONT.regular);
      if (this.doc.y + groupH + h > this.box.bottom) {
        this.newPage();
        header();
      }
      if (groupH && g) {
        const y = this.doc.y;
        this.setStyle({ font: FONT.bold, size });
        this.doc.text(g, this.box.left + PAD, y + PAD, { width: this.width - 2 * PAD, lineGap: 1 });
        this.doc.x = this.box.left;
        this.doc.y = y + groupH;
        lastGroup = g;
      }
      drawRow(r, FONT.regular, h, k % 2 === 1 ? '#f5f5f5' : null);
    });
    this.doc.y += 6;
  }

  /** A chart with its title above and its reading hint below, scaled to the content width (or `width`). */
  chart(chart: Chart, opts: { width?: number; caption?: string } = {}): void {
    const w = Math.min(opts.width ?? this.width, this.width);
    let h = (w * chart.height) / chart.width;
    const titleH = this.measure(chart.title, { font: FONT.bold, size: 9.5 });
    const hint = opts.caption ?? chart.hint;
    const hintH = this.measure(hint, { font: FONT.italic, size: 8 });
    const avail = this.box.bottom - this.box.top - titleH - hintH - 12;
    // A chart taller than a page is scaled down to fit (never happens at the sizes used, but never overflows).
    const scale = h > avail ? avail / h : 1;
    h *= scale;
    this.ensure(titleH + h + hintH + 10);
    this.text(chart.title, { font: FONT.bold, size: 9.5, after: 2 });
    const y = this.doc.y;
    try {
      drawChart(this.doc, chart, this.box.left, y, w * scale);
    } catch (e) {
      this.doc.x = this.box.left;
      this.doc.y = y + h + 2;
      this.text(`(This chart may be incomplete: ${(e as Error).message})`, { font: FONT.italic, size: 8 });
      return;
    }
    this.doc.x = this.box.left;
    this.doc.y = y + h + 2;
    this.text(hint, { font: FONT.italic, size: 8, color: '#333333', after: 10 });
  }
}
