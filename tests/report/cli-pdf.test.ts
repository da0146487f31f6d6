import { describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main, parseArgs } from '../../server/cli.ts';
import { readPdfText, squash } from '../helpers/pdf.ts';

describe('npm run evaluate -- FILE --pdf OUT', () => {
  it('parses --pdf and refuses it without a file name', () => {
    expect(parseArgs(['s.json', '--pdf', 'out.pdf']).pdf).toBe('out.pdf');
    expect(() => parseArgs(['s.json', '--pdf'])).toThrow(/--pdf/);
    expect(() => parseArgs(['s.json', '--pdf', '--json'])).toThrow(/needs a file name/);
  });

  it('writes the briefing atomically (no temporary file left) for a demo scenario', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cli-pdf-'));
    try {
      const out = join(dir, 'briefing.pdf');
      const code = await main(['scenarios/clearing-delays.json', '--pdf', out, '--quiet', '--threads', '1']);
      expect(code).toBe(0);
      expect(readdirSync(dir)).toEqual(['briefing.pdf']);
      const buf = readFileSync(out);
      expect(buf.subarray(0, 5).toString()).toBe('%PDF-');
      const text = squash((await readPdfText(buf)).map((p) => p.text).join(' '));
      expect(text).toContain(squash('Ossenvale north valley'));
      expect(text).toContain(squash('Moravin campground'));
      expect(text).toContain(squash('hazardous'));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('writes nothing when the scenario is invalid', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'cli-pdf-'));
    try {
      const out = join(dir, 'briefing.pdf');
      const code = await main(['package.json', '--pdf', out, '--quiet']);
      expect(code).toBe(1);
      expect(existsSync(out)).toBe(false);
      expect(readdirSync(dir)).toEqual([]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
