/**
 * The pest's numbers per habitat class on the landscape page (movement, edge behaviour and mortality in host
 * forest, the open and non-host forest, and the host-kill rate), without JavaScript: one input per field,
 * posted as `pest.<field>`. Labels, units, allowed and typical ranges and help come from the one field table
 * (server/model/fields.ts); the posted numbers go into the scenario's `pest`, which the one landscape schema
 * then checks, so a problem names the same field as in a file (pest.diffusionOpen …). A field given as a range
 * in the file is shown and kept, not edited here (ranges are edited in the scenario file).
 */
import { FIELDS, describeRange, type FieldSpec } from '../model/fields.ts';
import { isDistribution } from '../model/quantity.ts';
import type { Problem } from '../model/errors.ts';

/** The per-class pest fields the page edits, by habitat class (the names are the scenario's). */
export const PEST_CLASS_FIELDS: readonly { habitat: string; fields: readonly (keyof typeof FIELDS)[] }[] = [
  { habitat: 'Host forest', fields: ['diffusionHost', 'hostKillRate'] },
  { habitat: 'Open ground (clearings, farmland)', fields: ['diffusionOpen', 'edgePreferenceOpen', 'mortalityOpen'] },
  { habitat: 'Non-host forest (and non-host planting)', fields: ['diffusionNonHost', 'edgePreferenceNonHost', 'mortalityNonHost'] },
];

export interface PestFieldView {
  name: string;
  id: string;
  label: string;
  unit: string;
  value: string;
  allowed: string;
  typical: string;
  help: string;
  /** A range from the file, shown in words and kept as it is. */
  range: string;
  rangeJson: string;
  bad: boolean;
}

const describeValue = (v: unknown) => (typeof v === 'number' ? String(v) : '');

function rangeText(spec: FieldSpec, v: unknown): string {
  const d = v as Record<string, number> & { dist: string };
  const u = spec.unit ? ` ${spec.unit}` : '';
  if (d.dist === 'lognormal') return `log-normal, median ${d.median}${u}, spread ×${d.spread}`;
  if (d.dist === 'uniform') return `uniform ${d.min}–${d.max}${u}`;
  return `triangular ${d.min}–${d.max}${u}, most likely ${d.mode}`;
}

/** The fieldsets for the page: the scenario's pest values (or the posted text), with the problems marked. */
export function pestFieldsets(pest: Record<string, unknown>, posted: Record<string, string> | null, problems: Problem[]) {
  const bad = new Set(problems.map((p) => p.path));
  return PEST_CLASS_FIELDS.map((group) => ({
    habitat: group.habitat,
    fields: group.fields.map((key): PestFieldView => {
      const spec = FIELDS[key] as FieldSpec;
      const v = pest[key];
      const range = isDistribution(v) ? rangeText(spec, v) : '';
      return {
        name: `pest.${key}`,
        id: `pest-${key}`,
        label: spec.label,
        unit: spec.unit,
        value: posted?.[`pest.${key}`] ?? describeValue(v),
        allowed: describeRange(spec),
        typical: `${spec.typical}${spec.unit && /\d$/.test(spec.typical) ? ` ${spec.unit}` : ''}`,
        // The transect form's distance-per-year switch is not on this page.
        help: spec.help.replace(/ ?\([^)]*beside the box[^)]*\)/, ''),
        range,
        rangeJson: range ? JSON.stringify(v) : '',
        bad: bad.has(`pest.${key}`),
      };
    }),
  }));
}

/** The posted `pest.<field>` texts (only the fields this page edits). */
export function postedPest(body: Record<string, unknown>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const g of PEST_CLASS_FIELDS) for (const key of g.fields) {
    const v = body[`pest.${key}`];
    if (typeof v === 'string') out[`pest.${key}`] = v;
  }
  return out;
}

/**
 * The scenario's pest with the posted numbers written in: an empty field is left out (the schema says when it
 * is needed), a number is taken as typed, anything else is kept as text for the schema to refuse by name.
 */
export function applyPostedPest(pest: Record<string, unknown>, posted: Record<string, string>): Record<string, unknown> {
  const out = { ...pest };
  for (const g of PEST_CLASS_FIELDS) for (const key of g.fields) {
    const text = posted[`pest.${key}`];
    if (text === undefined || isDistribution(pest[key])) continue;
    const t = text.trim();
    if (t === '') delete out[key];
    else out[key] = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/.test(t) ? Number(t) : t;
  }
  return out;
}
