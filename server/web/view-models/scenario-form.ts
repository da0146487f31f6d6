/**
 * View-model of the scenario form: labels, units, allowed and typical ranges, help, default and source
 * for every input (from FIELDS), the text as typed, and each problem placed beside its input.
 * Formatting only: no validation (parseScenario does that) and no model arithmetic.
 */
import { FIELDS, describeRange, type FieldSpec } from '../../model/fields.ts';
import { formatProblems, type Problem } from '../../model/errors.ts';
import {
  ALL_DIST_PARTS,
  DIST_PARTS,
  EXTRA_INPUT,
  FORM_SECTIONS,
  QUANTITY_KINDS,
  ROW_GROUPS,
  applies,
  rowIndices,
  type FormFieldDef,
  type FormState,
  type RowGroupDef,
} from '../form-state.ts';
import { stripFromForm, type StripView } from './strip.ts';
import { DISTANCE_AS } from '../form-read.ts';

export interface ChoiceView {
  value: string;
  label: string;
  selected: boolean;
}

export interface FieldView {
  id: string;
  name: string;
  kind: FormFieldDef['kind'];
  isText: boolean;
  isTextarea: boolean;
  isNumber: boolean;
  isNumberList: boolean;
  isQuantity: boolean;
  isSelect: boolean;
  isCheckbox: boolean;
  label: string;
  unit: string;
  value: string;
  checked: boolean;
  choices: ChoiceView[];
  allowed: string;
  typical: string;
  help: string;
  defaultText: string;
  source: string;
  errors: string[];
  invalid: boolean;
  /** JSON of the conditions under which this input is used ('' = always); read by the page script. */
  showWhen: string;
  /** Space-separated habitats this input applies to ('' = all). */
  habitats: string;
  /** Not used as the form stands (another growth form or habitat, a switch off): greyed out; the page script hides it. */
  inactive: boolean;
  /** Quantity inputs: the distribution part. */
  dist: { kind: string; open: boolean; kinds: ChoiceView[]; parts: { id: string; name: string; label: string; value: string; kinds: string }[] } | null;
  /** When a range is chosen instead of one value: what the single-value box stands for ('' otherwise). */
  rangeGiven: string;
  /** Movement rates: the choice of typing a rate (km²/yr) or a typical distance moved per year (km/yr). */
  distanceChoice: { id: string; name: string; choices: ChoiceView[] } | null;
}

export interface RowView {
  index: number;
  cells: FieldView[];
  errors: string[];
  first: boolean;
  last: boolean;
  habitat: string;
}

export interface TableView {
  key: RowGroupDef['key'];
  rowNoun: string;
  columns: { label: string; unit: string; help: string; allowed: string; typical: string; source: string; defaultText: string }[];
  rows: RowView[];
  errors: string[];
  canAdd: boolean;
  addLabel: string;
  showWhen: string;
  inactive: boolean;
}

export interface ProblemView {
  anchor: string;
  label: string;
  path: string;
  message: string;
}

export interface FormView {
  sections: Record<string, { id: string; title: string; intro: string; fields: FieldView[]; errors: string[] }>;
  segments: TableView;
  sites: TableView;
  options: TableView;
  kernel: TableView;
  mosaics: TableView;
  strip: StripView;
  problems: ProblemView[];
  /** Plain-text listing of the problems (for the page title and logs). */
  problemText: string;
  extraName: string;
  extraValue: string;
  /** Top-level names of settings this form keeps but does not show. */
  extraKeys: string[];
  growthForm: string;
}

const KIND_LABELS: Record<string, string> = {
  value: 'single value',
  uniform: 'uniform (min–max)',
  triangular: 'triangular (min, most likely, max)',
  lognormal: 'lognormal (median, spread factor)',
};
const PART_LABELS: Record<string, string> = { min: 'min', mode: 'most likely', max: 'max', median: 'median', spread: 'spread factor (×)' };

/** Words for the single-value box when a range is chosen (also used by the page script through data-range-words). */
export const RANGE_GIVEN = 'not used: given as a range below';

/** HTML id of an input, from its name. */
export function inputId(name: string): string {
  return `f-${name.replace(/[^A-Za-z0-9]+/g, '-').replace(/-$/, '')}`;
}

/** Problems waiting to be placed beside an input; whatever is left is listed at the top only. */
class ProblemBoard {
  private readonly left: Problem[];
  readonly placed = new Map<Problem, { anchor: string; label: string }>();
  constructor(problems: Problem[]) {
    this.left = [...problems];
  }
  /** Takes the problems at `path` or below it; messages name the sub-field when below. */
  take(path: string, anchor: string, label: string): string[] {
    const out: string[] = [];
    for (let i = 0; i < this.left.length; i++) {
      const p = this.left[i];
      if (p.path === path || p.path.startsWith(`${path}.`) || p.path.startsWith(`${path}[`)) {
        const sub = p.path.slice(path.length).replace(/^\./, '');
        const entry = /^\[(\d+)\]$/.exec(sub);
        const subLabel = sub === 'dist' ? 'distribution' : entry ? `entry ${Number(entry[1]) + 1}` : (PART_LABELS[sub] ?? sub);
        out.push(sub ? `${subLabel}: ${p.message}` : p.message);
        this.placed.set(p, { anchor, label });
        this.left.splice(i--, 1);
      }
    }
    return out;
  }
}

function specOf(def: FormFieldDef): FieldSpec | undefined {
  return def.field ? FIELDS[def.field] : undefined;
}

function defaultText(spec: FieldSpec | undefined): string {
  if (!spec) return '';
  return spec.defaultValue !== undefined ? `${spec.defaultValue}${spec.unit ? ` ${spec.unit}` : ''}` : '';
}

function fieldView(def: FormFieldDef, name: string, state: FormState, board: ProblemBoard, ctx: { habitat?: string } = {}): FieldView {
  const spec = specOf(def);
  const id = inputId(name);
  const label = def.label ?? spec?.label ?? def.path;
  const errors = board.take(name, id, label);
  const value = state[name] ?? '';
  let dist: FieldView['dist'] = null;
  if (def.kind === 'quantity') {
    const kind = state[`${name}~kind`] && QUANTITY_KINDS.includes(state[`${name}~kind`] as never) ? state[`${name}~kind`] : 'value';
    dist = {
      kind,
      open: kind !== 'value',
      kinds: QUANTITY_KINDS.map((k) => ({ value: k, label: KIND_LABELS[k], selected: k === kind })),
      parts: ALL_DIST_PARTS.map((part) => ({
        id: `${id}-${part}`,
        name: `${name}~${part}`,
        label: PART_LABELS[part],
        value: state[`${name}~${part}`] ?? '',
        kinds: Object.entries(DIST_PARTS)
          .filter(([, parts]) => parts.includes(part))
          .map(([k]) => k)
          .join(' '),
      })),
    };
  }
  return {
    id,
    name,
    kind: def.kind,
    isText: def.kind === 'text',
    isTextarea: def.kind === 'textarea',
    isNumber: def.kind === 'number',
    isNumberList: def.kind === 'numberList',
    isQuantity: def.kind === 'quantity',
    isSelect: def.kind === 'select',
    isCheckbox: def.kind === 'checkbox',
    label,
    unit: spec?.unit ?? '',
    value,
    checked: value === 'on' || value === 'true' || value === '1',
    choices: (def.choices ?? []).map((c) => ({ value: c.value, label: c.label, selected: c.value === value })),
    // Positions accept any number; what matters is the check against the transect (typical: "within the transect").
    allowed: spec && def.field !== 'positionKm' ? describeRange(spec) : '',
    typical: spec ? `${spec.typical}${spec.unit && /\d$/.test(spec.typical) ? ` ${spec.unit}` : ''}` : '',
    help: def.help ?? spec?.help ?? '',
    defaultText: defaultText(spec),
    source: spec?.source ?? '',
    errors,
    invalid: errors.length > 0,
    showWhen: def.showWhen ? JSON.stringify(def.showWhen) : '',
    habitats: (def.habitats ?? []).join(' '),
    inactive: !applies(def.showWhen, state) || (def.habitats !== undefined && !def.habitats.includes(ctx.habitat ?? '')),
    dist,
    rangeGiven: dist && dist.kind !== 'value' ? RANGE_GIVEN : '',
    distanceChoice: def.distanceInput
      ? {
          id: `${id}-as`,
          name: `${name}~as`,
          choices: [
            { value: '', label: 'km²/yr (movement rate)', selected: state[`${name}~as`] !== DISTANCE_AS },
            { value: DISTANCE_AS, label: 'km per year (typical distance moved)', selected: state[`${name}~as`] === DISTANCE_AS },
          ],
        }
      : null,
  };
}

/** What one row of each table is called, so row buttons name their table ("Remove segment 2"). */
const ROW_NOUNS: Record<RowGroupDef['key'], string> = { segments: 'segment', sites: 'site', options: 'option', kernel: 'distance row', mosaics: 'pattern' };

function tableView(group: RowGroupDef, state: FormState, board: ProblemBoard): TableView {
  const indices = rowIndices(state, group.prefix);
  const rows = indices.map((i, k) => {
    const rowPath = `${group.prefix}[${i}]`;
    const habitat = state[`${rowPath}.habitat`] ?? '';
    const cells = group.columns.map((col) => fieldView(col, `${rowPath}.${col.path}`, state, board, { habitat }));
    const errors = board.take(rowPath, cells[0]?.id ?? '', `${group.columns[0]?.label ?? 'row'} ${k + 1}`);
    return { index: i, cells, errors, first: k === 0, last: k === indices.length - 1, habitat };
  });
  const errors = board.take(group.prefix, `table-${group.key}`, group.key);
  return {
    key: group.key,
    rowNoun: ROW_NOUNS[group.key],
    columns: group.columns.map((col) => {
      const spec = specOf(col);
      return {
        label: col.label ?? spec?.label ?? col.path,
        unit: spec?.unit ?? '',
        help: col.help ?? spec?.help ?? '',
        allowed: spec ? describeRange(spec) : '',
        typical: spec?.typical ?? '',
        source: spec?.source ?? '',
        defaultText: defaultText(spec),
      };
    }),
    rows,
    errors,
    canAdd: rows.length < group.maxRows,
    addLabel: { segments: 'Add a segment', sites: 'Add a site', options: 'Add an option', kernel: 'Add a row', mosaics: 'Add a pattern' }[group.key],
    showWhen: group.showWhen ? JSON.stringify(group.showWhen) : '',
    inactive: !applies(group.showWhen, state),
  };
}

/** Builds the form page's view-model from form text and the problems found by validation. */
export function formView(state: FormState, problems: Problem[] = [], server: { maxHorizonYears?: number } = {}): FormView {
  const board = new ProblemBoard(problems);
  const sections: FormView['sections'] = {};
  for (const s of FORM_SECTIONS) {
    const fields = s.fields.map((def) => {
      const f = fieldView(def, def.path, state, board);
      // One limit shown the same everywhere: the horizon this server runs, not only the schema's range.
      if (def.path === 'horizonYears' && server.maxHorizonYears !== undefined) f.allowed = `> 0 and ≤ ${server.maxHorizonYears} yr on this server`;
      return f;
    });
    sections[s.id] = { id: s.id, title: s.title, intro: s.intro ?? '', fields, errors: [] };
  }
  const segments = tableView(ROW_GROUPS.segments, state, board);
  const sites = tableView(ROW_GROUPS.sites, state, board);
  const options = tableView(ROW_GROUPS.options, state, board);
  const kernel = tableView(ROW_GROUPS.kernel, state, board);
  const mosaics = tableView(ROW_GROUPS.mosaics, state, board);
  // Problems about a whole part (e.g. "infestation must overlap a host-forest segment").
  for (const s of FORM_SECTIONS) sections[s.id].errors = board.take(s.id, `section-${s.id}`, s.title);
  sections.transect.errors.push(...board.take('transect', 'section-transect', 'Transect'));
  sections.pest.errors.push(...board.take('pest', 'section-pest', 'Pest profile'));
  sections.barrier.errors.push(...board.take('barrier', 'section-barrier', 'Barrier options'));
  sections.uncertainty.errors.push(...board.take('uncertainty', 'section-uncertainty', 'Uncertainty'));
  sections.transport.errors.push(...board.take('transport', 'section-transport', 'Human-carried introductions'));
  const extraKeys = (() => {
    try {
      return Object.keys(JSON.parse(state[EXTRA_INPUT] || '{}') as object);
    } catch {
      return [];
    }
  })();
  return {
    sections,
    segments,
    sites,
    options,
    kernel,
    mosaics,
    strip: stripFromForm(state),
    problems: problems.map((p) => {
      const where = board.placed.get(p);
      return { anchor: where ? `#${where.anchor}` : '', label: where?.label ?? (p.path || 'Scenario'), path: p.path, message: p.message };
    }),
    problemText: formatProblems(problems),
    extraName: EXTRA_INPUT,
    extraValue: state[EXTRA_INPUT] ?? '',
    extraKeys,
    growthForm: state['pest.growth.form'] ?? '',
  };
}

/** A starting point for a new scenario: defaults from FIELDS, one host-forest segment, no options. */
export function newScenarioTemplate(): Record<string, unknown> {
  const d = (k: keyof typeof FIELDS) => (FIELDS[k] as FieldSpec).defaultValue;
  return {
    title: 'New scenario',
    description: '',
    pest: {
      name: 'Pest profile',
      illustrative: false,
      diffusionHost: d('diffusionHost'),
      diffusionOpen: d('diffusionOpen'),
      edgePreferenceOpen: d('edgePreferenceOpen'),
      growth: { form: 'logistic', rate: d('growthRate') },
      hostKillRate: d('hostKillRate'),
      mortalityOpen: d('mortalityOpen'),
    },
    transect: {
      originKm: 0,
      segments: [{ habitat: 'host-forest', lengthKm: 20, stocking: d('stocking'), stemsPerHa: d('stemsPerHa') }],
    },
    infestation: { fromKm: 0, toKm: 1, density: d('infestedDensity') },
    sites: [],
    horizonYears: d('horizonYears'),
    detectionLevel: d('detectionLevel'),
  };
}

