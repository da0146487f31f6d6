/**
 * Colours and patterns of the maps. Every ramp darkens monotonically, so it reads in greyscale, and the
 * arrival ramp is viridis (designed to be perceptually uniform and readable with the common colour-vision
 * deficiencies: van der Walt & Smith, matplotlib colormaps, 2015). Classes that would share a grey are
 * told apart by a pixel pattern: water/built-up by horizontal lines, non-host forest by diagonal hatching.
 */
import { interpolateViridis, interpolateGreens } from 'd3-scale-chromatic';
import { RASTER_CLASSES } from '../../domain/raster.ts';

export type Rgb = [number, number, number];

export function hexToRgb(hex: string): Rgb {
  const m = /^#?([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (m) return [parseInt(m[1], 16), parseInt(m[2], 16), parseInt(m[3], 16)];
  const r = /rgb\((\d+),\s*(\d+),\s*(\d+)\)/.exec(hex);
  if (r) return [Number(r[1]), Number(r[2]), Number(r[3])];
  throw new Error(`not a colour: ${hex}`);
}

export function rgbToHex([r, g, b]: Rgb): string {
  return `#${[r, g, b].map((v) => Math.round(v).toString(16).padStart(2, '0')).join('')}`;
}

/** Relative luminance (sRGB, ITU-R BT.709 weights), 0–1: used by tests to check ramps darken monotonically. */
export function luminance([r, g, b]: Rgb): number {
  const lin = (v: number) => {
    const c = v / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

/** Host cover 0–1: light to dark green (the darkest for fully stocked host forest). */
export function hostColour(cover: number): Rgb {
  const q = Math.round(Math.min(1, Math.max(0, Number.isFinite(cover) ? cover : 0)) * 255);
  return (HOST_RAMP[q] ??= hexToRgb(interpolateGreens(0.2 + (0.8 * q) / 255)));
}
/** The host ramp at 256 levels (cover quantised to 1/255), filled on first use. */
const HOST_RAMP: Rgb[] = [];

export const CLASS_COLOURS = {
  open: hexToRgb('#f6f1dd'),
  nonhost: hexToRgb('#b8b8b8'),
  nonhostHatch: hexToRgb('#6e6e6e'),
  outside: hexToRgb('#dbe9f6'),
  outsideLine: hexToRgb('#6f94b8'),
  unreached: hexToRgb('#f2f2f2'),
} as const;

export const CLASS_INDEX = {
  host: RASTER_CLASSES.indexOf('host'),
  nonhost: RASTER_CLASSES.indexOf('nonhost'),
  open: RASTER_CLASSES.indexOf('open'),
  outside: RASTER_CLASSES.indexOf('outside'),
} as const;

/**
 * Colour of arrival class k of n (k = 0 the earliest): viridis from dark (early) to light (late), so the
 * first years — the most urgent — are the darkest in greyscale too.
 */
export function arrivalColour(k: number, n: number): Rgb {
  const t = n <= 1 ? 0 : k / (n - 1);
  return hexToRgb(interpolateViridis(0.05 + 0.9 * t));
}

/** Pattern pixel tests (x, y in output pixels). */
export const isWaterLine = (_x: number, y: number) => y % 4 === 0;
export const isHatch = (x: number, y: number) => (x + y) % 5 === 0;
