/**
 * Charts shared by the web pages and the PDF briefing. Each is a pure function from parts of the result
 * document (server/analysis/result.ts) to `{ svg, title, hint, width, height }`: plain SVG text drawn with
 * d3-scale and d3-shape, no DOM. Axes carry units; series differ in dash, marker and letter key as well as
 * colour, so charts read in greyscale. All text is escaped.
 *
 * A new chart is a module here built from `frame.ts` (axes, legend, label spreading), `styles.ts` (option
 * keys and styles, the same as in every other chart) and `svg.ts` (escaping, elements), listed in
 * `chartsForResult` (web page) and placed by the briefing. See README.md in this folder.
 */
export type { Chart, ChartSize, Box, LegendEntry } from './frame.ts';
export { axisBottom, axisLeft, legend, spreadLabels, emptyPanel, DEFAULT_WIDTH } from './frame.ts';
export { esc } from './svg.ts';
export { optionKey, optionStyle, BASELINE_STYLE } from './styles.ts';
export { frontPositionChart, type FrontChartInput } from './front-position.ts';
export { spaceTimeChart, densityClasses, type SpaceTimeOptions } from './space-time.ts';
export { hostProfileChart, type HostChartInput } from './host-profile.ts';
export { widthDelayChart, type WidthDelayInput, type WidthDelayOptions } from './width-delay.ts';
export { mosaicSpeedChart, dispersionCurveChart } from './mosaic.ts';
export { transectStrip, scaleBarKm, type TransectInput } from './transect.ts';
export { chartsForResult, type ResultChart, type ChartGroup } from './for-result.ts';
