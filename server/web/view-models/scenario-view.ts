/**
 * View-model of a scenario's overview page and of the scenario lists (formatting only).
 */
import { FIELDS, type FieldSpec } from '../../model/fields.ts';
import { isDistribution, type Quantity } from '../../model/quantity.ts';
import type { Scenario } from '../../model/scenario.ts';
import { distributionText, integer, km, num } from '../../report/format.ts';
import type { CatalogueEntry, CatalogueSummary } from '../catalogue.ts';
import { COVER_CHOICES, GROWTH_CHOICES, HABITAT_CHOICES, MATING_CHOICES } from '../form-state.ts';
import { stripFromScenario } from './strip.ts';

const label = (choices: readonly { value: string; label: string }[], v: string) => choices.find((c) => c.value === v)?.label ?? v;

/** A number or distribution with its unit, e.g. "0.4 km²/yr" or "triangular 0.2–0.9, most likely 0.5 km²/yr". */
export function quantityText(q: Quantity | undefined, spec: FieldSpec): string {
  if (q === undefined) return '—';
  if (!isDistribution(q)) return `${num(q, 4)}${spec.unit ? ` ${spec.unit}` : ''}`;
  return distributionText(q, spec.unit);
}

export function scenarioView(entry: CatalogueEntry) {
  const s: Scenario = entry.scenario;
  const p = s.pest;
  const ref = encodeURIComponent(entry.ref);
  return {
    ref: entry.ref,
    kind: entry.kind,
    readOnly: entry.readOnly,
    title: s.title,
    description: s.description,
    region: s.region ?? '',
    pestName: p.name,
    illustrative: p.illustrative,
    notes: p.notes ?? '',
    pest: pestRows(s),
    segments: segmentRows(s),
    strip: stripFromScenario(s),
    infestation: `km ${km(s.infestation.fromKm)}–${km(s.infestation.toKm)} at ${num(s.infestation.density)} of capacity`,
    sites: s.sites.map((x) => ({ name: x.name, at: `km ${km(x.atKm)}` })),
    barrier: barrierView(s),
    ensemble: s.uncertainty
      ? `${integer(s.uncertainty.draws)} draws, seed ${s.uncertainty.seed}, target standard error ${num(s.uncertainty.targetStandardError)}` +
        `${s.uncertainty.criticalWidth ? ', critical width in every draw' : ''}`
      : '',
    transport: transportText(s),
    mosaics: (s.mosaics ?? []).map((m) => ({
      name: m.name,
      pattern: `${integer(m.forestM)} m forest / ${integer(m.gapM)} m ${label(COVER_CHOICES, m.cover).toLowerCase()}${m.stocking !== undefined ? `, forest stocking ${num(m.stocking)}` : ''}`,
    })),
    horizon: `${num(s.horizonYears)} yr`,
    detection: `${num(s.detectionLevel)} of capacity`,
    uncertain: JSON.stringify(s).includes('"dist"'),
    links: {
      page: `/scenarios/${ref}`,
      edit: `/scenarios/${ref}/edit`,
      json: `/scenarios/${ref}/json`,
      download: `/scenarios/${ref}/scenario.json`,
      run: `/scenarios/${ref}/run`,
      duplicate: `/scenarios/${ref}/duplicate`,
      remove: `/scenarios/${ref}/delete`,
    },
  };
}

/** The pest's parameters that are set, in the order of the form, with their units and sources. */
function pestRows(s: Scenario) {
  const p = s.pest;
  const g = p.growth;
  const pest: { label: string; value: string; source: string }[] = [];
  const add = (spec: FieldSpec, q: Quantity | undefined) => {
    if (q !== undefined) pest.push({ label: spec.label, value: quantityText(q, spec), source: spec.source });
  };
  add(FIELDS.diffusionHost, p.diffusionHost);
  add(FIELDS.diffusionOpen, p.diffusionOpen);
  add(FIELDS.edgePreferenceOpen, p.edgePreferenceOpen);
  add(FIELDS.mortalityOpen, p.mortalityOpen);
  add(FIELDS.diffusionNonHost, p.diffusionNonHost);
  add(FIELDS.edgePreferenceNonHost, p.edgePreferenceNonHost);
  add(FIELDS.mortalityNonHost, p.mortalityNonHost);
  add(FIELDS.hostKillRate, p.hostKillRate);
  pest.push({ label: 'Growth form', value: label(GROWTH_CHOICES, g.form), source: '' });
  if (g.form === 'logistic' || g.form === 'allee-cubic') add(FIELDS.growthRate, g.rate);
  if (g.form === 'allee-cubic') add(FIELDS.alleeThreshold, g.alleeThreshold);
  if (g.form === 'mate-finding') {
    add(FIELDS.birthRate, g.birthRate);
    add(FIELDS.deathRate, g.deathRate);
    add(FIELDS.crowding, g.crowding);
    pest.push({ label: 'Mate finding', value: label(MATING_CHOICES, g.mating), source: '' });
    add(FIELDS.mateScale, g.mateScale);
  }
  return pest;
}

/** The transect's segments with the km span each covers. */
function segmentRows(s: Scenario) {
  let at = s.transect.originKm;
  return s.transect.segments.map((seg) => {
    const from = at;
    at += seg.lengthKm;
    return {
      habitat: label(HABITAT_CHOICES, seg.habitat),
      name: seg.name ?? '',
      span: `km ${km(from)}–${km(at)}`,
      length: `${km(seg.lengthKm)} km`,
      stocking: seg.habitat === 'host-forest' ? quantityText(seg.stocking, FIELDS.stocking) : '—',
      stems: seg.habitat === 'host-forest' ? quantityText(seg.stemsPerHa, FIELDS.stemsPerHa) : '—',
    };
  });
}

function barrierView(s: Scenario) {
  if (!s.barrier) return null;
  return {
    length: `${km(s.barrier.lengthKm)} km`,
    cost: s.barrier.costPerStem !== undefined ? `${num(s.barrier.costPerStem)} ${s.barrier.costUnit ?? ''} per tree`.trim() : 'not given',
    options: s.barrier.options.map((o) => ({
      name: o.name,
      from: `km ${km(o.fromKm)}`,
      width: `${integer(o.widthM)} m`,
      cover: label(COVER_CHOICES, o.cover),
    })),
  };
}

function transportText(s: Scenario): string {
  if (!s.transport) return '';
  return (
    `${quantityText(s.transport.ratePerKm2Year, FIELDS.transportRate)}; distances ` +
    (s.transport.kernel.shape === 'exponential'
      ? `exponential, mean ${quantityText(s.transport.kernel.meanKm, FIELDS.transportMeanKm)}`
      : `from a table of ${s.transport.kernel.points.length} rows`) +
    `; establishment probability ${quantityText(s.transport.establishmentProbability, FIELDS.establishmentProbability)}`
  );
}

export function scenarioListItem(s: CatalogueSummary) {
  const ref = encodeURIComponent(s.ref);
  return {
    ref: s.ref,
    title: s.title,
    demo: s.kind === 'demo',
    updated: s.updatedAt ? s.updatedAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC') : '',
    link: `/scenarios/${ref}`,
    run: `/scenarios/${ref}/run`,
    edit: `/scenarios/${ref}/edit`,
    duplicate: `/scenarios/${ref}/duplicate`,
    remove: `/scenarios/${ref}/delete`,
  };
}
