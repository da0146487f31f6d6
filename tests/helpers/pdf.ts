/**
 * Reading PDFs in tests: text with positions through pdfjs-dist (legacy build, no DOM), and page rasters
 * through poppler's pdftoppm (greyscale PGM, parsed here). Tests that need pdftoppm skip with a visible
 * message where it is missing.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface TextItem {
  str: string;
  /** Left edge and width [pt]. */
  x: number;
  width: number;
  /** Baseline measured from the top of the page [pt], and the font height [pt]. */
  yTop: number;
  height: number;
}

export interface PdfPage {
  width: number;
  height: number;
  items: TextItem[];
  /** All text of the page, items joined by single spaces. */
  text: string;
}

/** Text content of every page. */
export async function readPdfText(data: Uint8Array): Promise<PdfPage[]> {
  const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
  const task = pdfjs.getDocument({ data: new Uint8Array(data), useSystemFonts: false, disableFontFace: true, isEvalSupported: false, verbosity: 0 });
  const pdf = await task.promise;
  const pages: PdfPage[] = [];
  for (let p = 1; p <= pdf.numPages; p++) {
    const page = await pdf.getPage(p);
    const vp = page.getViewport({ scale: 1 });
    const tc = await page.getTextContent();
    const items: TextItem[] = [];
    for (const it of tc.items) {
      if (!('str' in it)) continue;
      const [a, b, , , e, f] = it.transform as number[];
      const size = Math.hypot(a, b);
      items.push({ str: it.str, x: e, width: it.width, yTop: vp.height - f, height: it.height || size });
    }
    pages.push({ width: vp.width, height: vp.height, items, text: items.map((i) => i.str).join(' ') });
  }
  await pdf.destroy();
  return pages;
}

/** Removes all whitespace (and soft line-break hyphen joins are left alone): for "does this sentence appear" checks across wrapped lines. */
export function squash(s: string): string {
  return s.replace(/\s+/g, '');
}

export function havePdftoppm(): boolean {
  return spawnSync('pdftoppm', ['-v'], { encoding: 'utf8' }).error === undefined;
}

export interface Raster {
  width: number;
  height: number;
  /** Grey levels 0 (black) – 255 (white), row by row. */
  pixels: Uint8Array;
}

/** Parses a binary PGM (P5, maxval 255). */
export function parsePgm(buf: Buffer): Raster {
  const header: string[] = [];
  let pos = 0;
  while (header.length < 4) {
    while (/\s/.test(String.fromCharCode(buf[pos]))) pos++;
    if (buf[pos] === 0x23) {
      while (buf[pos] !== 0x0a) pos++;
      continue;
    }
    let tok = '';
    while (!/\s/.test(String.fromCharCode(buf[pos]))) tok += String.fromCharCode(buf[pos++]);
    header.push(tok);
  }
  pos++;
  if (header[0] !== 'P5' || header[3] !== '255') throw new Error(`not an 8-bit binary PGM: ${header.join(' ')}`);
  const width = Number(header[1]);
  const height = Number(header[2]);
  return { width, height, pixels: buf.subarray(pos, pos + width * height) };
}

/** Renders every page to greyscale rasters at `dpi` with pdftoppm. */
export function rasterise(data: Uint8Array, dpi = 50): Raster[] {
  const dir = mkdtempSync(join(tmpdir(), 'briefing-raster-'));
  try {
    writeFileSync(join(dir, 'in.pdf'), data);
    const r = spawnSync('pdftoppm', ['-r', String(dpi), '-gray', join(dir, 'in.pdf'), join(dir, 'page')], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`pdftoppm failed: ${r.stderr}`);
    return readdirSync(dir)
      .filter((f) => f.endsWith('.pgm'))
      .sort()
      .map((f) => parsePgm(readFileSync(join(dir, f))));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Share of pixels darker than `threshold` in a rectangle given in points (dpi converts). */
export function inkShare(r: Raster, dpi: number, rectPt: { x0: number; y0: number; x1: number; y1: number }, threshold = 250): number {
  const s = dpi / 72;
  const x0 = Math.max(0, Math.floor(rectPt.x0 * s));
  const x1 = Math.min(r.width, Math.ceil(rectPt.x1 * s));
  const y0 = Math.max(0, Math.floor(rectPt.y0 * s));
  const y1 = Math.min(r.height, Math.ceil(rectPt.y1 * s));
  let ink = 0;
  let n = 0;
  for (let y = y0; y < y1; y++) {
    for (let x = x0; x < x1; x++) {
      n++;
      if (r.pixels[y * r.width + x] < threshold) ink++;
    }
  }
  return n ? ink / n : 0;
}
