/**
 * A meter noise run on the simulated bench with the circuit's own noise: the
 * meter's AC RMS readings agree with the RMS computed over the band the meter
 * sees (the simulated meter samples the noise on a 1 µs grid: a band up to
 * 500 kHz, from the 7.6 Hz a 2^17-sample noise block resolves; below 10 Hz
 * the design adds under 0.3 % of the RMS), within three stated standard
 * uncertainties (k = 3, GUM JCGM 100:2008 §6.3), the uncertainty being the
 * readings' spread (Type A, §4.2). The generator is held off as for a scope run.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import type { NoiseRunDetail } from '../../../app/contract/contract';
import { tempFolder } from '../sweep/helpers';
import { noiseRequest, noisyGain1000 } from './helpers';

describe('meter noise run on the simulated bench', () => {
  const folder = tempFolder();
  let service: RolloffService;
  let detail: NoiseRunDetail;

  beforeAll(async () => {
    service = await openServiceAt(join(folder.path, 'meter-noise.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 20, noiseVrms: 0, circuitNoise: true, link: 'tcp' } });
    const design = await service.saveDesign(noisyGain1000());
    const build = await service.createBuild({ designId: design.id, label: 'meter noise', notes: '', actualValues: {} });
    await service.startSimulatedBenchForBuild(build.id);
    const run = await service.startNoiseRun(noiseRequest(build.id, { measurement: 'meter', fromHz: 10, toHz: 500e3, records: 16 }));
    expect(await service.waitForRun(run.id)).toBe('done');
    detail = await service.getNoiseRun(run.id);
  });

  afterAll(async () => {
    await service.close();
    folder.remove();
  });

  it('reads the RMS in the band, within three of its stated uncertainties of the computed RMS', () => {
    const figures = detail.figures.noise!;
    expect(detail.acquisition.measurement).toBe('meter');
    expect(detail.records.step).toHaveLength(16);
    expect(detail.density.frequencyHz).toEqual([]); // a meter gives no density
    expect(figures.recordsUsed).toBe(16);
    expect(figures.measuredRmsUncertaintyV).toBeGreaterThan(0);
    expect(figures.measuredRmsUncertaintyV! / figures.measuredRmsV).toBeLessThan(0.01);
    expect(Math.abs(figures.measuredRmsV - figures.computedRmsV)).toBeLessThan(3 * figures.measuredRmsUncertaintyV!);
  });

  it('says in its events how the band is meant, and that the generator was held off', () => {
    const messages = detail.events.map((e) => e.message);
    expect(messages.some((m) => /a meter reads the RMS over its own bandwidth/.test(m))).toBe(true);
    expect(messages).toContain('generator held off: output off at the smallest amplitude and no offset, and the generator reports its output off');
    expect(service.simulatedBench!.generatorHeld()).toMatchObject({ on: false, offsetV: 0 });
  });
});
