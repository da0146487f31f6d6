/**
 * The scenario form as flat text: every input's name is the scenario field path it edits
 * (`pest.growth.rate`, `transect.segments[2].lengthKm`), so validation problems from the scenario schema
 * land beside the right input and the text the user typed is kept exactly when the page is shown again.
 *
 * A field that may be a distribution has extra inputs `<path>~kind` (value | uniform | triangular |
 * lognormal) and `<path>~min`, `~mode`, `~max`, `~median`, `~spread`.
 *
 * This module turns scenario objects into form text and back; it never validates (parseScenario does).
 */
import { FIELDS } from '../model/fields.ts';
import { DISTRIBUTION_KINDS, isDistribution } from '../model/quantity.ts';
import { valueAt, type Problem } from '../model/errors.ts';

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
      { path: 'pest.diffusionHost', kind: 'quantity', field: 'diffusionHost' },
      { path: 'pest.diffusionOpen', kind: 'quantity', field: 'diffusionOpen' },
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
      { path: 'pest.diffusionNonHost', kind: 'quantity', field: 'diffusionNonHost' },
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
      { path: 'uncertainty.resolutionFactor', kind: 'number', field: 'ensembleResolutionFactor', showWhen: ON('_uncertainty'), prefill: '3' },
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

// ---------------------------------------------------------------------------------------------
// Scenario object → form text

type Obj = Record<string, unknown>;

function toText(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  return String(v);
}

function writeField(state: FormState, name: string, def: FormFieldDef, v: unknown): void {
  switch (def.kind) {
    case 'quantity':
      if (isDistribution(v)) {
        state[`${name}~kind`] = v.dist;
        state[name] = '';
        for (const part of ALL_DIST_PARTS) state[`${name}~${part}`] = toText((v as Obj)[part]);
      } else {
        state[`${name}~kind`] = 'value';
        state[name] = toText(v);
      }
      return;
    case 'checkbox':
      state[name] = v === true ? 'on' : '';
      return;
    case 'numberList':
      state[name] = Array.isArray(v) ? v.map(toText).join(', ') : toText(v);
      return;
    case 'select':
      state[name] = def.booleanChoice && typeof v === 'boolean' ? String(v) : toText(v);
      return;
    default:
      state[name] = toText(v);
  }
}

/** Every path (relative to the scenario) that the form edits, for separating the settings it does not show. */
const KNOWN: Record<string, readonly string[]> = {
  '': [
    'version', 'title', 'description', 'region', 'pest', 'transect', 'infestation', 'sites', 'barrier', 'horizonYears',
    'detectionLevel', 'numerics', 'uncertainty', 'transport', 'mosaics',
  ],
  pest: [
    'name', 'illustrative', 'notes', 'diffusionHost', 'diffusionOpen', 'diffusionNonHost', 'edgePreferenceOpen',
    'edgePreferenceNonHost', 'growth', 'hostKillRate', 'mortalityOpen', 'mortalityNonHost',
  ],
  'pest.growth': ['form', 'rate', 'alleeThreshold', 'birthRate', 'deathRate', 'crowding', 'mating', 'mateScale'],
  transect: ['originKm', 'segments', 'ends'],
  'transect.ends': ['left', 'right'],
  infestation: ['fromKm', 'toKm', 'density'],
  barrier: ['lengthKm', 'costPerStem', 'costUnit', 'options', 'toleranceM', 'curveWidthsM'],
  numerics: ['cellM', 'stepYears'],
  uncertainty: ['draws', 'seed', 'targetStandardError', 'criticalWidth', 'resolutionFactor'],
  transport: ['ratePerKm2Year', 'kernel', 'establishmentProbability', 'forwardShare', 'bandWidthKm'],
  'transport.kernel': ['shape', 'meanKm', 'points'],
};

/** The parts of a scenario the form does not show (unknown keys at any object level the form owns). */
export function extraSettings(scenario: unknown): Obj {
  const out: Obj = {};
  const visit = (obj: unknown, at: string, into: Obj) => {
    if (obj === null || typeof obj !== 'object' || Array.isArray(obj)) return;
    for (const [k, v] of Object.entries(obj as Obj)) {
      const child = at ? `${at}.${k}` : k;
      if (!KNOWN[at]?.includes(k)) into[k] = v;
      else if (KNOWN[child]) {
        const sub: Obj = {};
        visit(v, child, sub);
        if (Object.keys(sub).length) into[k] = sub;
      }
    }
  };
  visit(scenario, '', out);
  return out;
}

/** Form text for a scenario (a file, a saved scenario or the new-scenario template). */
export function scenarioToForm(scenario: unknown): FormState {
  const state: FormState = {};
  for (const section of FORM_SECTIONS) {
    for (const def of section.fields) {
      if (def.switchFor) state[def.path] = valueAt(scenario, def.switchFor.split('.')) === undefined ? '' : 'on';
      else {
        const v = valueAt(scenario, def.path.split('.'));
        if (v === undefined && def.prefill !== undefined) state[def.path] = def.prefill;
        else writeField(state, def.path, def, v);
      }
    }
  }
  if (!state['pest.growth.mating']) state['pest.growth.mating'] = 'none';
  for (const key of ['transect.ends.left', 'transect.ends.right']) if (!state[key]) state[key] = 'reflecting';
  for (const group of Object.values(ROW_GROUPS)) {
    const rows = valueAt(scenario, group.prefix.split('.'));
    if (!Array.isArray(rows)) continue;
    rows.forEach((row, i) => {
      const defaults = group.newRow(i);
      for (const col of group.columns) {
        const name = `${group.prefix}[${i}].${col.path}`;
        const v = (row as Obj)?.[col.path];
        if (v === undefined && defaults[col.path] !== undefined) {
          state[name] = defaults[col.path];
          if (col.kind === 'quantity') state[`${name}~kind`] = 'value';
        } else writeField(state, name, col, v);
      }
    });
  }
  const extra = extraSettings(scenario);
  state[EXTRA_INPUT] = Object.keys(extra).length ? JSON.stringify(extra) : '';
  return state;
}

// ---------------------------------------------------------------------------------------------
// Form text → scenario object (unvalidated)

const NUMBER_TEXT = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Reads a number as typed: '' → undefined (field left out), a number → number, anything else is kept as
 * text so the schema reports it with the value and the allowed range. Accepts a decimal comma
 * ("0,5") and a typographic minus.
 */
export function readNumber(text: string | undefined): number | string | undefined {
  if (text === undefined) return undefined;
  let s = text.trim().replace(/\u2212/g, '-').replace(/[\u202f\u00a0 _]/g, '');
  if (s === '') return undefined;
  if (/^[+-]?\d*,\d+$/.test(s)) s = s.replace(',', '.');
  return NUMBER_TEXT.test(s) ? Number(s) : text.trim();
}

function readText(text: string | undefined): string | undefined {
  if (text === undefined) return undefined;
  const s = text.replace(/\r\n/g, '\n').trim();
  return s === '' ? undefined : s;
}

function readQuantity(state: FormState, name: string): unknown {
  const kind = state[`${name}~kind`] ?? 'value';
  if (kind === 'value' || !(kind in DIST_PARTS)) return readNumber(state[name]);
  const parts = DIST_PARTS[kind as keyof typeof DIST_PARTS];
  if (parts.every((p) => readNumber(state[`${name}~${p}`]) === undefined)) {
    // A distribution chosen but not filled in: fall back to the single value, if there is one.
    return readNumber(state[name]) ?? { dist: kind };
  }
  const out: Obj = { dist: kind };
  for (const p of parts) out[p] = readNumber(state[`${name}~${p}`]);
  return out;
}

function readField(state: FormState, name: string, def: FormFieldDef): unknown {
  switch (def.kind) {
    case 'number':
      return readNumber(state[name]);
    case 'quantity':
      return readQuantity(state, name);
    case 'checkbox':
      return state[name] === 'on' || state[name] === 'true' || state[name] === '1';
    case 'numberList': {
      const text = (state[name] ?? '').trim();
      if (text === '') return undefined;
      // Commas or semicolons separate entries; a decimal comma is not possible here, so "0,5" is two numbers.
      return text.split(/[;,\s]+/).filter(Boolean).map((x) => readNumber(x));
    }
    case 'select':
      if (state[name] === '' || state[name] === undefined) return undefined;
      if (def.booleanChoice) return state[name] === 'true' ? true : state[name] === 'false' ? false : state[name];
      return state[name];
    default:
      return readText(state[name]);
  }
}

function setPath(root: Obj, path: string, v: unknown): void {
  if (v === undefined) return;
  const keys = path.split('.');
  let cur = root;
  for (const k of keys.slice(0, -1)) {
    if (typeof cur[k] !== 'object' || cur[k] === null) cur[k] = {};
    cur = cur[k] as Obj;
  }
  cur[keys[keys.length - 1]] = v;
}

/** Indices of the rows of a group present in the form, in order. */
export function rowIndices(state: FormState, prefix: string): number[] {
  const re = new RegExp(`^${prefix.replace(/\./g, '\\.')}\\[(\\d{1,4})\\]\\.`);
  const seen = new Set<number>();
  for (const key of Object.keys(state)) {
    const m = re.exec(key);
    if (m) seen.add(Number(m[1]));
  }
  return [...seen].sort((a, b) => a - b);
}

/** Keys never copied from user input (they would reach object prototypes). */
const UNSAFE_KEYS = new Set(['__proto__', 'prototype', 'constructor']);

function deepMerge(base: unknown, over: unknown): unknown {
  if (base === null || typeof base !== 'object' || Array.isArray(base)) return over === undefined ? base : over;
  if (over === null || typeof over !== 'object' || Array.isArray(over)) return over === undefined ? base : over;
  const out: Obj = {};
  for (const [k, v] of Object.entries(base as Obj)) if (!UNSAFE_KEYS.has(k)) out[k] = v;
  for (const [k, v] of Object.entries(over as Obj)) if (!UNSAFE_KEYS.has(k)) out[k] = deepMerge(out[k], v);
  return out;
}

/**
 * Builds the (unvalidated) scenario object from form text. Inputs that do not apply (growth fields of
 * another growth form, stocking of a clearing) are left out. Returns form-level problems (such as a
 * damaged hidden field) beside the object; field problems come from parseScenario.
 */
export function formToScenario(state: FormState): { input: Obj; problems: Problem[] } {
  const problems: Problem[] = [];
  let extra: Obj = {};
  const extraText = state[EXTRA_INPUT]?.trim();
  if (extraText) {
    try {
      const parsed: unknown = JSON.parse(extraText);
      if (parsed && typeof parsed === 'object' && !Array.isArray(parsed)) extra = parsed as Obj;
      else throw new Error('not an object');
    } catch {
      problems.push({ path: EXTRA_INPUT, value: extraText.slice(0, 40), message: 'the hidden settings of this form were damaged; reload the scenario' });
    }
  }
  const input: Obj = {};
  for (const section of FORM_SECTIONS) {
    for (const def of section.fields) {
      if (def.switchFor) {
        // A ticked switch with nothing else filled in still makes the block (its fields have defaults).
        if (state[def.path] === 'on') setPath(input, def.switchFor, {});
        continue;
      }
      if (!applies(def.showWhen, state)) continue;
      setPath(input, def.path, readField(state, def.path, def));
    }
  }
  for (const group of Object.values(ROW_GROUPS)) {
    if (!applies(group.showWhen, state)) continue;
    const rows = rowIndices(state, group.prefix).map((i) => {
      const row: Obj = {};
      const habitat = state[`${group.prefix}[${i}].habitat`];
      for (const col of group.columns) {
        if (col.habitats && !col.habitats.includes(habitat)) continue;
        const v = readField(state, `${group.prefix}[${i}].${col.path}`, col);
        if (v !== undefined) row[col.path] = v;
      }
      return row;
    });
    // Optional lists (options, mosaics) are left out when empty; the others are required.
    if (rows.length || (group.key !== 'options' && group.key !== 'mosaics')) setPath(input, group.prefix, rows);
  }
  // No barrier at all when neither its length nor any option was given (its other settings then do not apply).
  const barrier = input.barrier as Obj | undefined;
  if (barrier && barrier.lengthKm === undefined && !(Array.isArray(barrier.options) && barrier.options.length > 0)) {
    delete input.barrier;
  }
  return { input: deepMerge(extra, input) as Obj, problems };
}

// ---------------------------------------------------------------------------------------------
// Row buttons (work without JavaScript: each is a submit button with an action value)

export type RowAction =
  | { kind: 'add'; group: RowGroupDef['key'] }
  | { kind: 'remove' | 'up' | 'down'; group: RowGroupDef['key']; index: number };

/** Parses an action button value such as `add:segments` or `remove:sites:2`; undefined for other values. */
export function parseRowAction(value: string | undefined): RowAction | undefined {
  const m = /^(add|remove|up|down):(segments|sites|options|kernel|mosaics)(?::(\d{1,4}))?$/.exec(value ?? '');
  if (!m) return undefined;
  const group = m[2] as RowGroupDef['key'];
  if (m[1] === 'add') return { kind: 'add', group };
  if (m[3] === undefined) return undefined;
  return { kind: m[1] as 'remove' | 'up' | 'down', group, index: Number(m[3]) };
}

/** Applies a row button to the form text and returns the new text (rows renumbered from 0). */
export function applyRowAction(state: FormState, action: RowAction): FormState {
  const group = ROW_GROUPS[action.group];
  const indices = rowIndices(state, group.prefix);
  const rows: FormState[] = indices.map((i) => {
    const row: FormState = {};
    const head = `${group.prefix}[${i}].`;
    for (const [k, v] of Object.entries(state)) if (k.startsWith(head)) row[k.slice(head.length)] = v;
    return row;
  });
  const at = action.kind === 'add' ? -1 : indices.indexOf(action.index);
  switch (action.kind) {
    case 'add':
      if (rows.length < group.maxRows) rows.push(group.newRow(rows.length));
      break;
    case 'remove':
      if (at >= 0) rows.splice(at, 1);
      break;
    case 'up':
      if (at > 0) [rows[at - 1], rows[at]] = [rows[at], rows[at - 1]];
      break;
    case 'down':
      if (at >= 0 && at < rows.length - 1) [rows[at], rows[at + 1]] = [rows[at + 1], rows[at]];
      break;
  }
  const out: FormState = {};
  const re = new RegExp(`^${group.prefix.replace(/\./g, '\\.')}\\[\\d+\\]\\.`);
  for (const [k, v] of Object.entries(state)) if (!re.test(k)) out[k] = v;
  rows.forEach((row, i) => {
    for (const [k, v] of Object.entries(row)) out[`${group.prefix}[${i}].${k}`] = v;
  });
  return out;
}

/**
 * Normalises a parsed form body: one string per input (the last one when an input is repeated), and
 * only names that look like form inputs (a dotted path, brackets, `~`, letters and digits).
 */
export function formStateFromBody(body: unknown): FormState {
  const state: FormState = Object.create(null) as FormState;
  if (!body || typeof body !== 'object') return state;
  for (const [k, v] of Object.entries(body as Record<string, unknown>)) {
    if (k.length > 120 || !/^[A-Za-z_][\w.[\]~]*$/.test(k) || [...UNSAFE_KEYS].some((u) => k.includes(u))) continue;
    const value = Array.isArray(v) ? v[v.length - 1] : v;
    if (typeof value === 'string') state[k] = value;
  }
  return state;
}
