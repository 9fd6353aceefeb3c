/**
 * End to end over real TCP on 127.0.0.1: the service drives the simulated bench
 * (app/sim) through the SCPI session, the sweep runner stores every point, the
 * analysis finds the gain-limit point. Expected values come from the theory
 * engine (app/circuit solveAc, checked against ngspice in its own tests) and
 * from the formula in DEVELOPERS.md "Theory" for the loop-gain-1 point.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import type { RunDetail } from '../../../app/contract/contract';
import { PointFlag } from '../../../app/contract/contract';
import { invertingGain100, sweepRequest, tempFolder } from './helpers';

describe('sweep on the simulated bench over TCP', () => {
  const folder = tempFolder();
  let service: RolloffService;
  let detail: RunDetail;
  const pointsSeen: number[] = [];
  const trafficRoles = new Set<string>();
  const progress: Array<{ step: number; total: number; etaS: number; status: string }> = [];

  beforeAll(async () => {
    service = await openServiceAt(join(folder.path, 'bench.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50, noiseVrms: 1e-4, link: 'tcp' } });
    service.on('point', (p) => pointsSeen.push(p.index));
    service.on('traffic', (t) => trafficRoles.add(t.role));
    service.on('progress', (p) => progress.push(p));
    const design = await service.saveDesign(invertingGain100());
    const build = await service.createBuild({ designId: design.id, label: 'gain 100', notes: '', actualValues: {} });
    await service.startSimulatedBenchForBuild(build.id);
    const run = await service.startRun(sweepRequest(build.id));
    expect(await service.waitForRun(run.id)).toBe('done');
    detail = await service.getRun(run.id);
  });

  afterAll(async () => {
    await service.close();
    folder.remove();
  });

  it('answers on 127.0.0.1 only and is labelled simulated', async () => {
    const status = await service.benchStatus();
    for (const address of Object.values(status.simulatedBench!.addresses)) expect(address).toMatch(/^tcp:\/\/127\.0\.0\.1:\d+$/);
    expect(detail.simulated).toBe(true);
    expect(detail.bench.every((i) => i.simulated)).toBe(true);
  });

  it('reports progress: step rising to the total, ETA falling to 0, ending done', () => {
    const steps = progress.map((p) => p.step);
    expect(steps).toEqual([...steps].sort((a, b) => a - b));
    for (const p of progress) expect(p.step).toBeLessThanOrEqual(p.total);
    // While the planned points run, the total is the plan; refinement may add to it afterwards.
    expect(progress[0].total).toBe(detail.plannedCount);
    const last = progress[progress.length - 1];
    expect(last).toMatchObject({ step: detail.pointCount, total: detail.pointCount, etaS: 0, status: 'done' });
    expect(progress[0].etaS).toBeGreaterThan(0);
  });

  it('reports instrument traffic by role for the Bench view', () => {
    expect([...trafficRoles].sort()).toEqual(['generator', 'meter', 'scope']); // the meter answers *IDN? at connect
  });

  it('stores every planned point once, in step order, and emits each as it is measured', () => {
    expect(detail.points.step).toEqual(detail.points.step.map((_, i) => i));
    expect(detail.points.step.length).toBeGreaterThanOrEqual(detail.plannedCount);
    expect(pointsSeen).toEqual(detail.points.step);
  });

  it('measured gain agrees with theory within 3× its stated standard uncertainty plus the 0.1 % settling residual the plan allows', () => {
    // Theory at each measured frequency, from the same RunDetail's theory columns (solveAc of the build).
    const theoryAt = new Map(detail.theory.frequencyHz.map((f, i) => [f, detail.theory.gainDb[i]]));
    // e^−6.9 ≈ 0.1 % residual transient (plan settle rule) → 20·log10(1.001) ≈ 0.0087 dB.
    const settleResidualDb = 20 * Math.log10(1.001);
    let compared = 0;
    detail.points.stimulus.forEach((f, i) => {
      if (detail.points.flags[i] & PointFlag.distorted) return;
      const deltaDb = Math.abs(detail.points.gainDb[i] - theoryAt.get(f)!);
      expect(deltaDb, `at ${f} Hz`).toBeLessThanOrEqual(3 * detail.points.gainUncertaintyDb[i] + settleResidualDb);
      compared++;
    });
    expect(compared).toBeGreaterThan(15);
  });

  it('finds the gain-limit point within 10 % of theory (|A| = noise gain 101: ≈ GBW/101 ≈ 9.9 kHz, DEVELOPERS.md "Theory")', () => {
    const measured = detail.figures.gainLimitHz!;
    const theory = detail.theoryGainLimitHz!;
    expect(theory).toBeGreaterThan(9.0e3);
    expect(theory).toBeLessThan(10.5e3);
    expect(Math.abs(measured / theory - 1)).toBeLessThan(0.1);
  });

  it('a single-pole op-amp gives no closed-loop peaking: the margin from the peaking is a lower bound the computed margin meets', () => {
    // Single-pole loop T = A/101 crosses at ≈ 9.9 kHz, far above its pole (10 Hz): margin 180° − 90° − atan(9.9k/… ) ≈ 90° (Bode).
    expect(detail.figures.theoryPhaseMarginDeg!).toBeGreaterThan(89);
    expect(detail.figures.closedLoopPeakingDb!).toBeLessThan(0.1);
    expect(detail.figures.phaseMarginEstimateDeg!).toBeLessThanOrEqual(detail.figures.theoryPhaseMarginDeg!);
    expect(detail.figures.theoryWarnings).toBeUndefined();
  });

  it('estimates GBW within 10 % of the model\'s 1 MHz from the single-pole fit', () => {
    expect(Math.abs(detail.figures.gbwEstimateHz! / 1e6 - 1)).toBeLessThan(0.1);
  });

  it('refinement added points near the measured −3 dB / gain-limit crossing', () => {
    const refined = detail.points.stimulus.filter((_, i) => detail.points.flags[i] & PointFlag.refinement);
    expect(refined.length).toBeGreaterThan(0);
    const nearest = Math.min(...refined.map((f) => Math.abs(Math.log10(f / detail.figures.gainLimitHz!))));
    expect(nearest).toBeLessThan(0.01); // within 2.3 %
  });

  it('makes no scope-side cross-check with the shipped profile, which has no amplitude measurement (SCPI-1999 defines none for a digitizer)', () => {
    expect(detail.events.filter((e) => e.message.startsWith('cross-check'))).toHaveLength(0);
  });

  it('flags points past the theory gain-limit point', () => {
    detail.points.stimulus.forEach((f, i) => {
      expect((detail.points.flags[i] & PointFlag.pastGainLimit) !== 0).toBe(f > detail.theoryGainLimitHz!);
    });
  });
});
