/**
 * Comparing runs of two builds that differ in one capacitor: against theory
 * each agrees with its own parts; against a reference run the corner moves by
 * the capacitor ratio (handbook: f_c = 1/(2π·RF·CF)).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import { sweepRequest, tempFolder } from './helpers';

describe('compareRuns', () => {
  const folder = tempFolder();
  let service: RolloffService;
  const runIds: number[] = [];

  beforeAll(async () => {
    service = await openServiceAt(join(folder.path, 'cmp.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50 } });
    const design = await service.saveDesign(makeDesignFromTemplate('inverting-lowpass', { cf: 15e-9 }));
    for (const [label, cf] of [['as drawn', 15e-9], ['double CF', 30e-9]] as const) {
      const build = await service.createBuild({ designId: design.id, label, notes: '', actualValues: { CF: cf } });
      await service.startSimulatedBenchForBuild(build.id);
      const run = await service.startRun(sweepRequest(build.id, { from: 30, to: 30e3, pointsPerDecade: 8 }));
      await service.waitForRun(run.id);
      runIds.push(run.id);
    }
  }, 60_000);

  afterAll(async () => {
    await service.close();
    folder.remove();
  });

  it('against theory: each build matches the theory of its own parts within 0.05 dB (common practice, no source)', async () => {
    const comparison = await service.compareRuns(runIds, 'theory');
    expect(comparison.referenceRunId).toBe('theory');
    for (const difference of comparison.differences) {
      expect(Math.max(...difference.deltaDb.map(Math.abs))).toBeLessThan(0.05);
    }
  });

  it('against the first run: the doubled capacitor halves the corner (f_c = 1/(2π·RF·CF))', async () => {
    const comparison = await service.compareRuns(runIds, runIds[0]);
    const [reference, doubled] = comparison.figureTable;
    expect(reference.deltas.minus3dbHz).toBeCloseTo(0, 9);
    const ratio = doubled.figures.minus3dbHz[0] / reference.figures.minus3dbHz[0];
    expect(Math.abs(ratio - 0.5)).toBeLessThan(0.02);
    expect(doubled.deltas.minus3dbHz!).toBeLessThan(0);
    // Above both corners the doubled CF costs 20·log10(|1 + j f/f_a| / |1 + j f/f_b|) → 6.02 dB (single-pole, handbook).
    const diff = comparison.differences[1];
    const high = diff.stimulus.findIndex((f) => f >= 20e3);
    const f = diff.stimulus[high];
    const [fa, fb] = [15e-9, 30e-9].map((cf) => 1 / (2 * Math.PI * 10e3 * cf));
    const expectedDb = 20 * Math.log10(Math.hypot(1, f / fa) / Math.hypot(1, f / fb));
    // The ideal-op-amp formula ignores the 1 MHz GBW: at 20 kHz |A| ≈ 50 and NG/A moves each build by ~0.1–0.2 dB,
    // differently for each CF (noise gain 1 + Z_F/Z_N), so 0.1 dB is allowed here.
    expect(Math.abs(diff.deltaDb[high] - expectedDb)).toBeLessThan(0.1);
  });

  it('refuses a reference run that is not among the compared runs', async () => {
    await expect(service.compareRuns([runIds[0]], runIds[1])).rejects.toThrow(/not among the compared runs/);
  });
});
