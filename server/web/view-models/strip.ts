/**
 * The transect strip drawn in HTML on the form and overview pages: habitat blocks sized by length, and
 * marks for the infestation, the barrier options and the protected sites. The form's script redraws the
 * same markup while the user types (see assets/scenario-form.js). Positions are percentages along the
 * strip (presentation only).
 */
import { km } from '../../report/format.ts';
import { readNumber, rowIndices, ROW_GROUPS, type FormState } from '../form-state.ts';

export interface StripInput {
  originKm: number;
  segments: { habitat: string; name?: string; lengthKm: number }[];
  infestation?: { fromKm: number; toKm: number };
  sites: { name: string; atKm: number }[];
  options: { name: string; fromKm: number; widthM: number }[];
}

export interface StripView {
  empty: boolean;
  segments: { habitat: string; grow: number; title: string }[];
  bands: { kind: 'infestation' | 'option'; left: string; width: string; title: string }[];
  pins: { left: string; label: string }[];
  startText: string;
  endText: string;
}

const HABITAT_WORDS: Record<string, string> = {
  'host-forest': 'host forest',
  clearing: 'clearing',
  'non-host-forest': 'non-host forest',
};

const pct = (x: number) => `${Math.min(100, Math.max(0, x)).toFixed(3)}%`;

export function stripView(input: StripInput): StripView {
  const segments = input.segments.filter((s) => Number.isFinite(s.lengthKm) && s.lengthKm > 0);
  const total = segments.reduce((a, s) => a + s.lengthKm, 0);
  if (!(total > 0)) {
    return { empty: true, segments: [], bands: [], pins: [], startText: '', endText: '' };
  }
  const origin = input.originKm;
  const at = (x: number) => (100 * (x - origin)) / total;
  const inside = (x: number) => Number.isFinite(x) && x >= origin && x <= origin + total;
  const bands: StripView['bands'] = [];
  if (input.infestation && inside(input.infestation.fromKm) && input.infestation.toKm > input.infestation.fromKm) {
    const to = Math.min(input.infestation.toKm, origin + total);
    bands.push({
      kind: 'infestation',
      left: pct(at(input.infestation.fromKm)),
      width: pct(at(to) - at(input.infestation.fromKm)),
      title: `Infested: km ${km(input.infestation.fromKm)}–${km(input.infestation.toKm)}`,
    });
  }
  for (const o of input.options) {
    const to = o.fromKm + o.widthM / 1000;
    if (!inside(o.fromKm) || !(o.widthM > 0)) continue;
    bands.push({
      kind: 'option',
      left: pct(at(o.fromKm)),
      width: pct(Math.max(at(Math.min(to, origin + total)) - at(o.fromKm), 0.4)),
      title: `${o.name}: km ${km(o.fromKm)}–${km(to)}`,
    });
  }
  return {
    empty: false,
    segments: segments.map((s) => ({
      habitat: s.habitat in HABITAT_WORDS ? s.habitat : 'unknown',
      grow: s.lengthKm,
      title: `${s.name ? `${s.name}: ` : ''}${HABITAT_WORDS[s.habitat] ?? s.habitat}, ${km(s.lengthKm)} km`,
    })),
    bands,
    pins: input.sites.filter((s) => inside(s.atKm)).map((s) => ({ left: pct(at(s.atKm)), label: s.name || '(site)' })),
    startText: `${km(origin)} km`,
    endText: `${km(origin + total)} km`,
  };
}

const num = (text: string | undefined): number => {
  const v = readNumber(text);
  return typeof v === 'number' ? v : NaN;
};

/** The strip for the form as typed (unvalidated: unreadable numbers are skipped). */
export function stripFromForm(state: FormState): StripView {
  const seg = ROW_GROUPS.segments.prefix;
  const site = ROW_GROUPS.sites.prefix;
  const opt = ROW_GROUPS.options.prefix;
  return stripView({
    originKm: Number.isFinite(num(state['transect.originKm'])) ? num(state['transect.originKm']) : 0,
    segments: rowIndices(state, seg).map((i) => ({
      habitat: state[`${seg}[${i}].habitat`] ?? '',
      name: state[`${seg}[${i}].name`],
      lengthKm: num(state[`${seg}[${i}].lengthKm`]),
    })),
    infestation: { fromKm: num(state['infestation.fromKm']), toKm: num(state['infestation.toKm']) },
    sites: rowIndices(state, site).map((i) => ({ name: state[`${site}[${i}].name`] ?? '', atKm: num(state[`${site}[${i}].atKm`]) })),
    options: rowIndices(state, opt).map((i) => ({
      name: state[`${opt}[${i}].name`] ?? '',
      fromKm: num(state[`${opt}[${i}].fromKm`]),
      widthM: num(state[`${opt}[${i}].widthM`]),
    })),
  });
}

/** The strip for a validated scenario. */
export function stripFromScenario(s: {
  transect: { originKm: number; segments: { habitat: string; name?: string; lengthKm: number }[] };
  infestation: { fromKm: number; toKm: number };
  sites: { name: string; atKm: number }[];
  barrier?: { options: { name: string; fromKm: number; widthM: number }[] };
}): StripView {
  return stripView({
    originKm: s.transect.originKm,
    segments: s.transect.segments,
    infestation: s.infestation,
    sites: s.sites,
    options: s.barrier?.options ?? [],
  });
}
