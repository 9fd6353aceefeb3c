/**
 * Honest pipelining: the runner overlaps link traffic with settling, but the
 * instruments must never capture before the plan's settle time has passed
 * since the stimulus last changed, nor while it changes. Checked against the
 * simulated bench's own record (its clock) of when the generator changed and
 * which time spans the scope and meter sampled — not against the runner's
 * bookkeeping. A realistic link (3 ms per reply) over TCP on 127.0.0.1, real
 * time, as in test/bench/sweep-efficiency.ts. Rule: settle = the plan's
 * settleS (app/sweep/plan/settle.ts); expected values are our own definition.
 *
 * The runner cannot see the change itself: it counts settling from the
 * generator's acknowledgement, which arrives one reply latency (3 ms) after
 * the change, and later still when the event loop is busy or the machine
 * loaded (the simulated bench runs in this process). A second check holds
 * the runner to that rule: each capture starts at least the settle time
 * after the generator's last acknowledgement on the link (the service's
 * traffic events, timed on the bench's clock as they arrive).
 *
 * Two circuits. A fast one (settle 10 ms, the instruments' own; real time)
 * keeps the pipeline busy: read-back, fits and the store commit overlap the
 * settling, so captures start later than settling needs and a cut would hide
 * in that slack. A slow one (settle ≈ 140 ms, far above the pipeline's own
 * gap), with bench time at a tenth of real time so that link latency and a
 * loaded machine's lateness shrink tenfold against it, makes the settle wait
 * the last thing before each capture: there both checks are sharp, and with
 * the settle waits cut 3 ms short (a test-only clock) both fail, on the scope
 * path and on the meter path, while the same sweeps with the full waits pass.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import type { BenchClock } from '../../../app/bench';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import type { SweepRequest } from '../../../app/contract/contract';
import { startSimulatedBench, type GeneratorOutput, type SimulatedBench } from '../../../app/sim';
import { medianOfSorted } from '../../../app/numeric';
import { tempFolder } from './helpers';

interface Window {
  startS: number;
  endS: number;
}

/**
 * The bench's record, in its own clock: every generator change, every span the scope or meter sampled,
 * and when each of the generator's replies reached the service.
 */
class BenchRecord {
  readonly changesS: number[] = [];
  readonly acknowledgedS: number[] = [];
  windows: Window[] = [];

  constructor(private readonly bench: SimulatedBench) {
    const { model, clock } = bench;
    const setGenerator = model.setGenerator.bind(model);
    model.setGenerator = (output: GeneratorOutput) => {
      this.changesS.push(clock.nowS()); // read before the change: never later than the model's own change time
      setGenerator(output);
    };
    const sample = model.sample.bind(model);
    model.sample = (node, startS, intervalS, count) => {
      this.windows.push({ startS, endS: startS + count * intervalS });
      return sample(node, startS, intervalS, count);
    };
    const sampleStratified = model.sampleStratified.bind(model);
    model.sampleStratified = (node, startS, durationS, count) => {
      this.windows.push({ startS, endS: startS + durationS });
      return sampleStratified(node, startS, durationS, count);
    };
  }

  /** Notes the arrival of the generator's replies: the service emits them as they come in, before the runner sees them. */
  listen(service: RolloffService): void {
    service.on('traffic', (entry) => {
      if (entry.role === 'generator' && entry.direction === 'received') this.acknowledgedS.push(this.bench.clock.nowS());
    });
  }

  /** Windows that start less than `settleS` after a change, or during which the stimulus changed. */
  violations(settleS: number): Window[] {
    return this.windows.filter((w) => this.changesS.some((changeS) => changeS > w.startS - settleS && changeS < w.endS));
  }

  /**
   * Per capture (the windows after one reference time), how much later than `settleS` after the last change
   * (or the last acknowledgement) before it the capture started; negative: too early.
   */
  marginsS(settleS: number, from: 'change' | 'acknowledgement'): number[] {
    const references = from === 'change' ? this.changesS : this.acknowledgedS;
    const firstStart = new Map<number, number>();
    for (const w of this.windows) {
      const referenceS = Math.max(...references.filter((t) => t <= w.startS));
      firstStart.set(referenceS, Math.min(firstStart.get(referenceS) ?? Infinity, w.startS));
    }
    return [...firstStart].map(([referenceS, startS]) => startS - referenceS - settleS);
  }
}

interface BenchUnderTest {
  bench: SimulatedBench;
  record: BenchRecord;
  service: RolloffService;
  buildId: number;
}

interface BenchOptions {
  /** Bench seconds per wall second (default 1, real time). */
  timeScale?: number;
  /** The service's clock, made from the bench's (default: real time). */
  clockFor?: (bench: SimulatedBench) => BenchClock;
  /** The meter's aperture, bench seconds (default the service's 0.1 s). */
  meterIntegrationS?: number;
}

/**
 * For the enclosing describe: the simulated bench of `designFile` (3 ms of wall time per reply over TCP), its
 * record, and a service with its instruments connected and one build.
 */
function benchUnderTest(designFile: unknown, options: BenchOptions = {}): BenchUnderTest {
  const folder = tempFolder();
  const context = {} as BenchUnderTest;
  beforeAll(async () => {
    const bench = await startSimulatedBench({ design: designFile, tcpPort: 0, timeScale: options.timeScale ?? 1, latencyS: 0.003, noiseVrms: 1e-4 });
    context.bench = bench;
    context.record = new BenchRecord(bench);
    const service = await openServiceAt(join(folder.path, 'settle.sqlite'), {
      maxStimulusVpp: 1,
      clock: options.clockFor?.(bench),
      meterIntegrationS: options.meterIntegrationS,
    });
    context.service = service;
    context.record.listen(service);
    const design = await service.saveDesign(designFile);
    context.buildId = (await service.createBuild({ designId: design.id, label: 'settle check', notes: '', actualValues: {} })).id;
    for (const role of ['generator', 'meter', 'scope'] as const) await service.connect({ role, address: bench.addresses[role], profileId: `scpi-${role}` });
  });
  afterAll(async () => {
    await context.service?.close();
    await context.bench?.stop();
    folder.remove();
  });
  return context;
}

function request(buildId: number, measurement: 'scope' | 'meter', pointsPerDecade = 5): SweepRequest {
  return {
    buildId, kind: 'ac', from: 1e3, to: 1e5, pointsPerDecade, spacing: 'log', amplitude: { mode: 'auto' },
    measurement, minCycles: 5, averages: 1, refine: false, operator: 'settle check', notes: '',
  };
}

/** Runs the sweep to the end; returns the plan's settle time, the longest of its steps. */
async function sweep(service: RolloffService, wanted: SweepRequest): Promise<{ settleS: number; steps: number }> {
  const plan = await service.planSweep(wanted);
  const run = await service.startRun(wanted);
  expect(await service.waitForRun(run.id)).toBe('done');
  return { settleS: Math.max(...plan.steps.map((s) => s.settleS)), steps: plan.steps.length };
}

describe('the runner never acquires before the settle time since the last stimulus change (busy pipeline, 10 ms settle)', () => {
  const context = benchUnderTest(makeDesignFromTemplate('inverting-lowpass', {}));

  for (const measurement of ['scope', 'meter'] as const) {
    it(`${measurement}: every capture starts ≥ settle after the last change, and nothing changes during it`, async () => {
      const { record, service, buildId } = context;
      record.windows = [];
      const { settleS, steps } = await sweep(service, request(buildId, measurement));
      // Every point was captured (scope: two channels per capture; meter: slices of each reading).
      expect(record.windows.length).toBeGreaterThanOrEqual(steps);
      expect(record.violations(settleS)).toEqual([]);
      expect(Math.min(...record.marginsS(settleS, 'acknowledgement'))).toBeGreaterThanOrEqual(0);
      // The pipeline runs close to the physics: asking for 50 ms more settling than the plan does (10 ms)
      // finds captures that would have been too early.
      expect(record.violations(settleS + 0.05).length).toBeGreaterThan(0);
    });
  }
});

describe('a runner that settles a few ms too little is caught (slow circuit: settle far above the pipeline gap)', () => {
  /** How much the cut runner leaves out of each settle wait, bench seconds. */
  const CUT_S = 0.003;
  /**
   * Bench time at a tenth of real time: the link's 3 ms per reply and a loaded machine's lateness (timers and
   * replies up to ~15 ms late at load average 22 on 2 cores) shrink tenfold in bench time, so the runner's
   * margin stays well under the cut however busy the machine, while settling (in bench time) is unchanged.
   */
  const TIME_SCALE = 0.1;
  /** The service's clock: the bench's, with every settle wait cut short by `cutS` while it is above 0 (test only). */
  let cutS = 0;
  const cutShort = (bench: SimulatedBench): BenchClock => ({
    timeScale: bench.clock.timeScale,
    nowS: () => bench.clock.nowS(),
    // In a sweep the runner sleeps only to settle (app/sweep/runner/applied-stimulus.ts).
    sleepS: (seconds) => bench.clock.sleepS(Math.max(0, seconds - cutS)),
  });
  // High-pass corner 1/(2π·RN·CN) ≈ 8 Hz, τ = RN·CN = 20 ms: settle −ln(0.001)·τ ≈ 138 ms; 1–100 kHz is its pass band.
  // A 20 ms meter aperture (bench time) keeps the wall time of the meter sweeps down.
  const context = benchUnderTest(makeDesignFromTemplate('inverting-highpass', { rn: 1e3, cn: 20e-6, rf: 10e3 }), {
    timeScale: TIME_SCALE,
    clockFor: cutShort,
    meterIntegrationS: 0.02,
  });

  for (const measurement of ['scope', 'meter'] as const) {
    it(`${measurement}: with the full settle waits it passes; with each wait ${CUT_S * 1e3} ms short it fails`, async () => {
      const { record, service, buildId } = context;
      const wanted = request(buildId, measurement, 2); // 5 points, 1 kHz to 100 kHz
      cutS = 0;
      record.windows = [];
      const honest = await sweep(service, wanted);
      expect(honest.settleS).toBeGreaterThan(0.13); // the circuit's, not the instruments' 10 ms
      expect(record.violations(honest.settleS)).toEqual([]);
      const margins = record.marginsS(honest.settleS, 'acknowledgement');
      expect(margins.length).toBe(honest.steps);
      expect(Math.min(...margins)).toBeGreaterThanOrEqual(0);
      // The settling is far above the pipeline's own gap: the runner waits it out and captures right after, the
      // margin being the timer's lateness and the capture command's trip to the instrument.
      expect(medianOfSorted([...margins].sort((a, b) => a - b))).toBeLessThan(CUT_S);

      cutS = CUT_S;
      record.windows = [];
      const cut = await sweep(service, wanted);
      cutS = 0;
      // Both checks now fail: captures start up to the cut too early, after the change the bench recorded and
      // after the acknowledgement the runner counts from.
      expect(record.violations(cut.settleS).length).toBeGreaterThan(0);
      const early = record.marginsS(cut.settleS, 'acknowledgement').filter((marginS) => marginS < 0);
      expect(early.length).toBeGreaterThan(cut.steps / 2);
      expect(Math.min(...early)).toBeGreaterThanOrEqual(-CUT_S);
    });
  }
});
