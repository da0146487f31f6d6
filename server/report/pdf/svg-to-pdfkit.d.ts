/// <reference types="pdfkit" />
/** Minimal typing for svg-to-pdfkit 0.1.8 (the package ships none). */
declare module 'svg-to-pdfkit' {
  interface SvgToPdfOptions {
    width?: number;
    height?: number;
    preserveAspectRatio?: string;
    /** Treat SVG user units as points instead of CSS px (72/96). */
    assumePt?: boolean;
    useCSS?: boolean;
    precision?: number;
    fontCallback?: (family: string, bold: boolean, italic: boolean, options: { fauxBold: boolean; fauxItalic: boolean }) => string;
    warningCallback?: (message: string) => void;
    imageCallback?: (link: string) => string;
    colorCallback?: (color: [[number, number, number], number]) => [[number, number, number], number];
    documentCallback?: (file: string) => unknown;
  }
  function SVGtoPDF(doc: PDFKit.PDFDocument, svg: string, x?: number, y?: number, options?: SvgToPdfOptions): void;
  export default SVGtoPDF;
}
