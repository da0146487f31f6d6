/**
 * Builders for the small, invented scenarios the verification tests run through the real engine.
 * Every scenario goes through the public schema (parseScenario), so the tests also exercise validation.
 */
import { parseScenario, pointScenario, type PointScenario, type ScenarioInput } from '../../server/model/scenario.ts';
import { buildLayout } from '../../server/problem/layout.ts';
import { chooseResolution, type Resolution } from '../../server/problem/discretise.ts';
import { runLayout, type RunOutput, type RunRequest } from '../../server/analysis/run/simulate.ts';

type PestInput = ScenarioInput['pest'];
type SegmentInput = ScenarioInput['transect']['segments'][number];

/** A pest profile with neutral defaults (no edge preference, no host depletion); override what a test needs. */
export function testPest(over: Partial<PestInput> & Pick<PestInput, 'growth'>): PestInput {
  return {
    name: 'verification pest (invented)',
    diffusionHost: 1,
    diffusionOpen: 1,
    edgePreferenceOpen: 0.5,
    hostKillRate: 0,
    mortalityOpen: 1,
    ...over,
  };
}

export function hostSegment(lengthKm: number, stocking = 1): SegmentInput {
  return { habitat: 'host-forest', lengthKm, stocking, stemsPerHa: 400 };
}

export function clearingSegment(lengthKm: number): SegmentInput {
  return { habitat: 'clearing', lengthKm };
}

/** Validates a scenario through the schema and resolves it to point values. */
export function testScenario(input: Omit<ScenarioInput, 'title'> & { title?: string }): PointScenario {
  return pointScenario(parseScenario({ title: 'verification run', ...input }));
}

/** Runs the baseline layout of a scenario with an optional resolution override (factors divide the automatic choice). */
export function runScenario(
  s: PointScenario,
  opts: { cellFactor?: number; stepFactor?: number; resolution?: Partial<Resolution> } & Omit<RunRequest, 'scenario' | 'pieces' | 'resolution'> = {},
): RunOutput {
  const pieces = buildLayout(s);
  const auto = chooseResolution(s, pieces);
  const { cellFactor = 1, stepFactor = 1, resolution, ...rest } = opts;
  return runLayout({
    scenario: s,
    pieces,
    record: false,
    ...rest,
    resolution: { ...auto, cellKm: auto.cellKm / cellFactor, stepYears: auto.stepYears / stepFactor, ...resolution },
  });
}
