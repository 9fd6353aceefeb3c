/**
 * Recovery and control on the simulated bench over TCP (127.0.0.1): a pulled
 * link mid-sweep is reconnected and the step repeated; a bench that stays
 * gone makes the run fail after the give-up time with every point kept, and
 * resume finishes it; pause/resume/stop through the service API. The
 * recovery rules are common practice (no source): retry with doubling
 * back-off, reconnect, give up after a configured time.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import { PointFlag } from '../../../app/contract/contract';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { sweepRequest, tempFolder } from './helpers';

describe('faults and run control', () => {
  let folder: ReturnType<typeof tempFolder>;
  let service: RolloffService;
  let buildId: number;

  beforeEach(async () => {
    folder = tempFolder();
    service = await openServiceAt(join(folder.path, 'runs.sqlite'), { maxStimulusVpp: 1, giveUpAfterS: 20, simulatedBench: { timeScale: 50 } });
    const design = await service.saveDesign(makeDesignFromTemplate('inverting-lowpass', {}));
    buildId = (await service.createBuild({ designId: design.id, label: 'A', notes: '', actualValues: {} })).id;
    await service.startSimulatedBenchForBuild(buildId);
  });

  afterEach(async () => {
    await service.close();
    folder.remove();
  });

  it('recovers from a pulled link: reconnects, repeats the step, completes with no gap or duplicate', async () => {
    let pulled = false;
    service.on('point', (p) => {
      if (p.index === 3 && !pulled) {
        pulled = true;
        void service.simulatedBench!.setFault('scope', { kind: 'drop-link' });
      }
    });
    const run = await service.startRun(sweepRequest(buildId, { from: 100, to: 100e3, refine: false }));
    expect(await service.waitForRun(run.id)).toBe('done');
    const detail = await service.getRun(run.id);
    expect(pulled).toBe(true);
    expect(detail.points.step).toEqual(detail.points.step.map((_, i) => i));
    expect(detail.points.step.length).toBe(detail.plannedCount);
    expect(detail.points.flags.some((f) => (f & PointFlag.retried) !== 0)).toBe(true);
    expect(detail.events.map((e) => e.message).join('\n')).toMatch(/link closed[\s\S]*reconnected/);
  });

  it('gives up after the configured time when the bench stays gone, keeps every point, and resume completes it', async () => {
    let killed = false;
    service.on('point', (p) => {
      if (p.index === 4 && !killed) {
        killed = true;
        void service.simulatedBench!.stop();
      }
    });
    const run = await service.startRun(sweepRequest(buildId, { from: 100, to: 100e3, refine: false }));
    await expect(service.waitForRun(run.id)).rejects.toThrow(/did not recover within 20 s/);
    const failed = await service.getRun(run.id);
    expect(failed.status).toBe('failed');
    expect(failed.points.step).toEqual([0, 1, 2, 3, 4]);

    await service.resumeRun(run.id);
    expect(await service.waitForRun(run.id)).toBe('done');
    const done = await service.getRun(run.id);
    expect(done.points.step).toEqual(done.points.step.map((_, i) => i));
    expect(done.points.step.length).toBe(done.plannedCount);
    expect(done.points.measuredAt.slice(0, 5)).toEqual(failed.points.measuredAt);
  });

  it('pauses between points, resumes at the next step, and stops on request with the output switched off', async () => {
    let paused = false;
    service.on('point', (p) => {
      if (p.index === 2 && !paused) {
        paused = true;
        void service.pauseRun(p.runId);
      }
    });
    const run = await service.startRun(sweepRequest(buildId, { from: 100, to: 100e3, refine: false }));
    expect(await service.waitForRun(run.id)).toBe('paused');
    expect(service.simulatedBench!.generatorOutputOn()).toBe(false);
    const atPause = (await service.getRun(run.id)).points.step.length;
    // A point is stored (and announced) while the next step acquires, so the step under way when the
    // request came (3) is finished and kept; the run pauses before step 4.
    expect(atPause).toBe(4);
    expect((await service.listRuns({ status: 'paused' })).map((r) => r.id)).toEqual([run.id]);

    const stopAt = atPause + 2;
    const off = service.on('point', (p) => {
      if (p.index === stopAt) void service.stopRun(p.runId);
    });
    await service.resumeRun(run.id);
    expect(await service.waitForRun(run.id)).toBe('stopped');
    off();
    const stopped = await service.getRun(run.id);
    expect(stopped.points.step).toEqual(stopped.points.step.map((_, i) => i));
    expect(stopped.points.step.length).toBe(stopAt + 2);
    // The generator output is off after the stop (the simulated generator's own state).
    expect(service.simulatedBench!.generatorOutputOn()).toBe(false);
    expect(stopped.events.map((e) => e.message)).toContain('stopped by the user');
  });

  it('a resume answers the step it continues at as the sweep took it, not as the store has it by the time the caller asks', async () => {
    service.on('point', (p) => {
      if (p.index === 2) void service.pauseRun(p.runId);
    });
    const run = await service.startRun(sweepRequest(buildId, { from: 100, to: 100e3, refine: false }));
    expect(await service.waitForRun(run.id)).toBe('paused');
    const atPause = (await service.getRun(run.id)).points.step.length;

    const firstResumedPoint = new Promise<number>((resolve) => service.on('point', (p) => resolve(p.index)));
    const { continuesAtStep } = await service.resumeRunWith(run.id);
    // By the time a slow caller looks, the resumed sweep has stored a point: reading the store's next step
    // then (after launching) would name the step after the one it continued at.
    expect(await firstResumedPoint).toBe(atPause);
    expect((await service.getRun(run.id)).points.step.length).toBeGreaterThan(atPause);
    expect(continuesAtStep).toBe(atPause);
    expect(await service.waitForRun(run.id)).toBe('done');
    expect((await service.getRun(run.id)).events.map((e) => e.message)).toContain(`sweep continued at step ${atPause}`);
  });

  it('refuses a fixed amplitude above the maximum before anything is sent, and never exceeds it in auto mode', async () => {
    await expect(service.startRun(sweepRequest(buildId, { amplitude: { mode: 'fixed', vpp: 1.5 } }))).rejects.toThrow(/exceeds the maximum stimulus 1 Vpp/);
    expect(await service.listRuns()).toEqual([]);
    const run = await service.startRun(sweepRequest(buildId, { from: 100, to: 10e3, refine: false }));
    await service.waitForRun(run.id);
    const detail = await service.getRun(run.id);
    expect(Math.max(...detail.points.amplitudeVpp)).toBeLessThanOrEqual(1);
  });
});
