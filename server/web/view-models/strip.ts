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
  segments: { habitat: string; grow: number; title: string; narrow: boolean }[];
  /** Infestation on the bar; each option in its own lane below it (options at the same km stay apart), with its letter. */
  bands: { kind: 'infestation' | 'option'; left: string; width: string; title: string; top: string; key: string }[];
  /** Site pins; `flip` puts the label to the left of its pin (pins in the right part of the strip keep their labels on the page). */
  pins: { left: string; label: string; flip: boolean }[];
  /** km ticks under the bar. */
  ticks: { left: string; label: string }[];
  /** Total height of the drawing and where the site pins start [rem]. */
  height: string;
  pinsTop: string;
  startText: string;
  endText: string;
}

/** Layout of the strip drawing [rem]: the bar, the km ticks, one lane per option, then the site labels (also in assets/scenario-form.js). */
export const STRIP_LAYOUT = { bar: 1.4, ticks: 1.2, lane: 1.0, pins: 1.5 };

/** Tick step [km] giving about five to ten ticks over `total` km (1, 2, 5 × 10^n). */
export function tickStepKm(total: number): number {
  const raw = total / 8;
  const p = 10 ** Math.floor(Math.log10(raw));
  return [1, 2, 5, 10].map((m) => m * p).find((x) => total / x <= 10) ?? 10 * p;
}

const letter = (k: number) => String.fromCharCode(65 + (k % 26));

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
    return { empty: true, segments: [], bands: [], pins: [], ticks: [], height: `${STRIP_LAYOUT.bar + STRIP_LAYOUT.ticks + STRIP_LAYOUT.pins}rem`, pinsTop: '0rem', startText: '', endText: '' };
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
      top: '0rem',
      key: '',
    });
  }
  const lanesTop = STRIP_LAYOUT.bar + STRIP_LAYOUT.ticks;
  input.options.forEach((o, k) => {
    const to = o.fromKm + o.widthM / 1000;
    if (!inside(o.fromKm) || !(o.widthM > 0)) return;
    bands.push({
      kind: 'option',
      left: pct(at(o.fromKm)),
      width: pct(Math.max(at(Math.min(to, origin + total)) - at(o.fromKm), 0.4)),
      title: `${letter(k)}: ${o.name}, km ${km(o.fromKm)}–${km(to)}`,
      top: `${(lanesTop + k * STRIP_LAYOUT.lane).toFixed(2)}rem`,
      key: letter(k),
    });
  });
  const pinsTop = lanesTop + input.options.length * STRIP_LAYOUT.lane;
  const step = tickStepKm(total);
  const ticks: StripView['ticks'] = [];
  for (let x = Math.ceil(origin / step - 1e-9) * step; x <= origin + total + 1e-9; x += step) ticks.push({ left: pct(at(x)), label: `${Number(x.toPrecision(6))}` });
  return {
    empty: false,
    segments: segments.map((s) => ({
      habitat: s.habitat in HABITAT_WORDS ? s.habitat : 'unknown',
      grow: s.lengthKm,
      title: `${s.name ? `${s.name}: ` : ''}${HABITAT_WORDS[s.habitat] ?? s.habitat}, ${km(s.lengthKm)} km`,
      // A stretch under half a percent of the strip (a 60 m corridor in 50 km) is drawn at a visible minimum width with an outline.
      narrow: s.lengthKm / total < 0.005,
    })),
    bands,
    pins: input.sites.filter((s) => inside(s.atKm)).map((s) => ({ left: pct(at(s.atKm)), label: s.name || '(site)', flip: at(s.atKm) > 55 })),
    ticks,
    height: `${(pinsTop + STRIP_LAYOUT.pins).toFixed(2)}rem`,
    pinsTop: `${pinsTop.toFixed(2)}rem`,
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
