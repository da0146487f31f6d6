/**
 * Scenario object → form text: every field the form shows, by its input name, and the settings it does
 * not show kept whole in one hidden input (EXTRA_INPUT). Part of the scenario form (form-state.ts).
 */
import { valueAt } from '../model/errors.ts';
import { isDistribution } from '../model/quantity.ts';
import { ALL_DIST_PARTS, EXTRA_INPUT, FORM_SECTIONS, ROW_GROUPS, type FormFieldDef, type FormState } from './form-layout.ts';

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
  numerics: ['cellM', 'stepYears', 'tolerance'],
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
