/**
 * House rule: no function over 80 lines and no file over 400 lines in server/ unless a comment says why.
 * A long function's own doc comment (or the comment just above its declaration) must contain
 * "Longer than 80 lines on purpose"; a long file's header must say "400 lines" with its reason.
 * Lines are counted from the syntax tree (TypeScript's own parser), from a function's first line to its last.
 */
import fs from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

const ROOT = path.resolve(import.meta.dirname, '..');
const MAX_FUNCTION_LINES = 80;
const MAX_FILE_LINES = 400;
const FUNCTION_REASON = /Longer than 80 lines on purpose/;
const FILE_REASON = /400 lines/;

function serverFiles(dir = path.join(ROOT, 'server')): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    return e.isDirectory() ? serverFiles(p) : p.endsWith('.ts') && !p.endsWith('.d.ts') ? [p] : [];
  });
}

/** The node whose leading comments document a function: its statement, property or the function itself. */
function documentedNode(n: ts.Node): ts.Node {
  let d: ts.Node = n;
  if (ts.isArrowFunction(n) || ts.isFunctionExpression(n)) {
    const p = n.parent;
    if (ts.isVariableDeclaration(p)) d = p.parent.parent; // declaration list → statement
    else if (ts.isPropertyAssignment(p)) d = p;
  }
  return d;
}

function leadingCommentText(src: ts.SourceFile, n: ts.Node): string {
  const text = src.getFullText();
  return (ts.getLeadingCommentRanges(text, n.getFullStart()) ?? []).map((r) => text.slice(r.pos, r.end)).join('\n');
}

interface Long {
  where: string;
  lines: number;
}

function longFunctions(file: string): Long[] {
  const src = ts.createSourceFile(file, fs.readFileSync(file, 'utf8'), ts.ScriptTarget.Latest, true);
  const out: Long[] = [];
  const visit = (n: ts.Node) => {
    if ((ts.isFunctionDeclaration(n) || ts.isArrowFunction(n) || ts.isMethodDeclaration(n) || ts.isFunctionExpression(n)) && n.body) {
      const a = src.getLineAndCharacterOfPosition(n.getStart()).line;
      const b = src.getLineAndCharacterOfPosition(n.end).line;
      const lines = b - a + 1;
      if (lines > MAX_FUNCTION_LINES && !FUNCTION_REASON.test(leadingCommentText(src, documentedNode(n)))) {
        const name = n.name?.getText() ?? (ts.isVariableDeclaration(n.parent) ? n.parent.name.getText() : ts.isPropertyAssignment(n.parent) ? n.parent.name.getText() : '(anonymous)');
        out.push({ where: `${path.relative(ROOT, file)}:${a + 1} ${name}`, lines });
      }
    }
    ts.forEachChild(n, visit);
  };
  visit(src);
  return out;
}

describe('sizes in server/', () => {
  const files = serverFiles();

  it('finds the server files (the check looks at something)', () => {
    expect(files.length).toBeGreaterThan(50);
  });

  it(`no function over ${MAX_FUNCTION_LINES} lines without "Longer than 80 lines on purpose" in its comment`, () => {
    const long = files.flatMap(longFunctions).map((l) => `${l.where} (${l.lines} lines)`);
    expect(long).toEqual([]);
  });

  it(`no file over ${MAX_FILE_LINES} lines without a reason in its header`, () => {
    const long = files
      .map((f) => ({ f, text: fs.readFileSync(f, 'utf8') }))
      .filter(({ text }) => text.split('\n').length > MAX_FILE_LINES)
      .filter(({ text }) => !FILE_REASON.test(text.slice(0, text.indexOf('*/') + 2)))
      .map(({ f, text }) => `${path.relative(ROOT, f)} (${text.split('\n').length} lines)`);
    expect(long).toEqual([]);
  });

  it('the counting sees a long undocumented function (so the rule can fail)', () => {
    const tmp = path.join(ROOT, 'tests', '.size-probe.ts');
    const body = Array.from({ length: 90 }, (_, i) => `  x += ${i};`).join('\n');
    fs.writeFileSync(tmp, `/** Adds. */\nexport function f(): number {\n  let x = 0;\n${body}\n  return x;\n}\n/** Adds. Longer than 80 lines on purpose: a probe. */\nexport const g = (): number => {\n  let x = 0;\n${body}\n  return x;\n};\n`);
    try {
      const found = longFunctions(tmp).map((l) => l.where.split(' ')[1]);
      expect(found).toEqual(['f']);
    } finally {
      fs.rmSync(tmp);
    }
  });
});
