/**
 * People carrying the pest past a band on the map: long-distance introductions from the infested forest that
 * land in host forest behind the band and found a colony there.
 *
 * Stratified-dispersal view (Shigesada, Kawasaki & Takeda 1995, Am. Nat. 146(2):229–251), as for transects
 * (server/analysis/bypass/bypass.ts): introductions start as a Poisson process at rate σ per km² of infested
 * forest per year; on a map each travels a kernel distance (survival S(r) = P(distance > r)) in a uniformly
 * random direction and founds a colony with probability p. Poisson thinning leaves a Poisson process, so the
 * number of colonies founded behind the band by year T is Poisson with mean
 *
 *   Λ(T) = σ p ∫_0^T ∫_{x infested, not behind} ∫_{y host, behind, not yet infested} k(|x − y|) dy dx dt,
 *
 * k(r) = f(r) / (2π r) the landing density per unit area of an isotropic kernel with distance density
 * f = −S′, and P(at least one by T) = 1 − e^(−Λ(T)). "Behind the band" is the protected side: host cells whose
 * straight line from the infestation's centre crosses a band cell (cells past the band's ends are not behind:
 * natural spread reaches them around the ends).
 *
 * Discretisation (own, checked against the exponential kernel's closed form and a Monte Carlo simulation of
 * the introductions in tests/analysis/landscape/transport.test.ts): cells are summed into square blocks of
 * side s; the share of trips from block b landing in the target cells of block d at centre distance r ≥ s is
 * (S(r − s/2) − S(r + s/2)) · A_d / (2π r s) (the annulus the block spans, spread evenly over angle), within
 * a block (1 − S(s/√π)) · A_d / s² (the disc of the block's area). The infested area is taken at the middle
 * of time slices of at most 0.25 yr.
 */
import type { SurvivalKernel } from '../bypass/bypass.ts';
import { infestationCentre } from './paths.ts';

export interface MapTransportInput {
  nx: number;
  ny: number;
  cellKm: number;
  /** 1 for host cells. */
  hostAtCells: Uint8Array;
  /** 1 for band cells of the option. */
  bandAtCells: Uint8Array;
  /** First year at the detection level per cell (NaN: never), from the option's run. */
  detected: Float32Array;
  /** Infestation at the start (its density-weighted centre is where "behind" is seen from). */
  u0: Float64Array;
  /** Share of each cell infested at the start, before the band is cut (band cells inside it cast no shadow). */
  infestedAtCells: ArrayLike<number>;
  horizonYears: number;
  /** σ [introductions per km² of infested forest per year] and p [share that found a colony]. */
  ratePerKm2Year: number;
  establishmentProbability: number;
  kernel: SurvivalKernel;
  /** Block side [km] (default: the cell, at least 1/40 of the map's longer side). */
  blockKm?: number;
}

export interface MapTransportRisk {
  /** Expected colonies founded behind the band by the horizon, Λ(T). */
  expectedColonies: number;
  /** P(at least one by the horizon) = 1 − e^(−Λ(T)). */
  probability: number;
  /** First year at which the probability reaches 50 % (null: not within the horizon). */
  halfYears: number | null;
  /** Year by year (end of each year): P(at least one colony by then). */
  byYear: { years: number; probability: number }[];
  blockKm: number;
  /** Host area behind the band [km²]. */
  behindKm2: number;
}

/**
 * 1 for host cells behind the band as seen from the infestation's centre (an angular sweep over the band
 * cells). Band cells cut through the infestation itself shield nothing: the pest is on both sides of them.
 */
export function behindBand(nx: number, ny: number, hostAtCells: Uint8Array, bandAtCells: Uint8Array, u0: Float64Array, infestedAtCells?: ArrayLike<number>): Uint8Array {
  const out = new Uint8Array(nx * ny);
  const centre = infestationCentre(nx, u0);
  if (!centre) return out;
  // Cell centres at (col + 0.5, row + 0.5) below.
  const cx = centre.col + 0.5;
  const cy = centre.row + 0.5;
  // Nearest band distance per angular bin; a band cell covers the bins of the angle it subtends (its
  // half-diagonal at its distance).
  const BINS = 8192;
  const nearest = new Float64Array(BINS).fill(Infinity);
  const binOf = (a: number) => ((Math.floor(((a + Math.PI) / (2 * Math.PI)) * BINS) % BINS) + BINS) % BINS;
  for (let k = 0; k < bandAtCells.length; k++) {
    if (!bandAtCells[k] || (infestedAtCells && infestedAtCells[k] > 0)) continue;
    const dx = (k % nx) + 0.5 - cx;
    const dy = Math.floor(k / nx) + 0.5 - cy;
    const d = Math.hypot(dx, dy);
    // A band cell at the infestation's centre casts no shadow (it would put the whole map behind).
    if (d < 1) continue;
    const a = Math.atan2(dy, dx);
    const half = Math.asin(Math.min(1, 0.7072 / d));
    const b0 = Math.floor(((a - half + Math.PI) / (2 * Math.PI)) * BINS);
    const b1 = Math.floor(((a + half + Math.PI) / (2 * Math.PI)) * BINS);
    for (let b = b0; b <= b1; b++) {
      const i = ((b % BINS) + BINS) % BINS;
      if (d < nearest[i]) nearest[i] = d;
    }
  }
  for (let k = 0; k < out.length; k++) {
    if (!hostAtCells[k] || bandAtCells[k]) continue;
    const dx = (k % nx) + 0.5 - cx;
    const dy = Math.floor(k / nx) + 0.5 - cy;
    if (Math.hypot(dx, dy) > nearest[binOf(Math.atan2(dy, dx))]) out[k] = 1;
  }
  return out;
}

export function mapTransportRisk(t: MapTransportInput): MapTransportRisk {
  const { nx, ny, cellKm, detected } = t;
  const behind = behindBand(nx, ny, t.hostAtCells, t.bandAtCells, t.u0, t.infestedAtCells);
  const cellsPerBlock = Math.max(1, Math.round((t.blockKm ?? Math.max(cellKm, (Math.max(nx, ny) * cellKm) / 40)) / cellKm));
  const s = cellsPerBlock * cellKm;
  const bx = Math.ceil(nx / cellsPerBlock);
  const by = Math.ceil(ny / cellsPerBlock);
  const nb = bx * by;
  const blockOf = new Int32Array(nx * ny);
  for (let k = 0; k < blockOf.length; k++) blockOf[k] = Math.floor(Math.floor(k / nx) / cellsPerBlock) * bx + Math.floor((k % nx) / cellsPerBlock);
  // Share of trips from block b that land per km² of block d (both at their centres).
  const S = t.kernel.survival;
  const perKm2 = new Float64Array(nb * nb);
  for (let b = 0; b < nb; b++) {
    for (let d = 0; d < nb; d++) {
      const r = s * Math.hypot((b % bx) - (d % bx), Math.floor(b / bx) - Math.floor(d / bx));
      perKm2[b * nb + d] = r < 0.5 * s ? (1 - S(s / Math.sqrt(Math.PI))) / (s * s) : (S(r - 0.5 * s) - S(r + 0.5 * s)) / (2 * Math.PI * r * s);
    }
  }
  const cellKm2 = cellKm * cellKm;
  let behindKm2 = 0;
  for (let k = 0; k < behind.length; k++) if (behind[k]) behindKm2 += cellKm2;
  const slices = Math.max(1, Math.ceil(t.horizonYears / 0.25));
  const dt = t.horizonYears / slices;
  const src = new Float64Array(nb);
  const tgt = new Float64Array(nb);
  let lambda = 0;
  const byYear: MapTransportRisk['byYear'] = [];
  let halfYears: number | null = null;
  const sp = t.ratePerKm2Year * t.establishmentProbability;
  for (let i = 0; i < slices; i++) {
    const tm = (i + 0.5) * dt;
    src.fill(0);
    tgt.fill(0);
    for (let k = 0; k < detected.length; k++) {
      const infested = detected[k] <= tm; // NaN (never) compares false
      if (!t.hostAtCells[k]) continue;
      if (infested && !behind[k]) src[blockOf[k]] += cellKm2;
      else if (!infested && behind[k]) tgt[blockOf[k]] += cellKm2;
    }
    let rate = 0;
    for (let b = 0; b < nb; b++) {
      if (src[b] === 0) continue;
      let sum = 0;
      const row = b * nb;
      for (let d = 0; d < nb; d++) if (tgt[d] !== 0) sum += perKm2[row + d] * tgt[d];
      rate += src[b] * sum;
    }
    const before = lambda;
    lambda += sp * rate * dt;
    const pBefore = 1 - Math.exp(-before);
    const pNow = 1 - Math.exp(-lambda);
    if (halfYears === null && pNow >= 0.5) halfYears = i * dt + (pNow > pBefore ? ((0.5 - pBefore) / (pNow - pBefore)) * dt : dt);
    const end = (i + 1) * dt;
    if (Math.abs(end - Math.round(end)) < 1e-9 || i === slices - 1) byYear.push({ years: end, probability: pNow });
  }
  return { expectedColonies: lambda, probability: 1 - Math.exp(-lambda), halfYears, byYear, blockKm: s, behindKm2 };
}
