/** A design whose output noise is shaped (op-amp en with a 1/f corner, the closed loop's roll-off), and the noise request the tests use. */
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import type { NoiseRequest } from '../../../app/contract/contract';
import { stepsOfLatestRun } from '../sweep/helpers';

/**
 * Inverting stage of gain −1000 (RN 100 Ω, RF 100 kΩ) on an op-amp of 10 MHz GBW with en = 20 nV/√Hz
 * (1/f corner 200 Hz) and in = 1 pA/√Hz: the output density is about 20 µV/√Hz up to the closed loop's
 * roll-off near 10 kHz, so it is far from flat over the band (values invented for the test).
 */
export function noisyGain1000(): unknown {
  const design = makeDesignFromTemplate('inverting-gain', { rn: 100, rf: 100e3, gbw: 10e6, a0: 1e5 }) as unknown as { parts: Array<{ type: string; model?: Record<string, unknown> }> };
  for (const part of design.parts) {
    if (part.type === 'opamp') Object.assign(part.model!, { voltageNoiseVPerRtHz: 20e-9, voltageNoiseCornerHz: 200, currentNoiseAPerRtHz: 1e-12 });
  }
  return design;
}

export function noiseRequest(buildId: number, overrides: Partial<NoiseRequest> = {}): NoiseRequest {
  return {
    buildId, kind: 'noise', fromHz: 100, toHz: 50e3, records: 16, segmentLength: 8192, window: 'hann', measurement: 'scope',
    operator: 'integration test', notes: '', ...overrides,
  };
}

/** Records stored so far for the newest run in a SQLite file (read-only; 0 before the file or the run exists). */
export function recordsOfLatestRun(dbPath: string): Promise<number> {
  return stepsOfLatestRun(dbPath, async (store, runId) => (await store.loadNoiseRecords(runId)).step.length);
}
