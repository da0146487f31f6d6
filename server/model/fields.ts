/**
 * Every physical number a user can set: label, unit, allowed range, typical range, help text and the
 * source of its default. The zod schemas, the scenario form and the briefing's parameter table all
 * read from here, so a range is written once.
 *
 * Longer than 400 lines on purpose: it is the one table of every user-settable number, so that each range,
 * unit and help text is written once (one entry per field, no logic beyond the range checks).
 */
export interface FieldSpec {
  /** Short label for forms and tables. */
  readonly label: string;
  /** Unit as printed (SI-like, with ² and ⁻¹ where needed); '' for dimensionless. */
  readonly unit: string;
  /** Smallest allowed value. */
  readonly min: number;
  /** True when `min` itself is not allowed. */
  readonly minExclusive?: boolean;
  /** Largest allowed value. */
  readonly max: number;
  readonly maxExclusive?: boolean;
  /** Range usually seen in practice, as text. */
  readonly typical: string;
  /** What the number means, in plain words. */
  readonly help: string;
  /** Value used when the field is left out (undefined: the field is required). */
  readonly defaultValue?: number;
  /** Where the default or the typical range comes from. */
  readonly source: string;
  /** Whether the field may be given as a distribution instead of a value. */
  readonly uncertain?: boolean;
}

/** Human-readable allowed range, e.g. "> 0 and ≤ 1000 km²/yr". */
export function describeRange(spec: FieldSpec): string {
  const lo = `${spec.minExclusive ? '>' : '≥'} ${spec.min}`;
  const hi = Number.isFinite(spec.max) ? ` and ${spec.maxExclusive ? '<' : '≤'} ${spec.max}` : '';
  return `${lo}${hi}${spec.unit ? ` ${spec.unit}` : ''}`;
}

/** True when v lies in the field's allowed range. */
export function inRange(spec: FieldSpec, v: number): boolean {
  if (!Number.isFinite(v)) return false;
  if (spec.minExclusive ? v <= spec.min : v < spec.min) return false;
  if (spec.maxExclusive ? v >= spec.max : v > spec.max) return false;
  return true;
}

const SPREAD_NOTE =
  'Back-calculated from natural spread of a few hundred m/yr to a few km/yr for wood-boring beetles via ' +
  'c = 2√(rD) (Fisher 1937; common practice, no source for the spread range)';

export const FIELDS = {
  diffusionHost: {
    label: 'Movement in host forest',
    unit: 'km²/yr',
    min: 0,
    minExclusive: true,
    max: 1000,
    typical: '0.001–12',
    help: 'How far adults spread out in host forest (diffusion coefficient D). Typical distance an insect moves in a year along the transect ≈ √(2·D·1 yr) (root-mean-square displacement of a random walk): D = 0.5 km²/yr ≈ 1 km, D = 2 ≈ 2 km. From a distance d in km per year: D = d²/2 (or choose “km per year” beside the box and type the distance). Spread speed in intact forest is about 2√(r·D).',
    defaultValue: 0.5,
    source: SPREAD_NOTE,
    uncertain: true,
  },
  diffusionOpen: {
    label: 'Movement in the open (clearing)',
    unit: 'km²/yr',
    min: 0,
    minExclusive: true,
    max: 1000,
    typical: '0.001–50',
    help: 'How far adults spread out on host-free open ground (diffusion coefficient D). Many insects move faster and straighter where there is no host. Typical distance an insect moves in a year along the transect ≈ √(2·D·1 yr) (root-mean-square displacement of a random walk): D = 0.5 km²/yr ≈ 1 km, D = 2 ≈ 2 km. From a distance d in km per year: D = d²/2 (or choose “km per year” beside the box and type the distance).',
    defaultValue: 0.5,
    source: 'Default equal to host forest (no behavioural change); set from field data where available (illustrative)',
    uncertain: true,
  },
  diffusionNonHost: {
    label: 'Movement in non-host forest',
    unit: 'km²/yr',
    min: 0,
    minExclusive: true,
    max: 1000,
    typical: '0.001–50',
    help: 'How far adults spread out in forest of species the pest cannot breed in (diffusion coefficient D). Typical distance an insect moves in a year along the transect ≈ √(2·D·1 yr) (root-mean-square displacement of a random walk): D = 0.5 km²/yr ≈ 1 km, D = 2 ≈ 2 km. From a distance d in km per year: D = d²/2 (or choose “km per year” beside the box and type the distance).',
    defaultValue: 0.5,
    source: 'Default equal to host forest (illustrative)',
    uncertain: true,
  },
  edgePreferenceOpen: {
    label: 'Edge preference, host forest vs open',
    unit: '',
    // Between 1e-6 and 1 − 1e-6: an edge weight (1 − a)/a beyond 1e6 either way is no longer an edge preference but a
    // wall, and at the float limit (a = 5e-324) the weight is infinite and the run turns into NaN.
    min: 1e-6,
    max: 0.999999,
    typical: '0.5–0.95',
    help:
      'Probability that an insect standing at a forest/open edge steps back into host forest. ' +
      '0.5 means no preference; values near 1 mean it rarely leaves the forest.',
    defaultValue: 0.5,
    source: 'No preference (0.5) unless observed; edge-choice random walk of Ovaskainen & Cornell (2003)',
    uncertain: true,
  },
  edgePreferenceNonHost: {
    label: 'Edge preference, host vs non-host forest',
    unit: '',
    // Between 1e-6 and 1 − 1e-6: an edge weight (1 − a)/a beyond 1e6 either way is no longer an edge preference but a
    // wall, and at the float limit (a = 5e-324) the weight is infinite and the run turns into NaN.
    min: 1e-6,
    max: 0.999999,
    typical: '0.5–0.9',
    help: 'Probability that an insect at a host/non-host forest edge steps into host forest.',
    defaultValue: 0.5,
    source: 'No preference (0.5) unless observed (illustrative)',
    uncertain: true,
  },
  growthRate: {
    label: 'Growth rate',
    unit: '1/yr',
    min: 0,
    minExclusive: true,
    max: 50,
    typical: '0.2–3',
    help: 'How fast a small population multiplies in fully stocked host forest, per insect and year (intrinsic growth rate r; logistic and cubic forms). 1 /yr: numbers grow about 2.7-fold a year while few.',
    defaultValue: 1,
    source: 'Illustrative; one generation per year or two for many wood-borers (common practice, no source)',
    uncertain: true,
  },
  alleeThreshold: {
    label: 'Density below which groups decline (Allee threshold)',
    unit: 'of capacity',
    min: 0,
    minExclusive: true,
    max: 1,
    maxExclusive: true,
    typical: '0.01–0.4',
    help:
      'Density (as a share of the capacity: the density fully stocked host forest can carry) below which a local group declines because mates are hard to find. ' +
      'Above 0.5 the pest retreats even in intact forest.',
    defaultValue: 0.1,
    source: 'Rarely measured; treat as uncertain (illustrative)',
    uncertain: true,
  },
  birthRate: {
    label: 'Reproduction per unit host',
    unit: '1/yr',
    min: 0,
    minExclusive: true,
    max: 50,
    typical: '0.5–5',
    help: 'New adults per insect and year when mates and hosts are plentiful (recruitment b; breeding-on-hosts form).',
    defaultValue: 2,
    source: 'Illustrative',
    uncertain: true,
  },
  deathRate: {
    label: 'Death rate in host forest',
    unit: '1/yr',
    min: 0,
    max: 50,
    typical: '0.2–2',
    help: 'Share of insects dying per year in host forest (death rate m; breeding-on-hosts form).',
    defaultValue: 1,
    source: 'Illustrative',
    uncertain: true,
  },
  crowding: {
    label: 'Crowding loss',
    unit: '1/yr',
    min: 0,
    max: 50,
    typical: '0–2',
    help: 'Extra deaths when insects are crowded, as a rate per year: the death rate each insect gains at full capacity (capacity: the most insects fully stocked host forest can carry), growing in proportion to density; e.g. 0.5 /yr means that at full capacity an insect is lost half a time per year more than at low density (competition for breeding sites; the term γ·u). 0 switches it off.',
    defaultValue: 0,
    source: 'Illustrative',
    uncertain: true,
  },
  mateScale: {
    label: 'Mate-finding scale',
    unit: 'of capacity',
    min: 0,
    minExclusive: true,
    max: 10,
    typical: '0.01–1',
    help: 'Density (share of capacity) at which half of the insects find a mate (saturating form), or 63 % (exponential form).',
    defaultValue: 0.1,
    source: 'Illustrative; mating functions of Dennis (1989) and McCarthy (1997)',
    uncertain: true,
  },
  hostKillRate: {
    label: 'Host-kill rate',
    unit: '1/yr',
    min: 0,
    max: 100,
    typical: '0–2',
    help: 'Share of host trees a full-capacity population kills per year (rate c in dh/dt = −c·u·h). 0 means hosts are not depleted.',
    defaultValue: 0.3,
    source: 'Illustrative; borers often kill a stand within a few years of arrival (common practice, no source)',
    uncertain: true,
  },
  mortalityOpen: {
    label: 'Mortality in the open',
    unit: '1/yr',
    min: 0,
    max: 1000,
    typical: '0.1–20',
    help: 'Per-capita death rate of insects in host-free open ground (exposure, predation, no food).',
    defaultValue: 2,
    source: 'Illustrative',
    uncertain: true,
  },
  mortalityNonHost: {
    label: 'Mortality in non-host forest',
    unit: '1/yr',
    min: 0,
    max: 1000,
    typical: '0.1–10',
    help: 'Per-capita death rate in forest the pest cannot breed in.',
    defaultValue: 1,
    source: 'Illustrative',
    uncertain: true,
  },
  stocking: {
    label: 'Host stocking',
    unit: 'of full stocking',
    min: 0,
    max: 1,
    typical: '0.2–1',
    help: 'Share of a fully stocked host stand present, from 0 to 1 (1 = fully stocked; unit: share of full stocking, e.g. 0.6 = 60 % of the host trees of a fully stocked stand). It sets the capacity there: the insect density the stand can carry, relative to fully stocked forest.',
    defaultValue: 1,
    source: 'Forest inventory',
    uncertain: true,
  },
  stemsPerHa: {
    label: 'Host stem density',
    unit: 'trees/ha',
    min: 0,
    max: 20000,
    typical: '100–1500',
    help: 'Host trees per hectare in this stretch (at full stocking, times the stocking); used to count the trees a clearing removes.',
    defaultValue: 400,
    source: 'Forest inventory; 400/ha is an illustrative mid-aged stand',
    uncertain: true,
  },
  lengthKm: {
    label: 'Length',
    unit: 'km',
    // 1 m: a shorter piece has no physical meaning on a transect in km, and near 1e-12 km the grid breakpoints merge.
    min: 0.001,
    max: 5000,
    typical: '0.05–100',
    help: 'Length of this stretch along the transect.',
    source: 'Map of the area',
  },
  positionKm: {
    label: 'Position',
    unit: 'km',
    min: -1e6,
    max: 1e6,
    typical: 'within the transect',
    help: 'Distance along the transect from its origin.',
    source: 'Map of the area',
  },
  infestedDensity: {
    label: 'Density in the infested stretch',
    unit: 'of capacity',
    min: 0,
    minExclusive: true,
    max: 10,
    typical: '0.1–1',
    help: 'Current insect density in the infested stretch, relative to the capacity of the stand there (1 = fully infested).',
    defaultValue: 1,
    source: 'Survey; 1 means the stretch is fully infested',
  },
  horizonYears: {
    label: 'Horizon',
    unit: 'yr',
    min: 0,
    minExclusive: true,
    max: 500,
    typical: '10–50',
    help: 'How many years ahead to simulate.',
    defaultValue: 30,
    source: 'Planning horizon of the programme',
  },
  detectionLevel: {
    label: 'Detection level',
    unit: 'of capacity',
    min: 0,
    minExclusive: true,
    max: 1,
    maxExclusive: true,
    typical: '0.001–0.1',
    help: 'Density at which a place counts as infested (front position, arrival times).',
    defaultValue: 0.01,
    source: 'Default 1 % of capacity (common practice, no source)',
  },
  cellM: {
    label: 'Cell size',
    unit: 'm',
    min: 0.5,
    max: 5000,
    typical: '10–200',
    help: 'Largest grid cell of the computation. Leave empty for the automatic choice (a tenth of the shortest distance over which density changes).',
    source: 'Automatic choice of this tool (a tenth of the shortest distance over which density changes; see the field guide)',
  },
  stepYears: {
    label: 'Time step',
    unit: 'yr',
    min: 1e-5,
    max: 1,
    typical: '0.005–0.1',
    help: 'Fixed time step of the computation, overriding the automatic error-controlled steps. Leave empty for the automatic choice.',
    source: 'Automatic choice of this tool (set by the fastest growth, host-kill and mortality rates)',
  },
  tolerance: {
    label: 'Time accuracy',
    unit: '',
    min: 1e-9,
    max: 1e-2,
    typical: '1e-6–1e-4',
    help: 'Relative accuracy per step of the automatic (error-controlled) time stepping; smaller is more accurate and slower. Ignored when a fixed time step is given.',
    defaultValue: 1e-5,
    source: 'Default 1e-5, chosen from the verification tables in DEVELOPERS.md (adaptive time integration)',
  },
  widthM: {
    label: 'Width',
    unit: 'm',
    // 1 m: a narrower clearing has no physical meaning, and near 1e-12 m its cells vanish in round-off.
    min: 1,
    max: 100000,
    typical: '50–2000',
    help: 'Width of the host-free clearing along the transect.',
    source: 'Option under study',
  },
  widthToleranceM: {
    label: 'Precision of the stopping width',
    unit: 'm',
    min: 0.1,
    max: 10000,
    typical: '5–50',
    help: 'The width at which the front stops (critical width) is narrowed down by full runs until it is known to within this many metres.',
    defaultValue: 10,
    source: 'Default 10 m, a fraction of usual felling precision (common practice, no source)',
  },
  barrierLengthKm: {
    label: 'Barrier length across the front',
    unit: 'km',
    min: 0,
    minExclusive: true,
    max: 10000,
    typical: '1–50',
    help: 'How long the clearing runs across the direction of spread; used to count trees removed.',
    defaultValue: 1,
    source: 'Option under study',
  },
  costPerStem: {
    label: 'Cost per host tree removed',
    unit: 'per tree',
    min: 0,
    max: 1e7,
    typical: 'programme rates',
    help: 'Optional cost of felling and disposing of one host tree (any currency; the briefing repeats the unit you give).',
    source: 'Programme contract rates',
  },
  transportRate: {
    label: 'Human-carried introductions',
    unit: 'per km² per yr',
    min: 0,
    max: 1000,
    typical: '0.0001–0.1',
    help:
      'Long-distance introductions (infested firewood, logs, nursery stock, vehicles) started per year from each km² of infested forest. ' +
      'Only a share of them travel towards the protected side and establish.',
    source: 'Stratified dispersal of Shigesada, Kawasaki & Takeda (1995); the rate is programme-specific (no default)',
    uncertain: true,
  },
  transportMeanKm: {
    label: 'Mean transport distance',
    unit: 'km',
    min: 0,
    minExclusive: true,
    max: 10000,
    typical: '1–200',
    help: 'Mean distance of a human-carried introduction (exponential distance kernel).',
    source: 'Movement surveys of wood products (programme data); illustrative where not known',
    uncertain: true,
  },
  transportDistanceKm: {
    label: 'Transport distance',
    unit: 'km',
    min: 0,
    max: 100000,
    typical: '0–500',
    help: 'A distance in the user table of the transport kernel.',
    source: 'Movement surveys of wood products (programme data)',
  },
  shareBeyond: {
    label: 'Share carried farther',
    unit: '',
    min: 0,
    max: 1,
    typical: '0–1',
    help: 'Share of introductions that travel farther than the distance on the same row of the kernel table.',
    source: 'Movement surveys of wood products (programme data)',
  },
  establishmentProbability: {
    label: 'Establishment probability',
    unit: '',
    min: 0,
    max: 1,
    typical: '0.01–0.5',
    help:
      'Chance that one introduction founds a lasting colony. With a strong Allee effect a small founding group usually fails, ' +
      'so this is lower when the Allee threshold is high.',
    source: 'Rarely measured; treat as uncertain (illustrative)',
    uncertain: true,
  },
  forwardShare: {
    label: 'Share heading towards the protected side',
    unit: '',
    min: 0,
    max: 1,
    typical: '0.5',
    help: 'Share of introductions carried towards the protected side of the barrier (0.5: no preferred direction).',
    defaultValue: 0.5,
    source: 'No preferred direction (0.5) unless traffic data say otherwise (common practice, no source)',
  },
  bandWidthKm: {
    label: 'Width of the infested band',
    unit: 'km',
    min: 0,
    minExclusive: true,
    max: 10000,
    typical: '1–50',
    help:
      'Width, across the direction of spread, of the forest band the transect stands for; infested area = infested length × this width. ' +
      'Defaults to the barrier length across the front.',
    source: 'Map of the area',
  },
  ensembleDraws: {
    label: 'Ensemble draws',
    unit: '',
    min: 2,
    max: 20000,
    typical: '200–5000',
    help: 'How many combinations of the uncertain values are run (draws spread evenly over the ranges: Latin hypercube).',
    defaultValue: 1000,
    source: 'Monte Carlo standard error of a probability is at most 0.5/√draws (0.016 at 1000)',
  },
  ensembleSeed: {
    label: 'Random seed',
    unit: '',
    min: 0,
    max: 4294967295,
    typical: 'any whole number',
    help: 'Seed of the random draws; the same seed gives the same ensemble on any machine and pool size.',
    defaultValue: 1,
    source: 'Reproducibility',
  },
  ensembleResolutionFactor: {
    label: 'Coarser grid for the draws (factor)',
    unit: '',
    min: 1,
    max: 4,
    typical: '1–3',
    help:
      'Ensemble draws run with cells and time steps this many times the automatic choice (the central-value runs keep the full resolution). ' +
      '3 makes draws about 5–8× faster than 1; its cost in accuracy is stated in the README (Performance). ' +
      'On a map the draws keep the central run\'s cells and this is the time step as a multiple of the transect rule (4 when left empty; a map run itself uses 2).',
    defaultValue: 3,
    source: 'Measured on the bench problems (README, Performance); 1 switches it off',
  },
  targetStandardError: {
    label: 'Target standard error',
    unit: '',
    min: 0,
    minExclusive: true,
    max: 0.5,
    typical: '0.005–0.05',
    help: 'Largest sampling error of a chance (Monte Carlo standard error, as a share) before the tool asks for more draws; 0.02 = ± 2 percentage points.',
    defaultValue: 0.02,
    source: 'Common practice, no source (±4 percentage points at about 95 % confidence)',
  },
} as const satisfies Record<string, FieldSpec>;

export type FieldName = keyof typeof FIELDS;
