/**
 * Maps of a landscape evaluation as plain SVG strings, shared by the web pages (inline) and the PDF
 * briefing (svg-to-pdfkit): host cover with bands, infestation and sites; arrival time for the baseline and
 * for each option with front lines every few years. Every map has a title, a legend, a scale bar, a north
 * arrow (grid north) and map coordinates in the map's CRS.
 *
 * Small grids are drawn as vector cells; larger ones as a PNG raster (one block of pixels per cell) under
 * vector overlays (bands, infestation, sites, front lines), which keeps the files small.
 */
import { scaleLinear } from 'd3-scale';
import { el, esc, f, line, rect, svgRoot, text } from '../charts/svg.ts';
import { fitText, textWidth } from '../charts/text-metrics.ts';
import { optionKey, optionStyle } from '../charts/styles.ts';
import type { Chart } from '../charts/frame.ts';
import type { Polygon, Xy } from '../../domain/gis/geometry.ts';
import type { GridSpec } from '../../domain/gis/rasterise.ts';
import { arrivalContours, contourYears, fillAcross } from '../../domain/gis/contours.ts';
import { pngDataUri } from './png.ts';
import { CLASS_COLOURS, CLASS_INDEX, arrivalColour, hostColour, isHatch, isWaterLine, rgbToHex, type Rgb } from './ramps.ts';

/** What every map of one landscape shares: the model grid, its layers and the vector features. */
export interface MapBase {
  grid: GridSpec & { crs: { code: string; name: string } };
  classAtCells: ArrayLike<number>;
  hostCoverAtCells: ArrayLike<number>;
  /** Band options in scenario order (their key letters A, B, … follow that order). */
  bands: { label: string; polygon: Polygon }[];
  infested: Polygon[];
  sites: { name: string; point?: Xy; polygon?: Polygon }[];
}

export interface MapSize {
  /** Total width [px]; default 640. */
  width?: number;
}

/** Grids up to this many cells are drawn as vector cells; larger ones as a PNG raster. */
export const VECTOR_MAX_CELLS = 4000;
/** Largest PNG side [px]: the raster keeps one block of pixels per cell up to this size. */
const MAX_PNG_SIDE = 900;
const MARGIN = { left: 64, right: 14, top: 28, bottom: 40 };
const SIZE = 10;

/** Pixel frame of a map: map metres → SVG px (equal scale in x and y, north up). */
interface Frame {
  left: number;
  top: number;
  width: number;
  height: number;
  /** px per m */
  scale: number;
  x(xm: number): number;
  y(ym: number): number;
}

function frameFor(base: MapBase, width: number): Frame {
  const g = base.grid;
  const wM = g.nx * g.cellM;
  const hM = g.ny * g.cellM;
  const mapW = width - MARGIN.left - MARGIN.right;
  const scale = mapW / wM;
  const left = MARGIN.left;
  const top = MARGIN.top;
  return {
    left,
    top,
    width: mapW,
    height: hM * scale,
    scale,
    x: (xm) => left + (xm - g.originXM) * scale,
    y: (ym) => top + (g.originYM - ym) * scale,
  };
}

/** A cell colour function → the raster layer: PNG under the overlays, or vector runs for small grids. */
function rasterLayer(base: MapBase, fr: Frame, colourAt: (i: number) => { rgb: Rgb; pattern?: 'water' | 'hatch' }): string {
  const { nx, ny } = base.grid;
  if (nx * ny <= VECTOR_MAX_CELLS) {
    let s = '';
    const cw = fr.width / nx;
    for (let r = 0; r < ny; r++) {
      let c = 0;
      while (c < nx) {
        const a = colourAt(r * nx + c);
        const hex = rgbToHex(a.rgb);
        let e = c + 1;
        while (e < nx) {
          const b = colourAt(r * nx + e);
          if (rgbToHex(b.rgb) !== hex || b.pattern !== a.pattern) break;
          e++;
        }
        const x = fr.left + c * cw;
        const y = fr.top + r * cw;
        s += rect(x, y, (e - c) * cw + 0.3, cw + 0.3, { fill: hex });
        if (a.pattern === 'water') s += line(x, y + cw / 2, x + (e - c) * cw, y + cw / 2, { stroke: rgbToHex(CLASS_COLOURS.outsideLine), 'stroke-width': 0.6 });
        if (a.pattern === 'hatch') s += line(x, y + cw / 2, x + (e - c) * cw, y + cw / 2, { stroke: rgbToHex(CLASS_COLOURS.nonhostHatch), 'stroke-width': 0.6, 'stroke-dasharray': '1.5 1.5' });
        c = e;
      }
    }
    return el('g', { 'shape-rendering': 'crispEdges' }, s);
  }
  const k = Math.max(1, Math.min(4, Math.floor(MAX_PNG_SIDE / Math.max(nx, ny))));
  const W = nx * k;
  const H = ny * k;
  const px = new Uint8Array(W * H * 4);
  for (let r = 0; r < ny; r++) for (let c = 0; c < nx; c++) {
    const a = colourAt(r * nx + c);
    for (let dy = 0; dy < k; dy++) for (let dx = 0; dx < k; dx++) {
      const X = c * k + dx;
      const Y = r * k + dy;
      let rgb = a.rgb;
      if (a.pattern === 'water' && k >= 3 && isWaterLine(X, Y)) rgb = CLASS_COLOURS.outsideLine;
      if (a.pattern === 'hatch' && k >= 3 && isHatch(X, Y)) rgb = CLASS_COLOURS.nonhostHatch;
      const o = (Y * W + X) * 4;
      px[o] = rgb[0];
      px[o + 1] = rgb[1];
      px[o + 2] = rgb[2];
      px[o + 3] = 255;
    }
  }
  const uri = pngDataUri(W, H, px);
  return el('image', { x: fr.left, y: fr.top, width: fr.width, height: fr.height, preserveAspectRatio: 'none', style: 'image-rendering:pixelated', href: uri });
}

function pathOf(poly: Polygon, fr: Frame): string {
  return poly.map((ring) => `M${ring.map(([x, y]) => `${f(fr.x(x))},${f(fr.y(y))}`).join('L')}Z`).join('');
}

/** Band outlines with their key letters (option k: the colour, dash and letter of optionStyle(k)). */
function bandsLayer(base: MapBase, fr: Frame, only: number | 'all' | 'none'): string {
  let s = '';
  base.bands.forEach((b, k) => {
    if (only === 'none' || (only !== 'all' && k !== only)) return;
    const st = optionStyle(k);
    const d = pathOf(b.polygon, fr);
    s += el('path', { d, fill: '#ffffff', 'fill-opacity': 0.55, stroke: '#000000', 'stroke-width': 2.6, 'fill-rule': 'evenodd' });
    s += el('path', { d, fill: 'none', stroke: st.stroke, 'stroke-width': 1.6, 'stroke-dasharray': st.dash || undefined });
    // Letter at the band's east end (its largest x), with a white disc behind it.
    const pts = b.polygon[0];
    let best = pts[0];
    for (const p of pts) if (p[0] > best[0]) best = p;
    const cx = Math.min(fr.left + fr.width - 9, fr.x(best[0]) + 9);
    const cy = Math.max(fr.top + 9, Math.min(fr.top + fr.height - 9, fr.y(best[1])));
    s += el('circle', { cx, cy, r: 7, fill: '#ffffff', stroke: '#000000', 'stroke-width': 1 });
    s += text(cx, cy, optionKey(k), { anchor: 'middle', valign: 'middle', size: 9, bold: true });
  });
  return s;
}

function infestedLayer(base: MapBase, fr: Frame): string {
  return base.infested
    .map((p) => {
      const d = pathOf(p, fr);
      return el('path', { d, fill: 'none', stroke: '#ffffff', 'stroke-width': 3.2 }) + el('path', { d, fill: 'none', stroke: '#b2182b', 'stroke-width': 1.8, 'stroke-dasharray': '4 2' });
    })
    .join('');
}

function sitesLayer(base: MapBase, fr: Frame): string {
  let s = '';
  base.sites.forEach((site, i) => {
    let cx: number, cy: number;
    if (site.polygon) {
      s += el('path', { d: pathOf(site.polygon, fr), fill: 'none', stroke: '#000000', 'stroke-width': 1.4, 'stroke-dasharray': '1.5 1.5' });
      const ring = site.polygon[0];
      cx = ring.reduce((a, p) => a + fr.x(p[0]), 0) / ring.length;
      cy = ring.reduce((a, p) => a + fr.y(p[1]), 0) / ring.length;
    } else if (site.point) {
      cx = fr.x(site.point[0]);
      cy = fr.y(site.point[1]);
    } else return;
    s += el('rect', { x: cx - 6, y: cy - 6, width: 12, height: 12, fill: '#ffffff', stroke: '#000000', 'stroke-width': 1.2 });
    s += text(cx, cy, String(i + 1), { anchor: 'middle', valign: 'middle', size: 8.5, bold: true });
  });
  return s;
}

/** Scale bar length [m]: the largest round length up to a quarter of the map width. */
export function scaleBarLengthM(mapWidthM: number): number {
  const nice = [10, 20, 50, 100, 200, 250, 500, 1000, 2000, 2500, 5000, 10000, 20000, 25000, 50000, 100000, 200000, 500000];
  return nice.filter((v) => v <= mapWidthM / 4).pop() ?? nice[0];
}

const group = (n: number) => String(Math.round(n)).replace(/\B(?=(\d{3})+(?!\d))/g, '\u202f');

/** Frame, coordinate ticks (map CRS), scale bar and north arrow. */
function furniture(base: MapBase, fr: Frame): string {
  const g = base.grid;
  let s = rect(fr.left, fr.top, fr.width, fr.height, { fill: 'none', stroke: '#333333', 'stroke-width': 1 });
  const xs = scaleLinear().domain([g.originXM, g.originXM + g.nx * g.cellM]);
  const ys = scaleLinear().domain([g.originYM - g.ny * g.cellM, g.originYM]);
  const nxTicks = Math.max(2, Math.floor(fr.width / 110));
  for (const t of xs.ticks(nxTicks)) {
    const x = fr.x(t);
    s += line(x, fr.top + fr.height, x, fr.top + fr.height + 4, { stroke: '#333333' });
    s += text(x, fr.top + fr.height + 14, group(t), { anchor: 'middle', size: 8.5 });
  }
  for (const t of ys.ticks(Math.max(2, Math.floor(fr.height / 70)))) {
    const y = fr.y(t);
    s += line(fr.left - 4, y, fr.left, y, { stroke: '#333333' });
    s += text(fr.left - 6, y, group(t), { anchor: 'end', valign: 'middle', size: 8.5 });
  }
  s += text(fr.left + fr.width / 2, fr.top + fr.height + 27, fitText(`Easting and northing (m), ${g.crs.name} (${g.crs.code}); grid north up`, fr.width, 9), { anchor: 'middle', size: 9, fill: '#333333' });
  // Scale bar: a round length near a quarter of the map width, four alternating segments.
  const L = scaleBarLengthM(g.nx * g.cellM);
  const bx = fr.left + 10;
  const by = fr.top + fr.height - 14;
  const bw = L * fr.scale;
  const label = L >= 1000 ? `${L / 1000} km` : `${L} m`;
  s += rect(bx - 5, by - 14, bw + 10 + textWidth(label, 9) + 6, 22, { fill: '#ffffff', 'fill-opacity': 0.85 });
  for (let i = 0; i < 4; i++) s += rect(bx + (i * bw) / 4, by, bw / 4, 4, { fill: i % 2 ? '#ffffff' : '#000000', stroke: '#000000', 'stroke-width': 0.6, class: 'scale-bar' });
  s += text(bx, by - 3, '0', { size: 8.5 });
  s += text(bx + bw + 4, by + 4, label, { size: 9 });
  // North arrow (grid north) in the top-right corner.
  const nx0 = fr.left + fr.width - 18;
  const ny0 = fr.top + 12;
  s += el('circle', { cx: nx0, cy: ny0 + 8, r: 13, fill: '#ffffff', 'fill-opacity': 0.85 });
  s += el('path', { d: `M${f(nx0)},${f(ny0 - 2)}L${f(nx0 + 5)},${f(ny0 + 14)}L${f(nx0)},${f(ny0 + 10)}Z`, fill: '#ffffff', stroke: '#000000', 'stroke-width': 0.8 });
  s += el('path', { d: `M${f(nx0)},${f(ny0 - 2)}L${f(nx0 - 5)},${f(ny0 + 14)}L${f(nx0)},${f(ny0 + 10)}Z`, fill: '#000000', stroke: '#000000', 'stroke-width': 0.8 });
  s += text(nx0, ny0 + 19, 'N', { anchor: 'middle', valign: 'top', size: 8, bold: true });
  return s;
}

interface Swatch {
  label: string;
  /** SVG drawn in a 16 × 10 box at the origin. */
  svg: string;
}

const box = (fill: string, extra = '') => rect(0, 0, 16, 10, { fill, stroke: '#555555', 'stroke-width': 0.5 }) + extra;
const waterSwatch = () => box(rgbToHex(CLASS_COLOURS.outside), line(0, 3, 16, 3, { stroke: rgbToHex(CLASS_COLOURS.outsideLine), 'stroke-width': 0.8 }) + line(0, 7, 16, 7, { stroke: rgbToHex(CLASS_COLOURS.outsideLine), 'stroke-width': 0.8 }));
const hatchSwatch = () => box(rgbToHex(CLASS_COLOURS.nonhost), line(0, 10, 10, 0, { stroke: rgbToHex(CLASS_COLOURS.nonhostHatch), 'stroke-width': 0.8 }) + line(6, 10, 16, 0, { stroke: rgbToHex(CLASS_COLOURS.nonhostHatch), 'stroke-width': 0.8 }));

function overlaySwatches(base: MapBase, only: number | 'all' | 'none', contourStep: number | null): Swatch[] {
  const out: Swatch[] = [];
  if (contourStep !== null) out.push({ label: `front line every ${contourStep} years (thicker every ${2 * contourStep})`, svg: line(0, 5, 16, 5, { stroke: '#000000', 'stroke-width': 1.2 }) });
  base.bands.forEach((b, k) => {
    if (only === 'none' || (only !== 'all' && k !== only)) return;
    const st = optionStyle(k);
    out.push({ label: `${optionKey(k)}: ${b.label}`, svg: rect(0, 1, 16, 8, { fill: '#ffffff', stroke: st.stroke, 'stroke-width': 1.6, 'stroke-dasharray': st.dash || undefined }) });
  });
  if (base.infested.length) out.push({ label: 'infested at the start', svg: line(0, 5, 16, 5, { stroke: '#b2182b', 'stroke-width': 1.8, 'stroke-dasharray': '4 2' }) });
  base.sites.forEach((s, i) => out.push({ label: `${i + 1}: ${s.name}`, svg: rect(3, 0, 10, 10, { fill: '#ffffff', stroke: '#000000' }) + text(8, 5, String(i + 1), { anchor: 'middle', valign: 'middle', size: 7, bold: true }) }));
  return out;
}

/** Legend entries in columns below the map; returns the SVG and its height. */
function legendBlock(entries: Swatch[], x: number, y: number, width: number): { svg: string; height: number } {
  if (!entries.length) return { svg: '', height: 0 };
  const natural = Math.max(...entries.map((e) => 22 + textWidth(e.label, SIZE))) + 12;
  const cols = Math.max(1, Math.min(entries.length, Math.floor(width / Math.min(natural, width))));
  const colW = width / cols;
  const ROW = 15;
  let s = '';
  entries.forEach((e, i) => {
    const cx = x + (i % cols) * colW;
    const cy = y + Math.floor(i / cols) * ROW;
    s += el('g', { transform: `translate(${f(cx)},${f(cy + 2)})` }, e.svg);
    s += text(cx + 22, cy + 7, fitText(e.label, colW - 28, SIZE), { size: SIZE, valign: 'middle' });
  });
  return { svg: s, height: Math.ceil(entries.length / cols) * ROW };
}

function assemble(base: MapBase, width: number, title: string, hint: string, layers: (fr: Frame) => string, legend: Swatch[]): Chart {
  const fr = frameFor(base, width);
  const lg = legendBlock(legend, fr.left - 50, fr.top + fr.height + MARGIN.bottom, width - (fr.left - 50) - MARGIN.right);
  const height = fr.top + fr.height + MARGIN.bottom + lg.height + 6;
  const clipId = `clip${Math.abs(hash(title)) % 1e8}`;
  const defs = `<clipPath id="${clipId}">${rect(fr.left, fr.top, fr.width, fr.height)}</clipPath>`;
  const body =
    text(fr.left - 50, 16, fitText(title, width - 20, 13), { size: 13, bold: true }) +
    el('g', { 'clip-path': `url(#${clipId})` }, layers(fr)) +
    furniture(base, fr) +
    lg.svg;
  return { svg: svgRoot(width, height, title, hint, body, defs), title, hint, width, height };
}

function hash(s: string): number {
  let h = 0;
  for (let i = 0; i < s.length; i++) h = (h * 31 + s.charCodeAt(i)) | 0;
  return h;
}

function classColour(base: MapBase, i: number): { rgb: Rgb; pattern?: 'water' | 'hatch' } {
  const c = base.classAtCells[i];
  if (c === CLASS_INDEX.outside) return { rgb: CLASS_COLOURS.outside, pattern: 'water' };
  if (c === CLASS_INDEX.nonhost) return { rgb: CLASS_COLOURS.nonhost, pattern: 'hatch' };
  if (c === CLASS_INDEX.open) return { rgb: CLASS_COLOURS.open };
  return { rgb: hostColour(base.hostCoverAtCells[i]) };
}

/** The map itself: host cover, non-host forest, open ground, outside; all bands, the infestation and the sites. */
export function hostCoverMap(base: MapBase, size: MapSize = {}): Chart {
  const width = size.width ?? 640;
  const legend: Swatch[] = [
    { label: 'host forest: darker = more host (cover × stocking 0.2 → 1)', svg: [0.2, 0.4, 0.6, 0.8, 1].map((v, k) => rect(k * 3.2, 0, 3.3, 10, { fill: rgbToHex(hostColour(v)) })).join('') + rect(0, 0, 16, 10, { fill: 'none', stroke: '#555555', 'stroke-width': 0.5 }) },
    { label: 'non-host forest', svg: hatchSwatch() },
    { label: 'open ground (farmland, clearings)', svg: box(rgbToHex(CLASS_COLOURS.open)) },
    { label: 'outside the habitat (water, built-up, no data)', svg: waterSwatch() },
    ...overlaySwatches(base, 'all', null),
  ];
  return assemble(
    base,
    width,
    'The map: host forest, band options, infestation and protected sites',
    'Darker green is more host; letters mark the band options, numbers the protected sites.',
    (fr) => rasterLayer(base, fr, (i) => classColour(base, i)) + bandsLayer(base, fr, 'all') + infestedLayer(base, fr) + sitesLayer(base, fr),
    legend,
  );
}

export interface ArrivalMapInput {
  /** Arrival year per cell (NaN or null = not reached), row-major on base.grid. */
  arrivalYears: ArrayLike<number | null>;
  horizonYears: number;
  /** Which band to draw (index into base.bands), or null for the baseline. */
  band: number | null;
  title: string;
  /** Years between front lines; default 5 (or horizon/6 rounded for long horizons). */
  stepYears?: number;
}

/** Step between front lines: 5 years, or more for long horizons (at most about 8 lines). */
export function frontStep(horizonYears: number): number {
  for (const s of [1, 2, 5, 10, 20, 25, 50, 100]) if (horizonYears / s <= 8) return s;
  return 100;
}

/** Arrival time: coloured by period of first detection, with front lines every step years. */
export function arrivalMap(base: MapBase, a: ArrivalMapInput, size: MapSize = {}): Chart {
  const width = size.width ?? 640;
  const step = a.stepYears ?? frontStep(a.horizonYears);
  const n = Math.max(1, Math.ceil(a.horizonYears / step - 1e-9));
  const years = Float64Array.from({ length: base.grid.nx * base.grid.ny }, (_, i) => {
    const v = a.arrivalYears[i];
    return typeof v === 'number' && Number.isFinite(v) ? v : NaN;
  });
  const colourAt = (i: number): { rgb: Rgb; pattern?: 'water' | 'hatch' } => {
    const c = base.classAtCells[i];
    if (c === CLASS_INDEX.outside) return { rgb: CLASS_COLOURS.outside, pattern: 'water' };
    const v = years[i];
    if (Number.isNaN(v)) return c === CLASS_INDEX.nonhost ? { rgb: CLASS_COLOURS.unreached, pattern: 'hatch' } : { rgb: CLASS_COLOURS.unreached };
    return { rgb: arrivalColour(Math.min(n - 1, Math.floor(v / step)), n) };
  };
  const filled = fillAcross(years, base.grid, (i) => base.classAtCells[i] === CLASS_INDEX.outside);
  const lines = arrivalContours(filled, base.grid, contourYears(a.horizonYears, step));
  const legend: Swatch[] = [];
  for (let k = 0; k < n; k++) {
    const lo = k * step;
    const hi = Math.min(a.horizonYears, (k + 1) * step);
    legend.push({ label: k === 0 ? `reached by year ${hi}` : `years ${lo}–${hi}`, svg: box(rgbToHex(arrivalColour(k, n))) });
  }
  legend.push({ label: `not reached within ${a.horizonYears} years`, svg: box(rgbToHex(CLASS_COLOURS.unreached)) });
  legend.push({ label: 'outside the habitat (water, built-up)', svg: waterSwatch() });
  legend.push(...overlaySwatches(base, a.band ?? 'none', step));
  const layers = (fr: Frame) => {
    let s = rasterLayer(base, fr, colourAt);
    for (const c of lines) {
      const major = Math.round(c.year / step) % 2 === 0;
      const d = c.polygons.map((p) => pathOf(p, fr)).join('');
      if (!d) continue;
      s += el('path', { d, fill: 'none', stroke: '#ffffff', 'stroke-width': major ? 3 : 2.2, 'stroke-opacity': 0.8 });
      s += el('path', { d, fill: 'none', stroke: '#000000', 'stroke-width': major ? 1.6 : 0.9 });
      // Label each front line once, at the east end of its largest ring.
      let bestRing: Xy[] | null = null;
      for (const p of c.polygons) if (!bestRing || p[0].length > bestRing.length) bestRing = p[0];
      if (bestRing && bestRing.length > 8) {
        let e = bestRing[0];
        for (const p of bestRing) if (p[0] > e[0]) e = p;
        const lx = Math.min(fr.left + fr.width - 12, fr.x(e[0]) + 2);
        const ly = fr.y(e[1]);
        const lab = String(c.year);
        s += rect(lx - 1, ly - 6, textWidth(lab, 8.5) + 2, 11, { fill: '#ffffff', 'fill-opacity': 0.85 });
        s += text(lx, ly, lab, { size: 8.5, valign: 'middle', bold: major });
      }
    }
    return s + bandsLayer(base, fr, a.band ?? 'none') + infestedLayer(base, fr) + sitesLayer(base, fr);
  };
  return assemble(base, width, a.title, `Darker = reached earlier; black lines show the front every ${step} years (labels: year).`, layers, legend);
}

export { esc };
