/**
 * Text width estimates for laying out SVG labels without a DOM. The charts name DejaVu Sans first (the PDF
 * embeds it; browsers fall back to Verdana-like sans fonts of similar width), so widths are taken from its
 * advance widths.
 */

/**
 * Advance widths of DejaVu Sans (regular and bold) for code points 32–126, in 1/1000 em, read from
 * DejaVuSans.ttf / DejaVuSans-Bold.ttf of the dejavu-fonts-ttf 2.37.3 package (2048 units per em, rounded).
 */
const REGULAR_ASCII = [
  318, 401, 460, 838, 636, 950, 780, 275, 390, 390, 500, 838, 318, 361, 318, 337, 636, 636, 636, 636, 636, 636, 636, 636, 636, 636,
  337, 337, 838, 838, 838, 531, 1000, 684, 686, 698, 770, 632, 575, 775, 752, 295, 295, 656, 557, 863, 748, 787, 603, 787, 695, 635,
  611, 732, 684, 989, 685, 611, 685, 390, 337, 390, 838, 500, 500, 613, 635, 550, 635, 615, 352, 635, 634, 278, 278, 579, 278, 974,
  634, 612, 635, 635, 411, 521, 392, 634, 592, 818, 592, 592, 525, 636, 337, 636, 838,
];
const BOLD_ASCII = [
  348, 456, 521, 838, 696, 1002, 872, 306, 457, 457, 523, 838, 380, 415, 380, 365, 696, 696, 696, 696, 696, 696, 696, 696, 696, 696,
  400, 400, 838, 838, 838, 580, 1000, 774, 762, 734, 830, 683, 683, 821, 837, 372, 372, 775, 637, 995, 837, 850, 733, 850, 770, 720,
  682, 812, 774, 1103, 771, 724, 725, 457, 365, 457, 838, 500, 500, 675, 716, 593, 716, 678, 435, 716, 712, 343, 343, 665, 343, 1042,
  712, 687, 716, 716, 493, 595, 478, 712, 652, 924, 645, 652, 582, 712, 365, 712, 838,
];
/** A few non-ASCII characters the charts print (same source, regular weight). */
const OTHER: Record<string, number> = {
  '°': 500, '²': 401, '−': 838, '–': 500, '—': 1000, '…': 1000, '±': 838, '≥': 838, '≤': 838, 'λ': 592, 'Δ': 684, 'µ': 636,
  '×': 838, '·': 318, '’': 318, '“': 518, '”': 518, '\u202f': 318, '\u00a0': 318,
};
/** Width assumed for any other character: wider than most Latin glyphs, so estimates err on the safe side. */
const FALLBACK = 800;

/** Estimated width of `s` at `size` px in DejaVu Sans [px]. */
export function textWidth(s: string, size: number, bold = false): number {
  const table = bold ? BOLD_ASCII : REGULAR_ASCII;
  let w = 0;
  for (const ch of s) {
    const c = ch.codePointAt(0) ?? 32;
    w += c >= 32 && c <= 126 ? table[c - 32] : (OTHER[ch] ?? FALLBACK) * (bold ? 1.08 : 1);
  }
  return (w * size) / 1000;
}

/** `s` shortened with an ellipsis so that it fits `maxWidth` px (returned unchanged when it fits). */
export function fitText(s: string, maxWidth: number, size: number, bold = false): string {
  if (textWidth(s, size, bold) <= maxWidth) return s;
  const chars = [...s];
  let lo = 0;
  let hi = chars.length;
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (textWidth(`${chars.slice(0, mid).join('').trimEnd()}…`, size, bold) <= maxWidth) lo = mid;
    else hi = mid - 1;
  }
  return lo === 0 ? '' : `${chars.slice(0, lo).join('').trimEnd()}…`;
}
