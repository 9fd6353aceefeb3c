/**
 * Honest pipelining: the runner overlaps link traffic with settling, but the
 * instruments must never capture before the plan's settle time has passed
 * since the stimulus last changed, nor while it changes. Checked against the
 * simulated bench's own record (its clock) of when the generator changed and
 * which time spans the scope and meter sampled — not against the runner's
 * bookkeeping. A realistic link (3 ms per reply) over TCP on 127.0.0.1, real
 * time, as in test/bench/sweep-efficiency.ts. Rule: settle = the plan's
 * settleS (app/sweep/plan/settle.ts); expected values are our own definition.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import type { SweepRequest } from '../../../app/contract/contract';
import { startSimulatedBench, type GeneratorOutput, type SimulatedBench } from '../../../app/sim';
import { tempFolder } from './helpers';

interface Window {
  startS: number;
  endS: number;
}

describe('the runner never acquires before the settle time since the last stimulus change', () => {
  const folder = tempFolder();
  let bench: SimulatedBench;
  let service: RolloffService;
  let buildId: number;
  const changesS: number[] = [];
  let windows: Window[] = [];

  beforeAll(async () => {
    const designFile = makeDesignFromTemplate('inverting-lowpass', {});
    bench = await startSimulatedBench({ design: designFile, tcpPort: 0, timeScale: 1, latencyS: 0.003, noiseVrms: 1e-4 });
    const { model, clock } = bench;
    // The bench's record, in its own clock: every generator change, every span the scope or meter sampled.
    const setGenerator = model.setGenerator.bind(model);
    model.setGenerator = (output: GeneratorOutput) => {
      changesS.push(clock.nowS()); // read before the change: never later than the model's own change time
      setGenerator(output);
    };
    const sample = model.sample.bind(model);
    model.sample = (node, startS, intervalS, count) => {
      windows.push({ startS, endS: startS + count * intervalS });
      return sample(node, startS, intervalS, count);
    };
    const sampleStratified = model.sampleStratified.bind(model);
    model.sampleStratified = (node, startS, durationS, count) => {
      windows.push({ startS, endS: startS + durationS });
      return sampleStratified(node, startS, durationS, count);
    };
    service = await openServiceAt(join(folder.path, 'settle.sqlite'), { maxStimulusVpp: 1 });
    const design = await service.saveDesign(designFile);
    buildId = (await service.createBuild({ designId: design.id, label: 'settle check', notes: '', actualValues: {} })).id;
    for (const role of ['generator', 'meter', 'scope'] as const) await service.connect({ role, address: bench.addresses[role], profileId: `scpi-${role}` });
  });

  afterAll(async () => {
    await service.close();
    await bench.stop();
    folder.remove();
  });

  /** Windows that start less than `settleS` after a change, or during which the stimulus changed. */
  const violations = (settleS: number) =>
    windows.filter((w) => changesS.some((changeS) => changeS > w.startS - settleS && changeS < w.endS));

  for (const measurement of ['scope', 'meter'] as const) {
    it(`${measurement}: every capture starts ≥ settle after the last change, and nothing changes during it`, async () => {
      const request: SweepRequest = {
        buildId, kind: 'ac', from: 1e3, to: 1e5, pointsPerDecade: 5, spacing: 'log', amplitude: { mode: 'auto' },
        measurement, minCycles: 5, averages: 1, refine: false, operator: 'settle check', notes: '',
      };
      const plan = await service.planSweep(request);
      const settleS = Math.max(...plan.steps.map((s) => s.settleS));
      windows = [];
      const run = await service.startRun(request);
      expect(await service.waitForRun(run.id)).toBe('done');
      // Every point was captured (scope: two channels per capture; meter: slices of each reading).
      expect(windows.length).toBeGreaterThanOrEqual(plan.steps.length);
      expect(violations(settleS)).toEqual([]);
      // The check is not vacuous: the pipeline runs close to the physics, so asking for 50 ms more
      // settling than the plan does (10 ms) finds captures that would have been too early.
      expect(violations(settleS + 0.05).length).toBeGreaterThan(0);
    });
  }
});
