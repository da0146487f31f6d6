/**
 * Small readers for chart SVG strings in tests: text elements with their positions, path data, and an XML
 * well-formedness check by an independent parser (Python's xml.etree, which is on the machine).
 */
import { spawnSync } from 'node:child_process';

export interface SvgText {
  x: number;
  y: number;
  anchor: string;
  size: number;
  /** Decoded text content. */
  text: string;
  raw: string;
}

const decode = (s: string) =>
  s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');

/** All <text> elements (charts never nest markup inside text). */
export function texts(svg: string): SvgText[] {
  const out: SvgText[] = [];
  for (const m of svg.matchAll(/<text([^>]*)>([^<]*)<\/text>/g)) {
    const attr = (n: string) => m[1].match(new RegExp(`\\s${n}="([^"]*)"`))?.[1];
    out.push({ x: Number(attr('x')), y: Number(attr('y')), anchor: attr('text-anchor') ?? 'start', size: Number(attr('font-size') ?? 11), text: decode(m[2]), raw: m[2] });
  }
  return out;
}

/** The `d` attribute of every <path>. */
export function paths(svg: string): string[] {
  return [...svg.matchAll(/<path[^>]*\sd="([^"]*)"/g)].map((m) => m[1]);
}

/** Points of the path's M/L commands (absolute polylines as d3-shape writes them). */
export function polylinePoints(d: string): [number, number][] {
  return [...d.matchAll(/[ML](-?[\d.]+),(-?[\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
}

/** Every numeric attribute value and path number in the SVG is finite (no NaN, Infinity, undefined). */
export function nonFiniteTokens(svg: string): string[] {
  return [...svg.matchAll(/NaN|Infinity|undefined|null/g)].map((m) => m[0]);
}

let pythonChecked: boolean | null = null;
/** True when python3 can be run (for the XML check). */
export function havePython(): boolean {
  if (pythonChecked === null) pythonChecked = spawnSync('python3', ['-c', 'import xml.etree.ElementTree'], { encoding: 'utf8' }).status === 0;
  return pythonChecked;
}

/**
 * Parses each SVG with Python's xml.etree.ElementTree; returns one error message per SVG that is not
 * well-formed XML ('' for the good ones), plus the root tag and the concatenated text of all elements.
 */
export function parseWithPython(svgs: string[]): { error: string; root: string; allText: string }[] {
  const script = `
import sys, json, xml.etree.ElementTree as ET
out = []
for s in json.load(sys.stdin):
    try:
        r = ET.fromstring(s)
        out.append({"error": "", "root": r.tag, "allText": " ".join(t for t in r.itertext())})
    except ET.ParseError as e:
        out.append({"error": str(e), "root": "", "allText": ""})
print(json.dumps(out))
`;
  const r = spawnSync('python3', ['-c', script], { input: JSON.stringify(svgs), encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  if (r.status !== 0) throw new Error(`python3 failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as { error: string; root: string; allText: string }[];
}

/** Linear map from tick labels along one axis: value → pixel, fitted through two labelled ticks. */
export function axisFromTicks(ticks: { value: number; px: number }[]): (v: number) => number {
  const a = ticks[0];
  const b = ticks[ticks.length - 1];
  return (v) => a.px + ((v - a.value) * (b.px - a.px)) / (b.value - a.value);
}
