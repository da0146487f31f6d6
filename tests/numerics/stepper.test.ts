/** splitStepper: Strang's order of substeps (half growth, full movement, half growth) and its counters. */
import { describe, expect, it } from 'vitest';
import { splitStepper } from '../../server/numerics/stepper.ts';
import type { DiffusionStepper } from '../../server/numerics/diffusion.ts';
import type { ReactionStepper } from '../../server/numerics/reaction.ts';
import { makeGrid } from '../../server/numerics/grid.ts';
import { makeDiffusionOperator, makeDiffusionStepper } from '../../server/numerics/diffusion.ts';
import { makeReactionStepper } from '../../server/numerics/reaction.ts';
import { expectAllClose } from '../helpers/close.ts';

describe('splitStepper', () => {
  it('calls growth(dt/2), movement(dt), growth(dt/2) in that order (Strang 1968)', () => {
    const calls: string[] = [];
    const diffusion: DiffusionStepper = { step: (_u, dt) => void calls.push(`D ${dt}`), counters: { trbdf2Steps: 1, fallbackSteps: 0, factorisations: 2 } };
    const reaction: ReactionStepper = { step: (_u, _h, dt) => void calls.push(`R ${dt}`), counters: { substeps: 6 } };
    const s = splitStepper(diffusion, reaction);
    s.step(new Float64Array(1), new Float64Array(1), 0.5);
    expect(calls).toEqual(['R 0.25', 'D 0.5', 'R 0.25']);
    const c = s.counters();
    expect(c).toEqual({ diffusion: { trbdf2Steps: 1, fallbackSteps: 0, factorisations: 2 }, reaction: { substeps: 6 } });
    expect(c.diffusion).not.toBe(diffusion.counters); // a copy, so the caller's report does not change later
  });

  it('uniform density with exponential growth: movement does nothing and the step is exactly e^{r dt}', () => {
    // u' = r u everywhere, u uniform, reflecting ends: L u = 0, so the split step is the growth alone.
    const grid = makeGrid([0, 2], 0.1, 4);
    const n = grid.nCells;
    const op = makeDiffusionOperator(grid, new Float64Array(n).fill(1), new Float64Array(n).fill(1));
    const r = 0.7;
    const reaction = makeReactionStepper({ hostAtCells: new Uint8Array(n).fill(1), mortalityAtCells: new Float64Array(n), perCapita: () => r, hostKillRate: 0, stiffness: 1 });
    const s = splitStepper(makeDiffusionStepper(op), reaction);
    const u = new Float64Array(n).fill(0.01);
    const h = new Float64Array(n).fill(1);
    for (let k = 0; k < 10; k++) s.step(u, h, 0.1);
    // Heun in log space is exact for a constant rate; TR-BDF2 keeps a constant (a null vector of L).
    expectAllClose(u, new Float64Array(n).fill(0.01 * Math.exp(r)), { rtol: 1e-12 });
  });
});
