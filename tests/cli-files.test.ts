/**
 * CLI outputs (regression tests): killed mid-write the CLI left hidden temporaries (14 of 24 trials) and
 * `--pdf` with `--out` were not one unit; `--help` answered "is not a known option". The kill trials
 * themselves run in `npm run bench:faults`; here the recovery is checked on the states a kill leaves.
 */
import { afterAll, describe, expect, it, vi } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main, parseArgs, recoverOutputs, writeTogether } from '../server/cli.ts';

const root = fileURLToPath(new URL('..', import.meta.url));
const quick = join(root, 'tests/fixtures/quick-scenario.json');
const dir = mkdtempSync(join(tmpdir(), 'barrier-cli-files-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A process id that is not running (spawned and finished). */
function deadPid(): number {
  return Number(spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' }).stdout);
}

describe('--help', () => {
  it('prints the usage on standard output and exits 0 (regression: "is not a known option")', async () => {
    expect(parseArgs(['--help']).help).toBe(true);
    expect(parseArgs(['-h', 'x.json']).help).toBe(true);
    const out: string[] = [];
    const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => (out.push(String(s)), true));
    const code = await main(['--help']);
    o.mockRestore();
    expect(code).toBe(0);
    expect(out.join('')).toMatch(/^usage: npm run evaluate -- <scenario.json>/);
    expect(out.join('')).toContain('--help, -h');
  });
});

describe('output files', () => {
  it('writeTogether writes every file and leaves no temporary or journal', () => {
    const a = join(dir, 'a.pdf');
    const b = join(dir, 'a.json');
    writeTogether([{ path: a, data: Buffer.from('pdf-1') }, { path: b, data: 'json-1' }]);
    expect(readFileSync(a, 'utf8')).toBe('pdf-1');
    expect(readFileSync(b, 'utf8')).toBe('json-1');
    expect(readdirSync(dir).filter((n) => n.startsWith('.'))).toEqual([]);
  });

  it('a write killed before its journal leaves the old pair, and the next run removes the temporaries', () => {
    const sub = mkdtempSync(join(dir, 'k1-'));
    writeFileSync(join(sub, 'r.pdf'), 'old-pdf');
    writeFileSync(join(sub, 'r.json'), 'old-json');
    const pid = deadPid();
    writeFileSync(join(sub, `.r.pdf.${pid}.tmp`), 'new-pdf (partial');
    writeFileSync(join(sub, `.r.json.${pid}.tmp`), '{"half');
    writeFileSync(join(sub, `.r.pdf.${process.pid + 0}.tmp.keep`), 'not ours');
    const notes = recoverOutputs([join(sub, 'r.pdf'), join(sub, 'r.json')]);
    expect(notes).toHaveLength(2);
    expect(readdirSync(sub).sort()).toEqual([`.r.pdf.${process.pid}.tmp.keep`, 'r.json', 'r.pdf']);
    expect(readFileSync(join(sub, 'r.pdf'), 'utf8')).toBe('old-pdf');
    expect(readFileSync(join(sub, 'r.json'), 'utf8')).toBe('old-json');
  });

  it('a write killed after its journal is completed by the next run: the new pair, never a mixed one', () => {
    const sub = mkdtempSync(join(dir, 'k2-'));
    writeFileSync(join(sub, 'r.pdf'), 'new-pdf'); // the first rename happened
    writeFileSync(join(sub, 'r.json'), 'old-json');
    const pid = deadPid();
    writeFileSync(join(sub, `.r.json.${pid}.tmp`), 'new-json');
    writeFileSync(
      join(sub, `.r.pdf.${pid}.pair`),
      JSON.stringify({ renames: [[join(sub, `.r.pdf.${pid}.tmp`), join(sub, 'r.pdf')], [join(sub, `.r.json.${pid}.tmp`), join(sub, 'r.json')]] }),
    );
    recoverOutputs([join(sub, 'r.pdf')]);
    expect(readFileSync(join(sub, 'r.pdf'), 'utf8')).toBe('new-pdf');
    expect(readFileSync(join(sub, 'r.json'), 'utf8')).toBe('new-json');
    expect(readdirSync(sub).sort()).toEqual(['r.json', 'r.pdf']);
  });

  it('temporaries of a running process are left alone', () => {
    const sub = mkdtempSync(join(dir, 'k3-'));
    writeFileSync(join(sub, `.r.json.${process.pid}.tmp`), 'in progress');
    expect(recoverOutputs([join(sub, 'r.json')])).toEqual([]);
    expect(existsSync(join(sub, `.r.json.${process.pid}.tmp`))).toBe(true);
  });

  it('--pdf with --out writes both files of one run (same fingerprint and run date) and no leftovers', async () => {
    const sub = mkdtempSync(join(dir, 'pair-'));
    const pdf = join(sub, 'b.pdf');
    const out = join(sub, 'b.json');
    const err = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    const code = await main([quick, '--json', '--out', out, '--pdf', pdf, '--quiet', '--threads', '1']);
    err.mockRestore();
    expect(code).toBe(0);
    const doc = JSON.parse(readFileSync(out, 'utf8'));
    const pdfText = readFileSync(pdf).toString('latin1');
    expect(pdfText.startsWith('%PDF-')).toBe(true);
    expect(doc.scenarioFingerprint).toMatch(/\w+/);
    expect(readdirSync(sub).sort()).toEqual(['b.json', 'b.pdf']);
  });
});
