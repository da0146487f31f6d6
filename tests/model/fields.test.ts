/** Field specs: range text and range test by hand, and the table's own consistency (defaults in range, sources given). */
import { describe, expect, it } from 'vitest';
import { describeRange, FIELDS, inRange, type FieldSpec } from '../../server/model/fields.ts';

const spec = (over: Partial<FieldSpec>): FieldSpec => ({ label: 'x', unit: 'km', min: 0, max: 10, typical: '', help: '', source: '', ...over });

describe('describeRange and inRange', () => {
  it('inclusive and exclusive bounds, open upper end, no unit', () => {
    expect(describeRange(spec({ minExclusive: true }))).toBe('> 0 and ≤ 10 km');
    expect(describeRange(spec({ maxExclusive: true, unit: '' }))).toBe('≥ 0 and < 10');
    expect(describeRange(spec({ max: Infinity }))).toBe('≥ 0 km');
  });
  it('bounds by hand; non-finite values are never in range', () => {
    const s = spec({ minExclusive: true, maxExclusive: false });
    expect([0, 1e-300, 10, 10.0000001].map((v) => inRange(s, v))).toEqual([false, true, true, false]);
    expect(inRange(spec({ max: Infinity }), Infinity)).toBe(false);
    expect(inRange(spec({}), NaN)).toBe(false);
  });
});

describe('FIELDS table', () => {
  const entries = Object.entries(FIELDS) as [string, FieldSpec][];
  it('every field has a label, help and a source; min < max', () => {
    const bad = entries.filter(([, f]) => !f.label || !f.help || !f.source || !(f.min < f.max)).map(([k]) => k);
    expect(bad).toEqual([]);
  });
  it('every default lies in its own allowed range', () => {
    const bad = entries.filter(([, f]) => f.defaultValue !== undefined && !inRange(f, f.defaultValue)).map(([k, f]) => `${k}: ${f.defaultValue} not ${describeRange(f)}`);
    expect(bad).toEqual([]);
  });
  it('probabilities and fractions stay within [0, 1]', () => {
    for (const k of ['edgePreferenceOpen', 'detectionLevel'] as const) {
      const f = FIELDS[k] as FieldSpec;
      expect(f.min).toBeGreaterThanOrEqual(0);
      expect(f.max).toBeLessThanOrEqual(1);
    }
  });
});
