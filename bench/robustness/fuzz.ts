/**
 * `npm run bench:fuzz [-- ROUNDS [PER_ROUND]]`: the long fuzz run. ROUNDS rounds (default 10) of PER_ROUND
 * mutated scenarios (default 500), with form bodies and hostile requests, each round a new seed, against a
 * fresh app (app.inject, no network). Prints the figures of each round and the totals; exits 1 when any
 * round saw a crash, a 5xx, a stack trace, an unescaped string, a non-finite result or an unexpected failure.
 */
import { buildTestApp } from '../../tests/helpers/build-app.ts';
import { formatFigures, fuzz, type FuzzFigures } from '../../tests/robustness/harness.ts';

const rounds = Number(process.argv[2] ?? 10);
const perRound = Number(process.argv[3] ?? 500);
const totals = { requests: 0, accepted: 0, evaluated: 0, bad: 0, cpuMs: 0 };
for (let k = 0; k < rounds; k++) {
  const seed = 1000 + k;
  const t = await buildTestApp({ formPerMinute: 1e9, computePerMinute: 1e9 });
  let f: FuzzFigures;
  try {
    f = await fuzz(t.app, { seed, scenarios: perRound, forms: Math.ceil(perRound / 3), requests: Math.ceil(perRound / 2), evaluate: Math.ceil(perRound / 5), evaluationSeconds: 10 });
  } finally {
    await t.close();
  }
  const bad = [...f.crashes, ...f.serverErrors, ...f.stackTraces, ...f.unescaped, ...f.nonFinite, ...f.unexpectedFailures];
  process.stdout.write(`\n--- round ${k + 1}/${rounds}, seed ${seed}\n${formatFigures(f)}\n`);
  for (const b of bad.slice(0, 10)) process.stdout.write(`  FINDING: ${b.slice(0, 400)}\n`);
  totals.requests += f.requests;
  totals.accepted += f.accepted;
  totals.evaluated += f.evaluated;
  totals.bad += bad.length;
  totals.cpuMs += f.cpuMs;
}
process.stdout.write(
  `\nfuzz total: ${rounds} rounds, ${totals.requests} requests, ${totals.accepted} scenarios accepted, ${totals.evaluated} evaluated, ` +
    `${totals.bad} findings, CPU ${(totals.cpuMs / 1000).toFixed(1)} s\n`,
);
process.exitCode = totals.bad ? 1 : 0;
