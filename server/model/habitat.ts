import type { Habitat, PointScenario } from './scenario.ts';

type PointPest = PointScenario['pest'];

/** Coefficients of one habitat for a given pest. */
export interface HabitatCoefficients {
  /** Diffusion coefficient D [km²/yr]. */
  diffusion: number;
  /**
   * Edge attractiveness w (host forest = 1). At an edge between habitats i and j an insect steps into i
   * with probability w_i / (w_i + w_j); for host/clearing this is the edge preference alpha.
   */
  edgeWeight: number;
  /** Residence index rho = w / D [yr/km²]: density jumps by rho_R / rho_L across an edge. */
  residence: number;
  /** True for host forest (growth and host depletion apply). */
  host: boolean;
  /** Per-capita mortality where there is no host [1/yr] (0 for host forest: growth form applies). */
  mortality: number;
}

/**
 * Maps a habitat to movement, edge behaviour and mortality.
 *
 * @remarks
 * Edge rule (Ovaskainen & Cornell 2003; Maciel & Lutscher 2013): with alpha the probability of stepping
 * into the left habitat, `u_R/u_L = ((1 − alpha)/alpha)·(D_L/D_R)`. Writing `rho = w/D` with
 * `w_host = 1`, `w_open = (1 − alpha_open)/alpha_open`, `w_nonhost = (1 − alpha_nonhost)/alpha_nonhost`
 * makes every pairwise jump `rho_R/rho_L`, consistent for all three habitat pairs. The clearing /
 * non-host forest edge follows from the two weights (alpha = w_open/(w_open + w_nonhost)).
 */
export function habitatCoefficients(pest: PointPest, habitat: Habitat): HabitatCoefficients {
  switch (habitat) {
    case 'host-forest':
      return { diffusion: pest.diffusionHost, edgeWeight: 1, residence: 1 / pest.diffusionHost, host: true, mortality: 0 };
    case 'clearing': {
      const a = pest.edgePreferenceOpen;
      const w = (1 - a) / a;
      return { diffusion: pest.diffusionOpen, edgeWeight: w, residence: w / pest.diffusionOpen, host: false, mortality: pest.mortalityOpen };
    }
    case 'non-host-forest': {
      const d = pest.diffusionNonHost ?? pest.diffusionHost;
      const a = pest.edgePreferenceNonHost ?? 0.5;
      const w = (1 - a) / a;
      return { diffusion: d, edgeWeight: w, residence: w / d, host: false, mortality: pest.mortalityNonHost ?? 0 };
    }
  }
}

/** Density ratio u_right / u_left at an edge between two habitats (the jump condition). */
export function jumpRatio(pest: PointPest, left: Habitat, right: Habitat): number {
  return habitatCoefficients(pest, right).residence / habitatCoefficients(pest, left).residence;
}
