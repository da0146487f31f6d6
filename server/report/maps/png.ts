import { encode } from 'fast-png';

/**
 * A PNG data URI from RGBA pixels (fast-png). Used for map rasters that would be too large as vector cells;
 * the SVG places it with <image> under vector overlays, and svg-to-pdfkit embeds it in the briefing.
 */
export function pngDataUri(width: number, height: number, rgba: Uint8Array): string {
  const png = encode({ width, height, data: rgba, channels: 4, depth: 8 });
  return `data:image/png;base64,${Buffer.from(png).toString('base64')}`;
}
