/**
 * The verdict rules (server/analysis/README.md, "Verdict rules") applied to hand-made facts: every branch
 * of the site and overall verdicts, with the numbers in the sentences worked out here by hand.
 */
import { describe, expect, it } from 'vitest';
import { overallVerdict, siteVerdicts, type SiteFacts, type Stall } from '../../../server/analysis/verdict/rules.ts';
import type { WindowOutcome } from '../../../server/analysis/run/barrier-run.ts';
import type { PointScenario } from '../../../server/model/scenario.ts';
import type { SiteVerdict } from '../../../server/analysis/result.ts';

const s = { horizonYears: 30, sites: [{ name: 'Mill', atKm: 20 }] } as unknown as PointScenario;
const option = { name: 'A', fromKm: 10, widthM: 500, cover: 'clearing' } as const;
const noStall: Stall = { stalls: false, cannotAdvance: false, reason: '' };
const facts = (f: Partial<SiteFacts>): SiteFacts => ({ baseArr: [10], optArr: [15], beyondSites: [true], projected: null, pinned: false, marginal: false, stall: noStall, cost: null, dtc: 0.05, crossedYears: 12, ...f });
const site = (f: Partial<SiteFacts>): SiteVerdict => siteVerdicts(s, facts(f))[0];

describe('site verdicts', () => {
  it('delays: 15 − 10 = 5 years, cost per year of delay 1 000 000 / 5', () => {
    const v = site({ cost: 1_000_000 });
    expect(v.kind).toBe('delays');
    expect(v.delayYears).toBe(5);
    expect(v.costPerYearOfDelay).toBe(200_000);
    expect(v.sentence).toBe('Arrives 5.0 years later than without the clearing (year 15.0 instead of 10.0).');
  });
  it('a delayed arrival before the breeding front crossed is called the thin fringe', () => {
    expect(site({ crossedYears: 16 }).sentence).toMatch(/thin fringe of insects ahead of the clearing/);
    expect(site({ crossedYears: null }).sentence).toMatch(/thin fringe/);
    expect(site({ crossedYears: 14 }).sentence).not.toMatch(/fringe/);
  });
  it('speeds up: 8 − 10 = −2 years', () => {
    const v = site({ optArr: [8] });
    expect(v.kind).toBe('speeds-up');
    expect(v.sentence).toBe('Arrives 2.0 years EARLIER than without the clearing (year 8.0 instead of 10.0).');
  });
  it('no change below the threshold: |10.03 − 10| < 0.05', () => {
    expect(site({ optArr: [10.03] }).kind).toBe('no-change');
    expect(site({ optArr: [10.06] }).kind).toBe('delays');
  });
  it('held (pinned) beyond the clearing: holds, no arrival kept, a detected fringe named as such', () => {
    const v = site({ pinned: true, optArr: [18] });
    expect(v.kind).toBe('holds');
    expect(v.optionArrivalYears).toBeNull();
    expect(v.sentence).toMatch(/^Protected: the front is held at the clearing/);
    expect(v.sentence).toMatch(/from year 18\.0, but no breeding population forms/);
    expect(site({ pinned: true, marginal: true }).kind).toBe('marginal');
  });
  it('not crossed within the horizon, with the projected arrival when the extended run gives one', () => {
    const projected = { arrivals: [41.5] } as unknown as WindowOutcome;
    const v = site({ optArr: [null], projected });
    expect(v.kind).toBe('not-crossed');
    expect(v.projectedArrivalYears).toBe(41.5);
    expect(v.sentence).toBe('Not reached within the 30-year horizon with the clearing (without it: year 10.0); not shown to be held. Projected arrival: year 41.5.');
  });
  it('not reached with or without; a stalling front says why', () => {
    expect(site({ baseArr: [null], optArr: [null] }).kind).toBe('not-reached');
    const v = site({ baseArr: [null], optArr: [null], stall: { stalls: true, cannotAdvance: true, reason: 'it cannot advance' } });
    expect(v.sentence).toBe('Not reached, with or without the clearing: it cannot advance.');
  });
  it('reached only with the clearing: speeds up', () => {
    expect(site({ baseArr: [null], optArr: [12] }).kind).toBe('speeds-up');
  });
});

describe('overall verdict', () => {
  const base = { baseCross: 10, optCross: 14, projCross: null, stall: noStall, pinned: false, marginal: false, bracket: null as [number, number] | null, firstSite: null as SiteVerdict | null, dtc: 0.05 };
  it('holds when pinning is verified; marginal inside the bracket', () => {
    expect(overallVerdict(s, option, { ...base, optCross: null, pinned: true }).kind).toBe('holds');
    const m = overallVerdict(s, option, { ...base, optCross: null, pinned: true, marginal: true, bracket: [480, 520] });
    expect(m).toEqual({ kind: 'marginal', sentence: 'Marginal: the front was held in this run, but 500 m is within the critical-width bracket\'s uncertainty (480–520 m).' });
  });
  it('not crossed within the horizon (and the projected crossing)', () => {
    const v = overallVerdict(s, option, { ...base, optCross: null, projCross: 44.2 });
    expect(v.kind).toBe('not-crossed');
    expect(v.sentence).toMatch(/passes this point in year 10\.0\), but not shown to stay stopped\. Projected crossing: year 44\.2\.$/);
  });
  it('the first site beyond decides when it has a delay', () => {
    const firstSite = site({});
    expect(overallVerdict(s, option, { ...base, firstSite })).toEqual({ kind: 'delays', sentence: 'Delays: arrival at Mill 5.0 years later than without the clearing.' });
  });
  it('without a site: the crossing times, 14 − 10 = 4 years later', () => {
    expect(overallVerdict(s, option, base)).toEqual({ kind: 'delays', sentence: 'Delays: the front passes the clearing 4.0 years later than it passes the same place without it.' });
    expect(overallVerdict(s, option, { ...base, optCross: 9 }).kind).toBe('speeds-up');
    expect(overallVerdict(s, option, { ...base, optCross: 10.01 }).kind).toBe('no-change');
    expect(overallVerdict(s, option, { ...base, baseCross: null, optCross: 9 }).kind).toBe('speeds-up');
  });
  it('a front that stalls anyway is "not reached", with the reason', () => {
    const v = overallVerdict(s, option, { ...base, optCross: null, stall: { stalls: true, cannotAdvance: true, reason: 'too few find mates' } });
    expect(v).toEqual({ kind: 'not-reached', sentence: 'The pest does not reach the clearing, with or without it: too few find mates.' });
  });
});
