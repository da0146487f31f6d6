/**
 * The robustness harness: sends mutated scenarios, hostile form bodies and hostile requests to the app
 * (app.inject, no network), evaluates the accepted scenarios with the server's limit check and a wall-time
 * stop, and counts what must never happen: a crash (inject throwing), a 5xx, a stack trace or an unescaped
 * hostile string in a body, a result with a non-finite number, an evaluation failing with anything but a
 * named input, limit or computation error. Figures are returned for printing.
 */
import { readFileSync } from 'node:fs';
import type { FastifyInstance, InjectOptions } from 'fastify';
import { parseScenario, type Scenario } from '../../server/model/scenario.ts';
import { InputError } from '../../server/model/errors.ts';
import { checkLimits, DEFAULT_LIMITS } from '../../server/web/limits.ts';
import { evaluateScenarioParallel } from '../../server/jobs/parallel.ts';
import { nonFiniteNumbers } from '../../server/numerics/finite.ts';
import { scenarioToForm } from '../../server/web/form-state.ts';
import { hostileFormBodies, hostileRequests, mutatedScenarios } from './mutate.ts';

export const QUICK_SCENARIO_URL = new URL('../web/fixtures/scenarios/quick-check.json', import.meta.url);

export interface FuzzOptions {
  seed: number;
  scenarios: number;
  forms: number;
  requests: number;
  /** Most accepted scenarios to evaluate. */
  evaluate: number;
  /** Wall time after which one evaluation is cancelled [s]. */
  evaluationSeconds?: number;
}

export interface FuzzFigures {
  requests: number;
  byStatus: Record<string, number>;
  crashes: string[];
  serverErrors: string[];
  stackTraces: string[];
  unescaped: string[];
  accepted: number;
  evaluated: number;
  verdicts: Record<string, number>;
  refusedAtRun: Record<string, number>;
  nonFinite: string[];
  unexpectedFailures: string[];
  cpuMs: number;
  wallMs: number;
}

/** A body that shows internals: a stack frame line, or an exception's class name with its message. */
const STACK = /\n\s+at [\w.<>]+ \(|\bat \S+\.ts:\d+:\d+|(TypeError|RangeError|ReferenceError|SqliteError):/;

export async function fuzz(app: FastifyInstance, opts: FuzzOptions): Promise<FuzzFigures> {
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const f: FuzzFigures = {
    requests: 0,
    byStatus: {},
    crashes: [],
    serverErrors: [],
    stackTraces: [],
    unescaped: [],
    accepted: 0,
    evaluated: 0,
    verdicts: {},
    refusedAtRun: {},
    nonFinite: [],
    unexpectedFailures: [],
    cpuMs: 0,
    wallMs: 0,
  };
  const send = async (what: string, req: InjectOptions) => {
    f.requests++;
    try {
      const r = await app.inject(req);
      f.byStatus[r.statusCode] = (f.byStatus[r.statusCode] ?? 0) + 1;
      if (r.statusCode >= 500 && r.statusCode !== 503 && r.statusCode !== 507) f.serverErrors.push(`${r.statusCode} ${what}: ${r.body.slice(0, 200)}`);
      if (STACK.test(r.body)) f.stackTraces.push(`${what}: ${r.body.slice(0, 200)}`);
      if (/<script>alert\(1\)<\/script>/.test(r.body) && (r.headers['content-type'] ?? '').toString().includes('html')) f.unescaped.push(what);
      return r;
    } catch (e) {
      f.crashes.push(`${what}: ${(e as Error).stack ?? e}`);
      return undefined;
    }
  };

  const baseText = readFileSync(QUICK_SCENARIO_URL, 'utf8');
  const base = JSON.parse(baseText) as unknown;
  const toEvaluate: Scenario[] = [];
  for (const [i, m] of mutatedScenarios(base, opts.scenarios, opts.seed).entries()) {
    const r = await send(`scenario ${i} (${m.kinds.join(', ')})`, { method: 'POST', url: '/api/scenarios', headers: { 'content-type': 'application/json' }, payload: m.text });
    if (r?.statusCode === 201) {
      f.accepted++;
      if (toEvaluate.length < opts.evaluate) toEvaluate.push(parseScenario(r.json().scenario));
    }
    // Every tenth also goes through the upload and the JSON editor, which share the reader and the schema.
    if (i % 10 === 0) {
      const b = '----fuzz';
      await send(`upload ${i}`, {
        method: 'POST',
        url: '/scenarios/upload',
        headers: { 'content-type': `multipart/form-data; boundary=${b}` },
        payload: `--${b}\r\nContent-Disposition: form-data; name="file"; filename="f.json"\r\nContent-Type: application/json\r\n\r\n${m.text}\r\n--${b}--\r\n`,
      });
      await send(`editor ${i}`, { method: 'POST', url: '/scenarios/demo-quick-check/json', headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: new URLSearchParams({ text: m.text, _action: 'check' }).toString() });
    }
  }
  const form = scenarioToForm(base);
  for (const [i, body] of hostileFormBodies(form, opts.forms, opts.seed + 1).entries()) {
    await send(`form ${i}`, { method: 'POST', url: '/scenarios/new', headers: { 'content-type': 'application/x-www-form-urlencoded' }, payload: new URLSearchParams(body).toString() });
  }
  for (const [i, req] of hostileRequests(opts.requests, opts.seed + 2).entries()) {
    await send(`request ${i} ${req.method} ${req.url}`, { method: req.method as 'GET', url: req.url, headers: req.headers, payload: req.payload });
  }

  // Evaluate what was accepted, as the server would: limit check first, then the run with a wall-time stop.
  const limits = { ...DEFAULT_LIMITS, maxCells: 20_000, maxHorizonYears: 40 };
  for (const [i, s] of toEvaluate.entries()) {
    try {
      checkLimits(s, limits);
    } catch (e) {
      if (e instanceof InputError) {
        f.refusedAtRun[e.code] = (f.refusedAtRun[e.code] ?? 0) + 1;
        continue;
      }
      f.unexpectedFailures.push(`limit check ${i}: ${(e as Error).stack}`);
      continue;
    }
    const deadline = performance.now() + (opts.evaluationSeconds ?? 5) * 1000;
    try {
      const doc = await evaluateScenarioParallel(s, { threads: 1, shouldCancel: () => performance.now() > deadline });
      f.evaluated++;
      for (const o of doc.options) f.verdicts[o.verdict.kind] = (f.verdicts[o.verdict.kind] ?? 0) + 1;
      const bad = nonFiniteNumbers(doc);
      if (bad.length) f.nonFinite.push(`evaluation ${i}: ${JSON.stringify(bad)}`);
    } catch (e) {
      if (e instanceof InputError) f.refusedAtRun[e.code] = (f.refusedAtRun[e.code] ?? 0) + 1;
      else f.unexpectedFailures.push(`evaluation ${i}: ${(e as Error).stack}`);
    }
  }
  const cpu = process.cpuUsage(cpu0);
  f.cpuMs = (cpu.user + cpu.system) / 1000;
  f.wallMs = performance.now() - t0;
  return f;
}

/** The figures as a few lines of text. */
export function formatFigures(f: FuzzFigures): string {
  const list = (o: Record<string, number>) =>
    Object.entries(o)
      .sort()
      .map(([k, v]) => `${k}: ${v}`)
      .join(', ') || 'none';
  return [
    `requests ${f.requests} (by status: ${list(f.byStatus)})`,
    `crashes ${f.crashes.length}, 5xx ${f.serverErrors.length}, stack traces ${f.stackTraces.length}, unescaped ${f.unescaped.length}`,
    `scenarios accepted ${f.accepted}, evaluated ${f.evaluated} (verdicts: ${list(f.verdicts)}), refused at run: ${list(f.refusedAtRun)}`,
    `non-finite results ${f.nonFinite.length}, unexpected failures ${f.unexpectedFailures.length}`,
    `CPU ${(f.cpuMs / 1000).toFixed(1)} s, wall ${(f.wallMs / 1000).toFixed(1)} s`,
  ].join('\n');
}
