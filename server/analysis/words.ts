/** Plain-word number formats the analysis writes into sentences (the report layer has its own for tables). */

/** A probability as a whole percentage; a positive one below 0.5 % reads "< 1 %", never "0 %". */
export function percent(p: number): string {
  return p > 0 && p < 0.005 ? '< 1 %' : `${Math.round(100 * p)} %`;
}
