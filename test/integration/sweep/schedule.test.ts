/**
 * A schedule repeats a sweep of one build at a fixed interval (bench time,
 * scaled on the simulated bench) and reports the drift of the figures; each
 * repetition is an ordinary stored run tied to the schedule.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { openServiceAt } from '../../../app/service/open-service';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { SqliteStore } from '../../../app/store';
import { sweepRequest, tempFolder } from './helpers';

describe('schedules', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());

  it('runs N repetitions at the interval and summarises drift over them', async () => {
    // 60 bench seconds per wall second: a 1-minute interval takes 1 s.
    const service = await openServiceAt(join(folder.path, 'sched.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 60 } });
    try {
      const design = await service.saveDesign(makeDesignFromTemplate('inverting-lowpass', {}));
      const buildId = (await service.createBuild({ designId: design.id, label: 'overnight', notes: '', actualValues: {} })).id;
      await service.startSimulatedBenchForBuild(buildId);
      const startedAt: number[] = [];
      const report = await service.runSchedule({ request: sweepRequest(buildId, { from: 100, to: 10e3, pointsPerDecade: 3, refine: false }), everyMinutes: 1, count: 3 }, (_run, _index, slotS) => startedAt.push(slotS));
      expect(report.runs.map((r) => r.status)).toEqual(['done', 'done', 'done']);
      // Read back from the file itself (a second, read-only connection): the service keeps its store to itself.
      const stored = SqliteStore.open(join(folder.path, 'sched.sqlite'), { readonly: true });
      try {
        for (const run of report.runs) expect((await stored.getRun(run.runId)).scheduleId).toBe(report.scheduleId);
      } finally {
        await stored.close();
      }
      // Slots one interval (60 bench seconds) apart: not early (beyond timer rounding); late only by timer slack. CI runs this
      // beside Chromium on two cores, so allow up to ~0.8 s of wall time (50 bench seconds) — still far from a wrong unit
      // (seconds for minutes) or a doubled interval.
      for (const gap of [startedAt[1] - startedAt[0], startedAt[2] - startedAt[1]]) {
        expect(gap).toBeGreaterThanOrEqual(59.9); // timers round to whole ms: ≤ 1 ms wall = 0.06 bench s
        expect(gap).toBeLessThan(110);
      }
      const corner = report.drift.find((d) => d.figure === 'minus3dbHz')!;
      expect(corner.values).toHaveLength(3);
      expect(corner.spread!).toBeGreaterThanOrEqual(0);
      // The same simulated circuit each time: the −3 dB point may move only by noise, far below 0.5 %.
      expect(corner.spread! / corner.first!).toBeLessThan(0.005);
      await expect(service.runSchedule({ request: sweepRequest(buildId), everyMinutes: 0, count: 2 })).rejects.toThrow(/not a positive interval/);
      await expect(service.runSchedule({ request: sweepRequest(buildId), everyMinutes: 5 })).rejects.toThrow(/number of runs or an end time/);
    } finally {
      await service.close();
    }
  });
});
