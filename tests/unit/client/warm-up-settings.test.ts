import { describe, expect, it } from 'vitest';
import { warmUpSettings } from '../../../src/components/sheet/useWorkerJob';
import { createSheetFromTemplate } from '../../../src/lib/sheet/templates';

const runOf = (changes: { gain?: number; dt?: number; maxTicks?: number }) => ({ ...createSheetFromTemplate('tri-radial', { kind: 'sphere', radius: 0.03 }).motion.run, ...changes });

describe('the run worker’s warm-up settings', () => {
  it('span the whole run in at most 500 ticks, so the warm-up reaches the ticks near the target', () => {
    const run = runOf({ gain: 1.5, dt: 0.005, maxTicks: 2000 });
    const warm = warmUpSettings(run);
    expect(warm.maxTicks).toBe(500);
    expect(warm.dt).toBeNear(0.02, { rel: 1e-12 });
    expect(warm.maxTicks * warm.dt).toBeNear(run.maxTicks * run.dt, { rel: 1e-12 });
    // Everything but the length and the step is the sheet's own, in the same key order (the hidden class a job's settings arrive with).
    expect(Object.keys(warm)).toEqual(Object.keys(run));
    expect({ ...warm, dt: run.dt, maxTicks: run.maxTicks }).toEqual(run);
  });

  it('stretch the step at most to gain × step = 0.5, where the explicit Euler error factor 1 − gain·dt still shrinks without overshoot', () => {
    // Explicit Euler on x' = −k·x multiplies the error by (1 − k·dt) each step: monotone decay needs k·dt < 1 (Hairer & Wanner, Solving ODEs II, §IV.2).
    const warm = warmUpSettings(runOf({ gain: 10, dt: 0.005, maxTicks: 20_000 }));
    expect(warm.maxTicks).toBe(500);
    expect(warm.dt).toBeNear(0.05, { rel: 1e-12 });
    expect(1 - warm.gain * warm.dt).toBeGreaterThan(0);
  });

  it('keep a short run as the sheet has it, and never shorten a step the sheet already made longer', () => {
    const short = runOf({ gain: 1.5, dt: 0.005, maxTicks: 300 });
    expect(warmUpSettings(short)).toEqual(short);
    const coarse = runOf({ gain: 200, dt: 0.01, maxTicks: 2000 });
    expect(warmUpSettings(coarse).dt).toBe(0.01);
  });
});
