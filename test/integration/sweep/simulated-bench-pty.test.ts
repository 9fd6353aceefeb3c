/**
 * The same sweep path over a real pseudo-terminal pair (socat, opened with
 * serialport, as a USB-serial instrument would be): the gain-limit point of an
 * inverting −100 stage with GBW 1 MHz is found within 10 % of theory
 * (loop gain 1 where |A| = noise gain 101, DEVELOPERS.md "Theory").
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import type { RunDetail } from '../../../app/contract/contract';
import { invertingGain100, sweepRequest, tempFolder } from './helpers';
import { requireTool } from '../../helpers/required-tool';

const hasSocat = requireTool('socat');

describe.skipIf(!hasSocat)('sweep on the simulated bench over a pseudo-terminal (socat)', () => {
  const folder = tempFolder();
  let service: RolloffService;
  let detail: RunDetail;

  beforeAll(async () => {
    service = await openServiceAt(join(folder.path, 'pty.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50, link: 'pty' } });
    const design = await service.saveDesign(invertingGain100());
    const build = await service.createBuild({ designId: design.id, label: 'serial', notes: '', actualValues: {} });
    await service.startSimulatedBenchForBuild(build.id);
    // Fewer points than the TCP test: a 115200-baud link moves a 4 kB waveform block in ~0.35 s.
    const run = await service.startRun(sweepRequest(build.id, { from: 1e3, to: 1e5, pointsPerDecade: 4 }));
    expect(await service.waitForRun(run.id)).toBe('done');
    detail = await service.getRun(run.id);
  }, 120_000);

  afterAll(async () => {
    await service?.close();
    folder.remove();
  });

  it('talks over serial device paths', () => {
    for (const instrument of detail.bench) expect(instrument.address).toMatch(/^serial:\/\//);
  });

  it('measured gain agrees with theory within 3× its stated uncertainty plus the 0.1 % settling residual', () => {
    const theoryAt = new Map(detail.theory.frequencyHz.map((f, i) => [f, detail.theory.gainDb[i]]));
    const settleResidualDb = 20 * Math.log10(1.001); // plan settle rule leaves e^−6.9 ≈ 0.1 %
    detail.points.stimulus.forEach((f, i) => {
      expect(Math.abs(detail.points.gainDb[i] - theoryAt.get(f)!), `at ${f} Hz`).toBeLessThanOrEqual(3 * detail.points.gainUncertaintyDb[i] + settleResidualDb);
    });
  });

  it('finds the gain-limit point within 10 % of theory', () => {
    expect(Math.abs(detail.figures.gainLimitHz! / detail.theoryGainLimitHz! - 1)).toBeLessThan(0.1);
  });
});
