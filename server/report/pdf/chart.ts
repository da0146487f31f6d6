/** Draws a chart's SVG into a pdfkit document as vector graphics (paths and real text). */
import SVGtoPDF from 'svg-to-pdfkit';
import type { Chart } from '../charts/frame.ts';
import { svgFontCallback } from './fonts.ts';

/**
 * Draws `chart` with its top-left corner at (x, y), scaled to `width` points; returns the height used [pt].
 * SVG text is drawn with the embedded DejaVu fonts (fontCallback), so it is selectable in the PDF.
 * @throws Error when the SVG cannot be parsed (svg-to-pdfkit warnings are turned into errors)
 */
export function drawChart(doc: PDFKit.PDFDocument, chart: Pick<Chart, 'svg' | 'width' | 'height'>, x: number, y: number, width: number): number {
  const height = (width * chart.height) / chart.width;
  const warnings: string[] = [];
  SVGtoPDF(doc, chart.svg, x, y, {
    width,
    height,
    assumePt: true,
    preserveAspectRatio: 'xMinYMin meet',
    fontCallback: svgFontCallback,
    warningCallback: (m) => warnings.push(m),
  });
  if (warnings.length) throw new Error(`chart could not be drawn: ${warnings.join('; ')}`);
  return height;
}
