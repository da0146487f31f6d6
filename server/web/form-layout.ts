/**
 * The scenario form as flat text: every input's name is the scenario field path it edits
 * (`pest.growth.rate`, `transect.segments[2].lengthKm`), so validation problems from the scenario schema
 * land beside the right input and the text the user typed is kept exactly when the page is shown again.
 *
 * A field that may be a distribution has extra inputs `<path>~kind` (value | uniform | triangular |
 * lognormal) and `<path>~min`, `~mode`, `~max`, `~median`, `~spread`.
 *
 * This module defines the form (its sections, row tables and choices); the codec lives beside it and imports
 * it: form-write.ts (scenario → form text), form-read.ts (form text → scenario object), form-number.ts
 * (numbers as typed), form-rows.ts (row buttons, body limits); form-state.ts hands all of them on in one
 * import. It never validates (parseScenario does).
 */
import { FIELDS } from '../model/fields.ts';
import { DISTRIBUTION_KINDS } from '../model/quantity.ts';

/** Input name → text as typed. */
export type FormState = Record<string, string>;

export type QuantityKind = 'value' | (typeof DISTRIBUTION_KINDS)[number];
export const QUANTITY_KINDS: readonly QuantityKind[] = ['value', ...DISTRIBUTION_KINDS];
/** Inputs of each distribution kind, in the order shown. */
export const DIST_PARTS: Record<Exclude<QuantityKind, 'value'>, readonly string[]> = {
  uniform: ['min', 'max'],
  triangular: ['min', 'mode', 'max'],
  lognormal: ['median', 'spread'],
};
export const ALL_DIST_PARTS = ['min', 'mode', 'max', 'median', 'spread'] as const;

export type InputKind = 'text' | 'textarea' | 'number' | 'numberList' | 'quantity' | 'select' | 'checkbox';

/** An input is used only when another input of the form has one of these values (all conditions must hold). */
export interface Condition {
  input: string;
  values: readonly string[];
}

/** One input of the form, by its path relative to its group (or to a row). */
export interface FormFieldDef {
  path: string;
  kind: InputKind;
  /** Key in FIELDS for label, unit, range and help (number and quantity inputs). */
  field?: keyof typeof FIELDS;
  /** A movement rate that may also be typed as a typical distance moved per year (form-read.ts converts it). */
  distanceInput?: true;
  label?: string;
  help?: string;
  choices?: readonly { value: string; label: string }[];
  /** Only used when these conditions hold (growth inputs of one growth form, the ensemble settings, ...). */
  showWhen?: readonly Condition[];
  /** Only used for these habitats (segment columns). */
  habitats?: readonly string[];
  /** A switch of the form itself (not a scenario field): checked when the scenario has this block. */
  switchFor?: string;
  /** Text put in the input when the scenario leaves the field out (a block's documented defaults). */
  prefill?: string;
  /** A select whose values 'true' / 'false' stand for a yes/no field ('' leaves it out: its default applies). */
  booleanChoice?: boolean;
}

/** A table of rows (segments, sites, options) edited with add/remove/reorder buttons. */
export interface RowGroupDef {
  key: 'segments' | 'sites' | 'options' | 'kernel' | 'mosaics';
  prefix: string;
  columns: FormFieldDef[];
  /** Text of each input in a new row. */
  newRow: (index: number) => FormState;
  /** Most rows allowed (mirrors the schema limit). */
  maxRows: number;
  /** Only used when these conditions hold. */
  showWhen?: readonly Condition[];
}

export const HABITAT_CHOICES = [
  { value: 'host-forest', label: 'Host forest' },
  { value: 'clearing', label: 'Clearing (open, no host)' },
  { value: 'non-host-forest', label: 'Non-host forest' },
] as const;

export const COVER_CHOICES = [
  { value: 'clearing', label: 'Left open (clearing)' },
  { value: 'non-host-forest', label: 'Replanted with non-host trees' },
] as const;

export const GROWTH_CHOICES = [
  { value: 'logistic', label: 'Logistic (no Allee effect)' },
  { value: 'allee-cubic', label: 'Strong Allee effect (cubic)' },
  { value: 'mate-finding', label: 'Breeding on hosts with mate finding' },
] as const;

export const MATING_CHOICES = [
  { value: 'none', label: 'No mate limitation' },
  { value: 'saturating', label: 'Saturating (half success at the mate-finding scale)' },
  { value: 'exponential', label: 'Exponential (63 % success at the mate-finding scale)' },
] as const;

export const MEASURE_CHOICES = [
  { value: '', label: 'yes (default)' },
  { value: 'false', label: 'no, dispersion relation only' },
  { value: 'true', label: 'yes' },
] as const;

export const KERNEL_CHOICES = [
  { value: 'exponential', label: 'Exponential, by its mean distance' },
  { value: 'table', label: 'My own table of distances (rows below)' },
] as const;

/** Condition: a switch of the form is ticked. */
function ON(input: string): Condition[] {
  return [{ input, values: ['on'] }];
}

/** True when every condition of an input holds for the form as typed. */
export function applies(showWhen: readonly Condition[] | undefined, state: FormState): boolean {
  return (showWhen ?? []).every((c) => c.values.includes(state[c.input] ?? ''));
}

export const END_CHOICES = [
  { value: 'reflecting', label: 'Closed (no insect leaves)' },
  { value: 'absorbing', label: 'Lethal surroundings (insects leaving are lost)' },
] as const;

/** The form's plain (non-row) inputs, in page order, by section. */
export const FORM_SECTIONS: readonly { id: string; title: string; intro?: string; fields: FormFieldDef[] }[] = [
  {
    id: 'about',
    title: 'About this scenario',
    fields: [
      { path: 'title', kind: 'text', label: 'Title', help: 'A short name for the scenario, shown on every result.' },
      { path: 'description', kind: 'textarea', label: 'Description', help: 'What the scenario is for; printed with results.' },
      { path: 'region', kind: 'text', label: 'Region', help: 'Where the transect lies (free text).' },
    ],
  },
  {
    id: 'pest',
    title: 'Pest profile',
    intro:
      'How the insect moves, breeds, dies and kills host trees. Any number marked “may be uncertain” can also be given as a range ' +
      '(a distribution); a single run uses its central value.',
    fields: [
      { path: 'pest.name', kind: 'text', label: 'Pest name', help: 'Name of the pest or of the profile used.' },
      { path: 'pest.illustrative', kind: 'checkbox', label: 'Illustrative values', help: 'Tick when the numbers are made up for a demonstration; every output then says so.' },
      { path: 'pest.notes', kind: 'textarea', label: 'Notes on the profile', help: 'Where the numbers come from.' },
      { path: 'pest.diffusionHost', kind: 'quantity', field: 'diffusionHost', distanceInput: true },
      { path: 'pest.diffusionOpen', kind: 'quantity', field: 'diffusionOpen', distanceInput: true },
      { path: 'pest.edgePreferenceOpen', kind: 'quantity', field: 'edgePreferenceOpen' },
      { path: 'pest.mortalityOpen', kind: 'quantity', field: 'mortalityOpen' },
      { path: 'pest.hostKillRate', kind: 'quantity', field: 'hostKillRate' },
      { path: 'pest.growth.form', kind: 'select', label: 'Growth form', choices: GROWTH_CHOICES, help: 'How the local population grows in host forest.' },
      { path: 'pest.growth.rate', kind: 'quantity', field: 'growthRate', showWhen: [{ input: 'pest.growth.form', values: ['logistic', 'allee-cubic'] }] },
      { path: 'pest.growth.alleeThreshold', kind: 'quantity', field: 'alleeThreshold', showWhen: [{ input: 'pest.growth.form', values: ['allee-cubic'] }] },
      { path: 'pest.growth.birthRate', kind: 'quantity', field: 'birthRate', showWhen: [{ input: 'pest.growth.form', values: ['mate-finding'] }] },
      { path: 'pest.growth.deathRate', kind: 'quantity', field: 'deathRate', showWhen: [{ input: 'pest.growth.form', values: ['mate-finding'] }] },
      { path: 'pest.growth.crowding', kind: 'quantity', field: 'crowding', showWhen: [{ input: 'pest.growth.form', values: ['mate-finding'] }] },
      {
        path: 'pest.growth.mating',
        kind: 'select',
        label: 'Mate finding',
        choices: MATING_CHOICES,
        showWhen: [{ input: 'pest.growth.form', values: ['mate-finding'] }],
        help: 'How the chance of finding a mate falls at low density.',
      },
      {
        path: 'pest.growth.mateScale',
        kind: 'quantity',
        field: 'mateScale',
        showWhen: [
          { input: 'pest.growth.form', values: ['mate-finding'] },
          { input: 'pest.growth.mating', values: ['saturating', 'exponential'] },
        ],
      },
    ],
  },
  {
    id: 'nonhost',
    title: 'Non-host forest (needed only when the layout or an option has non-host forest)',
    fields: [
      { path: 'pest.diffusionNonHost', kind: 'quantity', field: 'diffusionNonHost', distanceInput: true },
      { path: 'pest.edgePreferenceNonHost', kind: 'quantity', field: 'edgePreferenceNonHost' },
      { path: 'pest.mortalityNonHost', kind: 'quantity', field: 'mortalityNonHost' },
    ],
  },
  {
    id: 'transect',
    title: 'Transect',
    intro: 'The transect runs along the direction of spread. Segments follow one another without gaps, from the origin.',
    fields: [
      { path: 'transect.originKm', kind: 'number', field: 'positionKm', label: 'Origin (start of the first segment)' },
      { path: 'transect.ends.left', kind: 'select', label: 'Left end', choices: END_CHOICES, help: 'What happens to insects reaching the start of the transect.' },
      { path: 'transect.ends.right', kind: 'select', label: 'Right end', choices: END_CHOICES, help: 'What happens to insects reaching the end of the transect.' },
    ],
  },
  {
    id: 'infestation',
    title: 'Current infestation',
    fields: [
      { path: 'infestation.fromKm', kind: 'number', field: 'positionKm', label: 'Infested from' },
      { path: 'infestation.toKm', kind: 'number', field: 'positionKm', label: 'Infested to' },
      { path: 'infestation.density', kind: 'number', field: 'infestedDensity' },
    ],
  },
  {
    id: 'barrier',
    title: 'Barrier options',
    intro: 'Each option cuts a host-free strip into the baseline layout; the evaluation compares each option with the baseline.',
    fields: [
      { path: 'barrier.lengthKm', kind: 'number', field: 'barrierLengthKm' },
      { path: 'barrier.costPerStem', kind: 'number', field: 'costPerStem' },
      { path: 'barrier.costUnit', kind: 'text', label: 'Cost unit', help: 'Currency or unit printed next to costs, e.g. “credits” (optional).' },
      { path: 'barrier.toleranceM', kind: 'number', field: 'widthToleranceM' },
      {
        path: 'barrier.curveWidthsM',
        kind: 'numberList',
        field: 'widthM',
        label: 'Widths for the delay curve',
        help: 'Clearing widths at which the delay (or pinning) is computed, separated by commas. Leave empty for five widths up to twice each option’s width (or 1.5 × the width at which the front stops, if larger).',
      },
    ],
  },
  {
    id: 'run',
    title: 'Run settings',
    fields: [
      { path: 'horizonYears', kind: 'number', field: 'horizonYears' },
      { path: 'detectionLevel', kind: 'number', field: 'detectionLevel' },
      { path: 'numerics.cellM', kind: 'number', field: 'cellM' },
      { path: 'numerics.stepYears', kind: 'number', field: 'stepYears' },
      { path: 'numerics.tolerance', kind: 'number', field: 'tolerance' },
    ],
  },
  {
    id: 'uncertainty',
    title: 'Uncertainty: an ensemble over the ranges',
    intro:
      'Draws every number given as a range (Latin hypercube sampling) and reports probabilities, quantiles and which ' +
      'parameters matter most. Without ranges the ensemble is one draw. Large ensembles take minutes.',
    fields: [
      { path: '_uncertainty', kind: 'checkbox', label: 'Run an ensemble', switchFor: 'uncertainty', help: 'Adds an ensemble over the uncertain parameters to the evaluation.' },
      { path: 'uncertainty.draws', kind: 'number', field: 'ensembleDraws', showWhen: ON('_uncertainty'), prefill: '1000' },
      { path: 'uncertainty.seed', kind: 'number', field: 'ensembleSeed', showWhen: ON('_uncertainty'), prefill: '1' },
      { path: 'uncertainty.targetStandardError', kind: 'number', field: 'targetStandardError', showWhen: ON('_uncertainty'), prefill: '0.02' },
      { path: 'uncertainty.resolutionFactor', kind: 'number', field: 'ensembleResolutionFactor', showWhen: ON('_uncertainty') },
      {
        path: 'uncertainty.criticalWidth',
        kind: 'checkbox',
        label: 'Critical width in every draw',
        help: 'Searches the critical width of each option in every draw (the costly part of an ensemble).',
        showWhen: ON('_uncertainty'),
        prefill: 'on',
      },
    ],
  },
  {
    id: 'transport',
    title: 'People carrying the pest past the clearing',
    intro:
      'Infested firewood, logs, nursery stock and vehicles can carry the pest far beyond any clearing. Describe this ' +
      'traffic to see how likely it is to bypass each option; movement controls set by the regulator are the tool against it.',
    fields: [
      { path: '_transport', kind: 'checkbox', label: 'Include human-carried introductions', switchFor: 'transport', help: 'Adds the bypass-risk estimate to the evaluation.' },
      { path: 'transport.ratePerKm2Year', kind: 'quantity', field: 'transportRate', showWhen: ON('_transport') },
      { path: 'transport.establishmentProbability', kind: 'quantity', field: 'establishmentProbability', showWhen: ON('_transport') },
      { path: 'transport.forwardShare', kind: 'number', field: 'forwardShare', showWhen: ON('_transport'), prefill: '0.5' },
      { path: 'transport.bandWidthKm', kind: 'number', field: 'bandWidthKm', showWhen: ON('_transport') },
      {
        path: 'transport.kernel.shape',
        kind: 'select',
        label: 'Transport distances',
        choices: KERNEL_CHOICES,
        help: 'How far introductions travel: an exponential distribution by its mean, or your own table of distances.',
        showWhen: ON('_transport'),
        prefill: 'exponential',
      },
      { path: 'transport.kernel.meanKm', kind: 'quantity', field: 'transportMeanKm', showWhen: [...ON('_transport'), { input: 'transport.kernel.shape', values: ['exponential'] }] },
    ],
  },
];

export const ROW_GROUPS: Record<RowGroupDef['key'], RowGroupDef> = {
  segments: {
    key: 'segments',
    prefix: 'transect.segments',
    maxRows: 500,
    columns: [
      { path: 'habitat', kind: 'select', label: 'Habitat', choices: HABITAT_CHOICES, help: 'Host forest (the pest breeds here), open clearing, or forest of species the pest cannot use.' },
      { path: 'name', kind: 'text', label: 'Name', help: 'Optional name of the stand or stretch.' },
      { path: 'lengthKm', kind: 'number', field: 'lengthKm' },
      { path: 'stocking', kind: 'quantity', field: 'stocking', habitats: ['host-forest'] },
      { path: 'stemsPerHa', kind: 'quantity', field: 'stemsPerHa', habitats: ['host-forest'] },
    ],
    newRow: () => ({
      habitat: 'host-forest',
      name: '',
      lengthKm: '',
      stocking: String(FIELDS.stocking.defaultValue),
      'stocking~kind': 'value',
      stemsPerHa: String(FIELDS.stemsPerHa.defaultValue),
      'stemsPerHa~kind': 'value',
    }),
  },
  sites: {
    key: 'sites',
    prefix: 'sites',
    maxRows: 50,
    columns: [
      { path: 'name', kind: 'text', label: 'Site', help: 'A place to protect (village, orchard, reserve).' },
      { path: 'atKm', kind: 'number', field: 'positionKm', label: 'At' },
    ],
    newRow: () => ({ name: '', atKm: '' }),
  },
  options: {
    key: 'options',
    prefix: 'barrier.options',
    maxRows: 8,
    columns: [
      { path: 'name', kind: 'text', label: 'Option', help: 'A short name for this option.' },
      { path: 'fromKm', kind: 'number', field: 'positionKm', label: 'Starts at' },
      { path: 'widthM', kind: 'number', field: 'widthM' },
      { path: 'cover', kind: 'select', label: 'Ground after cutting', choices: COVER_CHOICES, help: 'Whether the strip is left open or replanted with trees the pest cannot use.' },
    ],
    newRow: (index) => ({ name: `Option ${index + 1}`, fromKm: '', widthM: '', cover: 'clearing' }),
  },
  mosaics: {
    key: 'mosaics',
    prefix: 'mosaics',
    maxRows: 6,
    columns: [
      { path: 'name', kind: 'text', label: 'Pattern', help: 'A short name for this thinning pattern.' },
      { path: 'forestM', kind: 'number', field: 'widthM', label: 'Forest strip', help: 'Width of each host-forest strip along the direction of spread.' },
      { path: 'gapM', kind: 'number', field: 'widthM', label: 'Host-free strip', help: 'Width of each host-free strip between them.' },
      { path: 'cover', kind: 'select', label: 'Host-free strips are', choices: COVER_CHOICES, help: 'Left open, or replanted with trees the pest cannot use.' },
      { path: 'stocking', kind: 'number', field: 'stocking', label: 'Stocking of the forest strips', help: 'Share of a fully stocked host stand in the forest strips (1 when left empty).' },
      {
        path: 'measure',
        kind: 'select',
        booleanChoice: true,
        label: 'Also simulate',
        choices: MEASURE_CHOICES,
        help: 'Besides the speed from the dispersion relation, simulate a long pattern and measure the speed (the default).',
      },
    ],
    newRow: (index) => ({ name: `Pattern ${index + 1}`, forestM: '', gapM: '', cover: 'clearing', stocking: '', measure: '' }),
  },
  kernel: {
    key: 'kernel',
    prefix: 'transport.kernel.points',
    maxRows: 200,
    showWhen: [
      { input: '_transport', values: ['on'] },
      { input: 'transport.kernel.shape', values: ['table'] },
    ],
    columns: [
      { path: 'distanceKm', kind: 'number', field: 'transportDistanceKm' },
      { path: 'shareBeyond', kind: 'number', field: 'shareBeyond' },
    ],
    newRow: (index) => (index === 0 ? { distanceKm: '0', shareBeyond: '1' } : { distanceKm: '', shareBeyond: '' }),
  },
};

/** Name of the hidden input carrying scenario settings this form does not show (kept unchanged). */
export const EXTRA_INPUT = '_extra';
