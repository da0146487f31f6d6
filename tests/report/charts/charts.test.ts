import { describe, expect, it } from 'vitest';
import PDFDocument from 'pdfkit';
import { chartsForResult, frontPositionChart, hostProfileChart, spaceTimeChart, transectStrip, widthDelayChart, mosaicSpeedChart, dispersionCurveChart, optionStyle, densityClasses, scaleBarKm, esc } from '../../../server/report/charts/index.ts';
import { textWidth, fitText } from '../../../server/report/charts/text-metrics.ts';
import { marker } from '../../../server/report/charts/styles.ts';
import { FONT, registerFonts } from '../../../server/report/pdf/fonts.ts';
import { drawChart } from '../../../server/report/pdf/chart.ts';
import { makeResultFixture, FIXTURE_SPEED } from '../../helpers/result-fixture.ts';
import { axisFromTicks, havePython, nonFiniteTokens, parseWithPython, paths, polylinePoints, texts, type SvgText } from '../../helpers/svg.ts';
import { expectAllClose } from '../../helpers/close.ts';
import type { ResultDocument } from '../../../server/analysis/result.ts';

const HOSTILE = `<script>alert("x")</script> & 'Ossen' <b>`;

/** Tick labels of the bottom axis (size 10, centred) and the left axis (size 10, right-aligned), as value → px. */
function ticks(svg: string) {
  const t = texts(svg).filter((x) => x.size === 10 && /^[−-]?\d+(\.\d+)?$/.test(x.text));
  const val = (x: SvgText) => Number(x.text.replace('−', '-'));
  const bottomY = Math.max(...t.filter((x) => x.anchor === 'middle').map((x) => x.y));
  const bottom = t.filter((x) => x.anchor === 'middle' && x.y === bottomY).map((x) => ({ value: val(x), px: x.x }));
  // Left tick labels are drawn 0.35 em below the tick (vertical centring by offset).
  const left = t.filter((x) => x.anchor === 'end').map((x) => ({ value: val(x), px: x.y - 0.35 * x.size }));
  return { bottom, left };
}

describe('charts for a full result document', () => {
  const { doc } = makeResultFixture({ nOptions: 3, nSites: 2, uncertainty: true });
  const charts = chartsForResult(doc);

  it('lists the expected charts in reading order with unique ids', () => {
    const ids = charts.map((c) => c.id);
    expect(ids).toEqual([
      'transect', 'front-position', 'width-delay-A', 'width-delay-B', 'width-delay-C', 'host-profile',
      'space-time-baseline', 'space-time-A', 'space-time-B', 'space-time-C', 'mosaic-speed', 'dispersion-1', 'dispersion-2',
    ]);
  });

  it('every chart has a title, a one-line hint, a sized root and no NaN/undefined anywhere', () => {
    for (const { id, chart } of charts) {
      expect(chart.title.length, id).toBeGreaterThan(5);
      expect(chart.hint, id).not.toMatch(/\n/);
      expect(chart.hint.length, id).toBeLessThan(140);
      expect(chart.svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"'), id).toBe(true);
      expect(chart.svg).toContain(`viewBox="0 0 ${chart.width} ${chart.height}"`);
      expect(nonFiniteTokens(chart.svg), id).toEqual([]);
      for (const d of paths(chart.svg)) expect(d, id).toMatch(/^[MLHVCSQTAZmlhvcsqtaz\d\s.,−-]*$/);
    }
  });

  it('every chart with axes names the quantity and its unit', () => {
    const expectLabels: Record<string, RegExp[]> = {
      transect: [/position along the transect \(km\)/, /\d+ km$/],
      'front-position': [/time since the current infestation \(yr\)/, /front position along the transect \(km\)/],
      'width-delay-A': [/clearing width \(m\)/, /delay \(years\)/],
      'host-profile': [/position along the transect \(km\)/, /host stocking remaining \(0–1\)/],
      'space-time-baseline': [/position along the transect \(km\)/, /time \(yr\)/, /share of/],
      'mosaic-speed': [/spread speed \(km\/yr\)/],
      'dispersion-1': [/\(1\/km\)/, /λ\(s\) \(1\/yr\)/],
    };
    for (const [id, res] of Object.entries(expectLabels)) {
      const c = charts.find((x) => x.id === id);
      expect(c, id).toBeDefined();
      const all = texts(c!.chart.svg).map((t) => t.text);
      for (const re of res) expect(all.some((t) => re.test(t)), `${id}: ${re}`).toBe(true);
    }
  });

  it('is well-formed XML by an independent parser (python xml.etree)', (ctx) => {
    if (!havePython()) {
      console.warn('SKIPPED: python3 not found; the XML well-formedness check of the charts did not run');
      ctx.skip();
    }
    const parsed = parseWithPython(charts.map((c) => c.chart.svg));
    parsed.forEach((p, i) => {
      expect(p.error, charts[i].id).toBe('');
      expect(p.root, charts[i].id).toBe('{http://www.w3.org/2000/svg}svg');
    });
  });

  it('draws every chart into a PDF with svg-to-pdfkit without a warning', () => {
    const pdf = new PDFDocument({ size: 'A4', margin: 50, autoFirstPage: true });
    registerFonts(pdf);
    for (const { chart } of charts) {
      pdf.addPage();
      expect(() => drawChart(pdf, chart, 50, 50, 495)).not.toThrow();
    }
    pdf.end();
  });
});

describe('front position chart', () => {
  const { doc } = makeResultFixture({ nOptions: 3, nSites: 2 });
  const chart = frontPositionChart(doc);

  it('maps times and positions through the axes: the baseline runs 3 km + 1.2 km/yr × t', () => {
    const t = ticks(chart.svg);
    const xOf = axisFromTicks(t.bottom);
    const yOf = axisFromTicks(t.left);
    expect(t.bottom.map((b) => b.value)).toEqual([0, 5, 10, 15, 20, 25, 30, 35, 40]);
    // The baseline is the only path drawn in black at width 2.4.
    const d = chart.svg.match(/<path d="([^"]*)" fill="none" stroke="#000000" stroke-width="2.4"/)?.[1];
    expect(d).toBeDefined();
    const pts = polylinePoints(d!);
    expect(pts.length).toBeGreaterThan(100);
    // Back through the tick-derived axes: x(t) = 3 + 1.2 t exactly (fixture), to within 0.02 px rounding.
    const px = pts.map(([x]) => x);
    const expectedY = px.map((x) => {
      const tt = (x - xOf(0)) / ((xOf(40) - xOf(0)) / 40);
      return yOf(3 + FIXTURE_SPEED * tt);
    });
    // Rounding to 0.01 px in the SVG plus the tick labels' own 0.01 px rounding: 0.05 px is ample.
    expectAllClose(pts.map(([, y]) => y), expectedY, { atol: 0.05 });
  });

  it('labels each option line with its letter key and lists it in the legend', () => {
    const all = texts(chart.svg).map((t) => t.text);
    for (const k of ['A', 'B', 'C']) expect(all.filter((t) => t === k).length).toBeGreaterThanOrEqual(2); // end label + band letter (+ legend)
    expect(all).toContain('baseline');
    expect(all.some((t) => t.startsWith('Wide cut at km 6'))).toBe(true);
    expect(all).toContain('Brackfen Mill village');
  });

  it('leaves a gap where the front is missing instead of drawing NaN', () => {
    const d2: ResultDocument = structuredClone(doc);
    const rf = d2.options[0].run.series.rightFrontKm;
    for (let i = 100; i < 150; i++) rf[i] = null;
    const c = frontPositionChart(d2);
    expect(nonFiniteTokens(c.svg)).toEqual([]);
    const optionPath = paths(c.svg).find((p) => (p.match(/M/g) ?? []).length === 2);
    expect(optionPath, 'one line broken into two pieces').toBeDefined();
  });

  it('works for options on the left of the infestation and without options', () => {
    const none = frontPositionChart({ ...doc, options: [] });
    expect(texts(none.svg).some((t) => /right front/.test(t.text))).toBe(true);
    expect(texts(none.svg).some((t) => /left front/.test(t.text))).toBe(true);
    expect(nonFiniteTokens(none.svg)).toEqual([]);
  });
});

describe('escaping of user text', () => {
  const { doc } = makeResultFixture({ nOptions: 2, nSites: 2, optionName: (k) => `${HOSTILE} ${k}`, siteName: (i) => `${HOSTILE} site ${i}` });
  const charts = chartsForResult(doc);

  it('never lets a name inject markup; the names still read correctly', () => {
    for (const { id, chart } of charts) {
      expect(chart.svg, id).not.toContain('<script');
      expect(chart.svg, id).not.toContain('<b>');
      expect(chart.svg, id).not.toMatch(/&(?!amp;|lt;|gt;|quot;|#39;)/);
    }
    const front = charts.find((c) => c.id === 'front-position')!.chart.svg;
    expect(front).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;Ossen&#39;');
  });

  it('round-trips through an XML parser to the original text', (ctx) => {
    if (!havePython()) {
      console.warn('SKIPPED: python3 not found; escaping round-trip check did not run');
      ctx.skip();
    }
    const [p] = parseWithPython([charts.find((c) => c.id === 'transect')!.chart.svg]);
    expect(p.error).toBe('');
    expect(p.allText).toContain(`${HOSTILE.slice(0, 20)}`);
  });

  it('esc covers the five XML specials', () => {
    expect(esc(`<>&"'`)).toBe('&lt;&gt;&amp;&quot;&#39;');
  });
});

describe('space–time map', () => {
  const { doc } = makeResultFixture({ nOptions: 1, nSites: 2 });
  const c = spaceTimeChart(doc.baseline, { detectionLevel: 0.01, runLabel: 'baseline' });

  it('uses log-spaced classes from the detection level up to capacity', () => {
    const b = densityClasses(0.01, 1, 6);
    expect(b.length).toBe(7);
    expectAllClose(b, [0.01, 0.01 * 10 ** (2 / 6), 0.01 * 10 ** (4 / 6), 0.1, 0.1 * 10 ** (2 / 6), 0.1 * 10 ** (4 / 6), 1], { rtol: 1e-12 });
  });

  it('gets darker with density, so the classes read in greyscale (relative luminance, ITU-R BT.709 weights)', () => {
    const fills = [...new Set([...c.svg.matchAll(/<rect x="[^"]*" y="[^"]*" width="[^"]*" height="[^"]*" fill="(rgb\([^)]*\))" stroke="rgb/g)].map((m) => m[1]))];
    const lum = (rgb: string) => {
      const [r, g, b] = rgb.match(/\d+/g)!.map(Number);
      return 0.2126 * r + 0.7152 * g + 0.0722 * b;
    };
    // Legend swatches are listed darkest (highest class) first.
    const swatches = [...c.svg.matchAll(/<rect x="[^"]*" y="[^"]*" width="14" height="[^"]*" fill="(rgb\([^)]*\))"/g)].map((m) => lum(m[1]));
    expect(swatches.length).toBe(6);
    for (let k = 1; k < swatches.length; k++) expect(swatches[k]).toBeGreaterThan(swatches[k - 1] + 8);
    expect(fills.length).toBeGreaterThanOrEqual(4);
  });

  it('merges equal neighbours so the SVG stays small', () => {
    const rects = (c.svg.match(/<rect /g) ?? []).length;
    expect(rects).toBeLessThan(61 * 300 * 0.2);
    expect(c.svg.length).toBeLessThan(200_000);
  });

  it('shows an empty panel, not an error, when the run has no record', () => {
    const e = spaceTimeChart({ spaceTime: { xKm: [], timesYears: [], density: [] } }, { detectionLevel: 0.01 });
    expect(texts(e.svg).some((t) => /no space–time record/.test(t.text))).toBe(true);
    expect(nonFiniteTokens(e.svg)).toEqual([]);
  });
});

describe('transect strip', () => {
  const { doc } = makeResultFixture({ nOptions: 8, nSites: 12 });
  const c = transectStrip(doc);

  it('has one row per option with its key, and every site named', () => {
    const all = texts(c.svg).map((t) => t.text);
    for (let k = 0; k < 8; k++) expect(all.some((t) => t.startsWith(`${String.fromCharCode(65 + k)}  `))).toBe(true);
    // 12 sites do not fit on one row by name: they are numbered on the strip, with a key below.
    const key = all.join(' ');
    doc.baseline.arrivals.forEach((s, i) => {
      expect(key).toContain(`${i + 1}\u00a0${s.name}\u00a0(km\u00a0`);
      expect(all).toContain(String(i + 1));
    });
    const two = transectStrip(makeResultFixture({ nOptions: 1, nSites: 2 }).doc);
    for (const s of makeResultFixture({ nOptions: 1, nSites: 2 }).doc.baseline.arrivals) expect(texts(two.svg).map((t) => t.text)).toContain(s.name);
  });

  it('site labels do not overlap (same row ⇒ disjoint extents)', () => {
    const labels = texts(c.svg).filter((t) => t.size === 9 && /^\d+$/.test(t.text) && t.y < 80);
    expect(labels.length).toBe(12);
    for (let i = 0; i < labels.length; i++) {
      for (let j = i + 1; j < labels.length; j++) {
        if (labels[i].y !== labels[j].y) continue;
        const a = [labels[i].x, labels[i].x + textWidth(labels[i].text, 9)];
        const b = [labels[j].x, labels[j].x + textWidth(labels[j].text, 9)];
        expect(a[1] <= b[0] || b[1] <= a[0], `${labels[i].text} / ${labels[j].text}`).toBe(true);
      }
    }
  });

  it('has a scale bar whose length matches the axis (km per px from the tick labels)', () => {
    const t = ticks(c.svg);
    const xOf = axisFromTicks(t.bottom);
    const km = scaleBarKm(60);
    expect(km).toBe(10);
    const label = texts(c.svg).find((x) => x.text === `${km} km`)!;
    const zero = texts(c.svg).filter((x) => x.text === '0' && x.size === 9)[0];
    expectAllClose(label.x - zero.x, xOf(km) - xOf(0), { atol: 0.05 });
  });

  it('scale bar lengths are 1, 2 or 5 × 10^k, about a fifth of the span', () => {
    expect([0.3, 4, 12, 60, 260, 5000].map(scaleBarKm)).toEqual([0.05, 0.5, 2, 10, 50, 1000]);
  });
});

describe('width–delay, host and mosaic charts', () => {
  const { doc } = makeResultFixture({ nOptions: 2, nSites: 2 });

  it('shades the critical-width bracket exactly between its bounds on the width axis', () => {
    const c = widthDelayChart(doc.options[0], { key: 'A' })!;
    const xOf = axisFromTicks(ticks(c.svg).bottom);
    const m = c.svg.match(/<rect x="([\d.]+)" y="[\d.]+" width="([\d.]+)" height="[\d.]+" fill="#cfcfcf"/)!;
    const [lo, hi] = doc.options[0].criticalWidth.bracketM!;
    expectAllClose([Number(m[1]), Number(m[1]) + Number(m[2])], [xOf(lo), xOf(hi)], { atol: 0.05 });
    expect(texts(c.svg).map((t) => t.text)).toContain('800 m');
  });

  it('for a growth form that cannot be held: no "holds" strip, and the hint gives the delay per 100 m', () => {
    const o = structuredClone(doc.options[1]);
    o.criticalWidth = { ...o.criticalWidth, applicable: false, bracketM: null, phasePlaneM: null, delayPer100mYears: 0.153 };
    o.widthDelay = o.widthDelay.map((r) => ({ ...r, pinned: false }));
    const c = widthDelayChart(o)!;
    expect(texts(c.svg).map((t) => t.text)).not.toContain('holds:');
    expect(c.hint).toMatch(/each extra 100 m buys about 0\.15 years/);
    expect(c.svg).not.toContain('#cfcfcf');
  });

  it('returns null where the barrier analysis has not filled the rows', () => {
    const bare = makeResultFixture({ nOptions: 1, analysis: false }).doc;
    expect(widthDelayChart(bare.options[0])).toBeNull();
    expect(mosaicSpeedChart(bare.mosaics)).toBeNull();
    const ids = chartsForResult(bare).map((c) => c.id);
    expect(ids).toEqual(['transect', 'front-position', 'host-profile', 'space-time-baseline', 'space-time-A']);
  });

  it('host chart keeps values on the 0–1 axis', () => {
    const c = hostProfileChart(doc);
    const t = ticks(c.svg);
    expect(t.left.map((x) => x.value)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    const yTop = axisFromTicks(t.left)(1);
    const yBottom = axisFromTicks(t.left)(0);
    const lines = [...c.svg.matchAll(/<path d="([^"]*)" fill="none"/g)].map((m) => m[1]);
    expect(lines.length).toBe(4); // at start, baseline, two options
    for (const d of lines) for (const [, y] of polylinePoints(d)) expect(y >= yTop - 0.05 && y <= yBottom + 0.05).toBe(true);
  });

  it('dispersion chart draws the tangent with slope c* through the origin', () => {
    const m = doc.mosaics![0];
    const c = dispersionCurveChart(m)!;
    const t = ticks(c.svg);
    const xOf = axisFromTicks(t.bottom);
    const yOf = axisFromTicks(t.left);
    const l = c.svg.match(/<line x1="([\d.]+)" y1="([\d.]+)" x2="([\d.]+)" y2="([\d.]+)" stroke="#000000" stroke-dasharray="5 3"/)!.slice(1).map(Number);
    expectAllClose([l[0], l[1]], [xOf(0), yOf(0)], { atol: 0.05 });
    const s2 = (l[2] - xOf(0)) / (xOf(1) - xOf(0));
    const lam2 = (l[3] - yOf(0)) / (yOf(1) - yOf(0));
    // Slope from pixel coordinates rounded to 0.01 px over a ~500 px line: relative error ≲ 1e-4.
    expectAllClose(lam2 / s2, m.exactKmPerYear!, { rtol: 1e-3 });
    expect(dispersionCurveChart(doc.mosaics![1])!.hint).toMatch(/cannot persist/);
  });
});

describe('styles and text metrics', () => {
  it('gives the 8 options 8 different dash patterns, markers and colours', () => {
    const st = Array.from({ length: 8 }, (_, k) => optionStyle(k));
    expect(new Set(st.map((s) => s.dash)).size).toBe(8);
    expect(new Set(st.map((s) => marker(s, 0, 0))).size).toBe(8);
    expect(new Set(st.map((s) => s.stroke)).size).toBe(8);
    expect(st.map((s) => s.key).join('')).toBe('ABCDEFGH');
  });

  it('text width estimates agree with pdfkit measuring the embedded DejaVu font (within 1 %)', () => {
    const pdf = new PDFDocument({ size: 'A4' });
    registerFonts(pdf);
    const samples = ['Brackfen Mill village', 'front position along the transect (km)', 'WWW iii 0123456789', 'host stocking remaining (0–1)', 'λ(s) (1/yr) ± ≥ km²'];
    for (const s of samples) {
      pdf.font(FONT.regular).fontSize(10);
      expectAllClose(textWidth(s, 10), pdf.widthOfString(s), { rtol: 0.01 });
      pdf.font(FONT.bold);
      if (/^[\x20-\x7e]*$/.test(s)) expectAllClose(textWidth(s, 10, true), pdf.widthOfString(s), { rtol: 0.01 });
    }
    pdf.end();
  });

  it('fitText shortens with an ellipsis to fit, and leaves short text alone', () => {
    expect(fitText('short', 100, 10)).toBe('short');
    const long = 'A very long name for a protected site that cannot possibly fit';
    const f = fitText(long, 80, 10);
    expect(f.endsWith('…')).toBe(true);
    expect(textWidth(f, 10)).toBeLessThanOrEqual(80);
  });
});
