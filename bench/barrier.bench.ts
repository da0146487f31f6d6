/**
 * Bench: one barrier option's full analysis on a 100 km transect — baseline run, option run, pinning
 * verification past the horizon, critical-width bisection (with its half-step and doubled-window checks)
 * and the width–delay curve — for two pests: the mate-limited borer of the "clearing holds" demo (host
 * depletion, die-out verification) and a cubic-Allee pest without host depletion (Newton + Sturm
 * verification). Floor: < 5 s for one option's full analysis including the bisection. Best of 2, with
 * and without recorded profiles; stage times from the fastest repetition.
 */
import { parseScenario, pointScenario, type PointScenario } from '../server/model/scenario.ts';
import { analyseBaseline, analyseOption, criticalWidth } from '../server/analysis/verdict/barrier.ts';

const FLOOR_MS = 5000;

function transect(pest: Record<string, unknown>, widthM: number, horizonYears: number): PointScenario {
  return pointScenario(
    parseScenario({
      title: 'barrier bench, 100 km',
      pest: { name: 'bench pest', ...pest },
      transect: {
        segments: [
          { habitat: 'host-forest', lengthKm: 40, stocking: 0.9, stemsPerHa: 420 },
          { habitat: 'host-forest', lengthKm: 60, stocking: 0.85, stemsPerHa: 380 },
        ],
      },
      infestation: { fromKm: 0, toKm: 3 },
      sites: [
        { name: 'km 50', atKm: 50 },
        { name: 'km 90', atKm: 90 },
      ],
      horizonYears,
      barrier: { lengthKm: 5, costPerStem: 30, costUnit: 'credits', options: [{ name: 'cut at km 25', fromKm: 25, widthM }] },
    }),
  );
}

const cases: [string, PointScenario][] = [
  [
    'mate-limited borer with host depletion (holds demo profile), 1200 m cut',
    transect(
      {
        diffusionHost: 1,
        diffusionOpen: 1,
        edgePreferenceOpen: 0.85,
        growth: { form: 'mate-finding', birthRate: 4, deathRate: 0.5, crowding: 2.577, mating: 'saturating', mateScale: 0.25 },
        hostKillRate: 0.1,
        mortalityOpen: 4,
      },
      1200,
      60,
    ),
  ],
  [
    'cubic Allee pest, hosts not depleted, 800 m cut',
    transect(
      { diffusionHost: 1, diffusionOpen: 1, edgePreferenceOpen: 0.5, growth: { form: 'allee-cubic', rate: 1, alleeThreshold: 0.25 }, hostKillRate: 0, mortalityOpen: 1 },
      800,
      100,
    ),
  ],
];

let worst = 0;
for (const [name, s] of cases) {
  const option = s.barrier!.options[0];
  let best = Infinity;
  let stages = '';
  let outcome = '';
  let cpuMs = 0;
  for (const record of [false, true]) {
    for (let rep = 0; rep < 2; rep++) {
      const t0 = performance.now();
      const c0 = process.cpuUsage();
      const baseline = analyseBaseline(s, [option], { record });
      const t1 = performance.now();
      const a = analyseOption(s, option, { baseline, record });
      const t2 = performance.now();
      const cpu = process.cpuUsage(c0);
      const ms = t2 - t0;
      if (!record && ms < best) {
        best = ms;
        cpuMs = (cpu.user + cpu.system) / 1000;
        const c = a.result.criticalWidth;
        outcome =
          `verdict ${a.result.verdict.kind}; critical width [${c.bracketM?.map((x) => x.toFixed(0)).join(', ')}] m in ${c.runs} runs` +
          (c.phasePlaneM !== null ? ` (phase-plane ${c.phasePlaneM.toFixed(0)} m)` : '') +
          `; ${a.result.widthDelay.length} curve widths`;
        stages = `baseline ${(t1 - t0).toFixed(0)} ms, option analysis ${(t2 - t1).toFixed(0)} ms`;
      }
      if (record && rep === 0) console.log(`    with recorded profiles: ${ms.toFixed(0)} ms`);
    }
  }
  // The bisection alone (uses the baseline snapshot).
  const baseline = analyseBaseline(s, [option], { record: false });
  const tb = performance.now();
  criticalWidth(s, option, { baseline });
  const bisectMs = performance.now() - tb;
  console.log(`${name}: full analysis ${best.toFixed(0)} ms wall, ${cpuMs.toFixed(0)} ms CPU (best of 2, no profiles) — ${stages}; bisection alone ${bisectMs.toFixed(0)} ms`);
  console.log(`    ${outcome}`);
  worst = Math.max(worst, best);
}
const load = (await import('node:os')).loadavg()[0];
console.log(`floor: one option's full analysis < ${FLOOR_MS} ms — ${worst < FLOOR_MS ? 'met' : 'NOT met'} (slowest case ${worst.toFixed(0)} ms wall; 1-min load average ${load.toFixed(1)} on ${(await import('node:os')).cpus().length} cores)`);
