import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { parseSurveyCsv, parseSurveyRecords, surveyProblems, surveyToCsv, SurveyError, type SurveyTable } from '../../server/model/survey.ts';
import type { Problem } from '../../server/model/errors.ts';

const demo = readFileSync(new URL('../../scenarios/survey-fit.records.csv', import.meta.url), 'utf8');

function problemsOf(f: () => unknown): Problem[] {
  try {
    f();
  } catch (e) {
    if (e instanceof SurveyError) return e.problems;
    throw e;
  }
  throw new Error('expected a SurveyError');
}

const transect = { kind: 'transect' as const, startKm: 0, endKm: 32.3 };

describe('survey records: CSV reader', () => {
  it('reads the demo file (notes, header, one record a row)', () => {
    const t = parseSurveyCsv(demo);
    expect(t.records.length).toBe(337);
    expect(t.records[0]).toEqual({ year: 2019, atKm: 0.5, detected: true });
    // Header on row 4 after three note lines: the first record is row 5, as a spreadsheet numbers it.
    expect(t.rowLabels[0]).toBe('row 5');
    expect(surveyProblems(t, transect)).toEqual([]);
  });

  it('accepts semicolons, yes/no variants, effort and quoted cells', () => {
    const t = parseSurveyCsv('Year; KM; Detected; Effort\n2020;1,5;y;2\n2021;"2";FALSE;\n2022;3;1;0.5\n'.replace('1,5', '1.5'));
    expect(t.records).toEqual([
      { year: 2020, atKm: 1.5, detected: true, effort: 2 },
      { year: 2021, atKm: 2, detected: false },
      { year: 2022, atKm: 3, detected: true, effort: 0.5 },
    ]);
  });

  it('names the row and column of every bad cell, with the value and what is allowed', () => {
    const p = problemsOf(() => parseSurveyCsv('year,km,detected,effort\n2020,1,yes,1\n20x1,2,no,\n2021,abc,maybe,0\n1850,2,yes,\n'));
    expect(p).toEqual([
      { path: 'rows[3].year', value: '20x1', message: expect.stringMatching(/whole year between 1900 and 2200/) },
      { path: 'rows[4].km', value: 'abc', message: expect.stringMatching(/number/) },
      { path: 'rows[4].detected', value: 'maybe', message: 'must be yes or no (also accepted: y/n, true/false, 1/0)' },
      { path: 'rows[4].effort', value: 0, message: expect.stringMatching(/> 0/) },
      { path: 'rows[5].year', value: 1850, message: expect.stringMatching(/1900 to 2200/) },
    ]);
  });

  it('explains a missing or unknown column and an empty file', () => {
    expect(problemsOf(() => parseSurveyCsv('year,place,detected\n2020,1,yes\n'))[0]).toMatchObject({ path: 'rows[1]', value: 'place', message: expect.stringMatching(/not a known column/) });
    expect(problemsOf(() => parseSurveyCsv('year,detected\n2020,yes\n'))[0].message).toMatch(/position column/);
    expect(problemsOf(() => parseSurveyCsv('# only a note\n'))[0].message).toMatch(/no header row/);
    expect(problemsOf(() => parseSurveyCsv('year,km,detected\n'))[0].message).toMatch(/no records/);
  });

  it('writes CSV that reads back to the same records', () => {
    const t = parseSurveyCsv(demo);
    expect(parseSurveyCsv(surveyToCsv(t.records, ['note'])).records).toEqual(t.records);
  });
});

describe('survey records: JSON (API body, form table) and checks against the scenario', () => {
  it('validates JSON records with paths records[i].field', () => {
    const p = problemsOf(() => parseSurveyRecords([{ year: 2020, atKm: 1, detected: true }, { year: 2021, atKm: 1, detected: 'yes' }, { year: 2021, detected: true }]));
    expect(p.map((x) => x.path)).toEqual(['records[1].detected', 'records[2].atKm']);
    expect(p[1].message).toMatch(/km along the transect/);
  });

  const table = (rows: [number, number, boolean][]): SurveyTable => parseSurveyRecords(rows.map(([year, atKm, detected]) => ({ year, atKm, detected })));

  it('positions off the transect: the row, the value and the transect extent', () => {
    const p = surveyProblems(table([[2020, 1, true], [2021, 40, true], [2022, -1, false]]), transect);
    expect(p).toEqual([
      { path: 'records[1].atKm', value: 40, message: 'is off the transect: must be within [0, 32.3] km' },
      { path: 'records[2].atKm', value: -1, message: 'is off the transect: must be within [0, 32.3] km' },
    ]);
  });

  it('years out of order name the row and the year before it', () => {
    const t = parseSurveyCsv('year,km,detected\n2020,1,yes\n2023,2,yes\n2021,3,yes\n');
    expect(surveyProblems(t, transect)).toEqual([{ path: 'rows[4].year', value: 2021, message: expect.stringMatching(/out of order: it comes after 2023 \(row 3\)/) }]);
  });

  it('fewer than three years with a detection', () => {
    const p = surveyProblems(table([[2020, 1, true], [2021, 2, true], [2022, 3, false]]), transect);
    expect(p).toEqual([{ path: 'records', value: '2020, 2021', message: expect.stringMatching(/at least 3 different years .*found 2 years with a detection among 3 survey years/) }]);
  });

  it('map records on a transect, and the map hook', () => {
    const t = parseSurveyRecords([{ year: 2020, x: 500100, y: 6200100, detected: true }]);
    expect(surveyProblems(t, transect)[0].message).toMatch(/map coordinate, but this scenario is a transect/);
    const extent = { contains: (x: number, y: number) => x >= 500000 && x <= 501000 && y >= 6200000 && y <= 6201000, describe: 'x 500000–501000, y 6200000–6201000' };
    const off = parseSurveyRecords([{ year: 2020, x: 499000, y: 6200100, detected: true }]);
    expect(surveyProblems(off, { kind: 'map', extent })[0]).toMatchObject({ path: 'records[0].x', message: expect.stringMatching(/off the map/) });
    expect(problemsOf(() => parseSurveyRecords([{ year: 2020, x: 1, detected: true }]))[0]).toMatchObject({ path: 'records[0].y' });
  });
});
