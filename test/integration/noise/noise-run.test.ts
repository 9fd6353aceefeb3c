/**
 * A noise run end to end on the simulated bench over real TCP, with the
 * circuit's own noise at the output (shaped by the circuit, app/sim/circuit-noise.ts)
 * and no flat measurement noise: the measured density must agree with the
 * computed one within the uncertainty the run states, and the generator must
 * really have been held off (read from the simulated generator itself).
 *
 * Expected values and their sources:
 * - the computed density is the theory engine's (app/circuit solveNoise, checked
 *   against ngspice's .noise in test/integration/ngspice/noise-agreement.test.ts)
 *   for the build with its input held by the generator's 50 Ω;
 * - a 95 % interval holds the true value in 95 % of bins (the definition of the
 *   interval; χ² intervals per Percival & Walden 1993); 0.90–0.99 allows for a
 *   few thousand somewhat correlated bins;
 * - the mean of 10·log10 of a χ²_ν/ν variable is about −10/(ν·ln 10) dB (second-order
 *   expansion of E[ln X], X = χ²_ν/ν: −1/ν), so the mean deviation in dB sits
 *   within 0.1 dB of 0 for ν ≈ 200;
 * - the RMS over the band agrees within three of its stated standard uncertainties
 *   (k = 3, GUM JCGM 100:2008 §6.3).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { connect } from 'node:net';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import type { NoiseRunDetail } from '../../../app/contract/contract';
import type { GeneratorSettings } from '../../../app/sim';
import { tempFolder } from '../sweep/helpers';
import { sweepRequest } from '../sweep/helpers';
import { noiseRequest, noisyGain1000 } from './helpers';
import { recordFromJson } from '../../../app/record';

/** One query to a simulated instrument on its own connection, as any SCPI client would send it. */
function query(address: string, text: string): Promise<string> {
  const { hostname, port } = new URL(address);
  return new Promise((resolve, reject) => {
    const socket = connect(Number(port), hostname, () => socket.write(`${text}\n`));
    let reply = '';
    socket.on('data', (chunk) => {
      reply += chunk.toString();
      if (reply.endsWith('\n')) {
        socket.end();
        resolve(reply.trim());
      }
    });
    socket.on('error', reject);
  });
}

describe('noise run on the simulated bench with the circuit\'s own noise', () => {
  const folder = tempFolder();
  let service: RolloffService;
  let buildId: number;
  let detail: NoiseRunDetail;
  const held: GeneratorSettings[] = [];

  beforeAll(async () => {
    service = await openServiceAt(join(folder.path, 'noise.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50, noiseVrms: 0, circuitNoise: true, link: 'tcp' } });
    const design = await service.saveDesign(noisyGain1000());
    buildId = (await service.createBuild({ designId: design.id, label: 'noisy ×1000', notes: '', actualValues: {} })).id;
    await service.startSimulatedBenchForBuild(buildId);
    // A sweep first leaves the generator configured for a sine; then someone switches its output on at the
    // instrument (here over its own link): the noise run must take it from there.
    const sweep = await service.startRun(sweepRequest(buildId, { from: 100, to: 1e3, pointsPerDecade: 2, refine: false }));
    expect(await service.waitForRun(sweep.id)).toBe('done');
    const generator = (await service.benchStatus()).simulatedBench!.addresses.generator!;
    expect(await query(generator, 'SOURce:VOLTage 0.5;:OUTPut:STATe ON;*OPC?')).toBe('1');
    expect(service.simulatedBench!.generatorHeld()).toMatchObject({ on: true, amplitudeVpp: 0.5 });
    const stopWatching = service.simulatedBench!.onGeneratorChange((state) => held.push({ ...state }));
    const run = await service.startNoiseRun(noiseRequest(buildId));
    expect(await service.waitForRun(run.id)).toBe('done');
    stopWatching();
    detail = await service.getNoiseRun(run.id);
  });

  afterAll(async () => {
    await service.close();
    folder.remove();
  });

  it('measures every planned record once, as a noise run of its own kind', () => {
    expect(detail.kind).toBe('noise');
    expect(detail.records.step).toEqual(Array.from({ length: 16 }, (_, i) => i));
    expect(detail.pointCount).toBe(16);
    expect(detail.acquisition).toMatchObject({ sampleRateHz: 128_000, segmentLength: 8192, recordPoints: 32_768, sourceImpedanceOhm: 50 });
    expect(detail.records.sampleRateHz.every((f) => f === 128_000)).toBe(true);
    expect(detail.events.map((e) => e.message)).toContain('generator held off: output off at the smallest amplitude and no offset, and the generator reports its output off');
  });

  it('gives a density over the band that agrees with the computed one within its stated uncertainty', () => {
    const figures = detail.figures.noise!;
    const { density } = detail;
    expect(density.frequencyHz[0]).toBeGreaterThanOrEqual(100);
    expect(density.frequencyHz.at(-1)).toBeLessThanOrEqual(50e3);
    expect(figures.bins).toBe(density.frequencyHz.length);
    // The density is shaped: the band holds both the flat part and the roll-off, an order of magnitude apart.
    expect(Math.max(...density.computedVPerRtHz) / Math.min(...density.computedVPerRtHz)).toBeGreaterThan(4);
    // Each bin's stated standard uncertainty is 1/√(2ν) of it (ν ≈ 214 for 112 Hann segments at 50 % overlap).
    expect(figures.degreesOfFreedom).toBeGreaterThan(150);
    expect(density.uncertaintyVPerRtHz[10] / density.measuredVPerRtHz[10]).toBeCloseTo(1 / Math.sqrt(2 * figures.degreesOfFreedom!), 12);
    expect(figures.shareWithin95).toBeGreaterThan(0.9);
    expect(figures.shareWithin95).toBeLessThan(0.99);
    expect(Math.abs(figures.meanDeviationDb!)).toBeLessThan(0.1);
    // In every decade of the band, not only on average.
    for (const [low, high] of [[100, 1e3], [1e3, 1e4], [1e4, 5e4]]) {
      const inDecade = density.frequencyHz.map((f, i) => i).filter((i) => density.frequencyHz[i] >= low && density.frequencyHz[i] < high);
      const meanDb = inDecade.reduce((sum, i) => sum + 20 * Math.log10(density.measuredVPerRtHz[i] / density.computedVPerRtHz[i]), 0) / inDecade.length;
      expect(Math.abs(meanDb), `${low}–${high} Hz`).toBeLessThan(0.25);
    }
    expect(figures.measuredRmsUncertaintyV).toBeGreaterThan(0);
    expect(Math.abs(figures.measuredRmsV - figures.computedRmsV)).toBeLessThan(3 * figures.measuredRmsUncertaintyV!);
  });

  it('held the generator off the whole run: its first act switched the output off, and no state after had it on; 1 mVpp and no offset at the end', () => {
    expect(held.length).toBeGreaterThan(0);
    expect(held[0]).toMatchObject({ on: false, amplitudeVpp: 0.5 }); // off first, before any level changes
    expect(held.every((state) => !state.on)).toBe(true);
    const now = service.simulatedBench!.generatorHeld();
    expect(now).toMatchObject({ on: false, amplitudeVpp: 0.001, offsetV: 0 });
    expect(service.simulatedBench!.generatorOutputOn()).toBe(false);
  });

  it('gives the scope back with the record length its profile sets, so a sweep after it is an ordinary sweep', async () => {
    const address = (await service.benchStatus()).simulatedBench!.addresses.scope!;
    expect(await query(address, 'SENSe:SWEep:POINts?')).toBe('2000');
    const sweep = await service.startRun(sweepRequest(buildId, { from: 100, to: 10e3, pointsPerDecade: 2, refine: false }));
    expect(await service.waitForRun(sweep.id)).toBe('done');
    // The sweep's first point: gain −1000 is 60 dB (RF/RN; the loop gain of 10 MHz/1001 costs nothing at 100 Hz).
    expect((await service.getRun(sweep.id)).points.gainDb[0]).toBeCloseTo(60, 0);
  });

  it('exports its own record (the JSON passes the schema and its digest), and is refused in a comparison record', async () => {
    const exported = await service.exportRecord([detail.id], 'json');
    const record = recordFromJson(exported.content, exported.fileName);
    expect(record.recordType).toBe('noise-run');
    expect(exported.fileName).toBe(`rolloff-noise-run-${detail.id}-noisy-1000.json`);
    const [sweep] = await service.listRuns({ search: 'noisy' }).then((runs) => runs.filter((r) => r.kind === 'ac'));
    await expect(service.exportRecord([sweep.id, detail.id], 'pdf')).rejects.toThrow(/is a noise run, and a comparison record compares sweeps/);
  });

  it('is read by getNoiseRun only; getRun names the other reader', async () => {
    await expect(service.getRun(detail.id)).rejects.toMatchObject({ message: expect.stringMatching(/is a noise run/), hint: expect.stringMatching(/getNoiseRun/) });
  });
});
