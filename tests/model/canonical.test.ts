/**
 * Canonical JSON and scenario fingerprints (server/model/canonical.ts). Independent references: Python's
 * json.dumps(sort_keys=True, separators=(',', ':'), ensure_ascii=False) for the canonical text and
 * hashlib.sha256 for the digest (where python3 is installed), and the SHA-256 test vector of FIPS 180-2
 * (appendix B.1: "abc").
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { canonicalJson, fingerprint } from '../../server/model/canonical.ts';
import { parseScenario } from '../../server/model/scenario.ts';

const sample = {
  title: 'Ossenvale é ✓',
  zeta: [3, { b: 2, a: 1 }, 'x'],
  alpha: { nested: { z: true, y: null, x: -0.25 } },
  count: 12,
  skipped: undefined,
};

const havePython = spawnSync('python3', ['-c', 'import json, hashlib'], { encoding: 'utf8' }).status === 0;
if (!havePython) console.warn('SKIPPED canonical JSON checks against Python json/hashlib: python3 is not available');

describe('canonical JSON', () => {
  it('sorts keys at every depth, keeps array order, drops undefined, has no whitespace', () => {
    expect(canonicalJson(sample)).toBe(
      '{"alpha":{"nested":{"x":-0.25,"y":null,"z":true}},"count":12,"title":"Ossenvale é ✓","zeta":[3,{"a":1,"b":2},"x"]}',
    );
  });

  it('is the same for objects that differ only in key order', () => {
    const reordered = { count: 12, zeta: [3, { a: 1, b: 2 }, 'x'], alpha: { nested: { x: -0.25, z: true, y: null } }, title: 'Ossenvale é ✓' };
    expect(canonicalJson(reordered)).toBe(canonicalJson(sample));
    expect(fingerprint(reordered)).toBe(fingerprint(sample));
    expect(fingerprint({ ...reordered, count: 13 })).not.toBe(fingerprint(sample));
  });

  it('fingerprint is the SHA-256 of the canonical text (FIPS 180-2 vector checks the digest in use)', () => {
    expect(createHash('sha256').update('abc').digest('hex')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(fingerprint(sample)).toBe(createHash('sha256').update(canonicalJson(sample)).digest('hex'));
    expect(fingerprint(sample)).toMatch(/^[0-9a-f]{64}$/);
  });

  it.skipIf(!havePython)('matches Python json.dumps(sort_keys=True, separators=(",", ":"), ensure_ascii=False) and hashlib.sha256', () => {
    const clean = JSON.parse(JSON.stringify(sample)) as unknown; // Python has no undefined
    const r = spawnSync(
      'python3',
      ['-c', 'import json, sys, hashlib; o = json.load(sys.stdin); t = json.dumps(o, sort_keys=True, separators=(",", ":"), ensure_ascii=False); print(json.dumps({"text": t, "sha": hashlib.sha256(t.encode("utf-8")).hexdigest()}))'],
      { input: JSON.stringify(clean), encoding: 'utf8' },
    );
    expect(r.status, r.stderr).toBe(0);
    const py = JSON.parse(r.stdout) as { text: string; sha: string };
    expect(canonicalJson(sample)).toBe(py.text);
    expect(fingerprint(sample)).toBe(py.sha);
  });

  it('a scenario file re-ordered and re-indented keeps its fingerprint after validation', () => {
    const text = readFileSync(new URL('../fixtures/quick-scenario.json', import.meta.url), 'utf8');
    const raw = JSON.parse(text) as Record<string, unknown>;
    const shuffled = Object.fromEntries(Object.entries(raw).reverse());
    expect(fingerprint(parseScenario(JSON.parse(JSON.stringify(shuffled, null, 7))))).toBe(fingerprint(parseScenario(raw)));
  });
});
