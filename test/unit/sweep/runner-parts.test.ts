/**
 * Parts of the sweep runner with fakes: retry with back-off and the give-up
 * time, reduction of meter readings (overrange never enters a mean), phase
 * averaging across ±180°, calibration interpolation, scope scale choice and
 * widening of a clipped record. Rules are common practice (no source) unless
 * named beside the check.
 */
import { describe, expect, it } from 'vitest';
import type { BenchClock } from '../../../app/bench/clock';
import type { ScopeControl, Waveform } from '../../../app/bench/roles';
import { ScpiDisconnectedError, ScpiInstrumentError, ScpiTimeoutError } from '../../../app/scpi/errors';
import { withRecovery } from '../../../app/sweep/runner/recovery';
import { SweepGaveUpError, RemeasureStep } from '../../../app/sweep/runner/errors';
import { reduceRmsReadings, interpolateLogF } from '../../../app/sweep/runner/measure-meter';
import { combineAcquisitions } from '../../../app/sweep/runner/combine';
import { niceScale, scopeMeasurer, splitRecord } from '../../../app/sweep/runner/measure-scope';
import { sineFit3 } from '../../../app/signal';
import { AppliedStimulus, apertureChanged } from '../../../app/sweep/runner/applied-stimulus';
import { PointFlag } from '../../../app/contract/contract';
import type { StageResponse } from '../../../app/signal';
import type { StepSetting, SweepInstruments } from '../../../app/sweep/runner/types';

/** A clock that advances only when slept on: back-off is checked without waiting. */
function manualClock(): BenchClock & { slept: number[] } {
  let nowS = 0;
  const slept: number[] = [];
  return { timeScale: 1, slept, nowS: () => nowS, sleepS: async (s: number) => { slept.push(s); nowS += s; } };
}

const setting = (overrides: Partial<StepSetting> = {}): StepSetting => ({ step: 0, stimulus: 1000, amplitudeVpp: 1, settleS: 0.01, integrateS: 0.005, averages: 1, refinement: false, ...overrides });

describe('withRecovery', () => {
  it('retries timeouts and closed links with doubling back-off, reconnecting each time', async () => {
    const clock = manualClock();
    let calls = 0;
    let reconnects = 0;
    const result = await withRecovery(async () => {
      calls++;
      if (calls === 1) throw new ScpiTimeoutError('READ?', 5, 'tcp x');
      if (calls === 2) throw new ScpiDisconnectedError('tcp x', 'reset');
      return 42;
    }, { runId: 1, clock, giveUpAfterS: 60, reconnect: async () => void reconnects++, log: () => {} });
    expect(result).toEqual({ value: 42, retried: true });
    expect(clock.slept).toEqual([0.2, 0.4]);
    expect(reconnects).toBe(2);
  });

  it('gives up with SweepGaveUpError once the link has been down for the give-up time', async () => {
    const clock = manualClock();
    const attempt = withRecovery(async () => { throw new ScpiDisconnectedError('tcp x', 'refused'); }, { runId: 7, clock, giveUpAfterS: 10, reconnect: async () => {}, log: () => {} });
    await expect(attempt).rejects.toThrow(SweepGaveUpError);
    await expect(attempt).rejects.toThrow(/run 7: .* within 10 s/);
    expect(clock.nowS()).toBeGreaterThanOrEqual(10);
    expect(clock.nowS()).toBeLessThan(10 + 5.01); // at most one back-off (capped at 5 s) past the limit
  });

  it('does not retry an instrument error: retrying cannot fix a refused command', async () => {
    const clock = manualClock();
    let calls = 0;
    await expect(withRecovery(async () => { calls++; throw new ScpiInstrumentError(-222, 'Data out of range', 'FREQ 1e9', 'tcp x'); },
      { runId: 1, clock, giveUpAfterS: 60, reconnect: async () => {}, log: () => {} })).rejects.toThrow(ScpiInstrumentError);
    expect(calls).toBe(1);
  });
});

describe('settling', () => {
  const applyWith = async (confirmedAtMs: () => number | undefined) => {
    const clock = manualClock();
    const stimulus = new AppliedStimulus(clock);
    const generator = { configureSine: async () => {}, setOutput: async () => {}, get confirmedAtMs() { return confirmedAtMs(); } };
    await stimulus.apply({ generator } as unknown as SweepInstruments, setting(), 'sine');
    await stimulus.settled(0.01);
    return clock.slept;
  };

  it('counts from the arrival of the generator\'s confirmation when the control knows it (4 ms ago: about 6 ms left of 10)', async () => {
    const before = performance.now();
    const [sleptS] = await applyWith(() => before - 4);
    // The confirmation is 4 ms old, plus however long applying took here (a loaded machine stretches it).
    const tookMs = performance.now() - before;
    expect(sleptS).toBeLessThanOrEqual(0.006);
    expect(sleptS).toBeGreaterThanOrEqual(0.006 - tookMs / 1000);
  });

  it('counts from the return of the call when it does not, and never from a moment after now', async () => {
    expect(await applyWith(() => undefined)).toEqual([0.01]);
    expect(await applyWith(() => performance.now() + 50)).toEqual([0.01]);
  });
});

describe('reducing readings', () => {
  it('meter gain = Vrms_out / (Vpp/(2√2)) (sine RMS, handbook); overrange readings flag the point and stay out of the mean', () => {
    const result = reduceRmsReadings([{ value: 3.5355, flag: 'ok' }, { value: NaN, flag: 'overrange' }, { value: 3.5355, flag: 'ok' }], setting({ amplitudeVpp: 1 }));
    expect(result.gainDb).toBeCloseTo(20, 3); // 3.5355 / 0.35355 = 10 → 20 dB
    expect(result.flags & PointFlag.overrange).toBe(PointFlag.overrange);
  });

  it('a point with no usable reading is stored as NaN with its flags, never as a number', () => {
    const result = reduceRmsReadings([{ value: NaN, flag: 'nan' }], setting());
    expect(Number.isNaN(result.gainDb)).toBe(true);
    expect(result.flags & PointFlag.notANumber).toBe(PointFlag.notANumber);
  });

  it('subtracts the through-calibration interpolated linearly in log f', () => {
    expect(interpolateLogF([100, 10_000], [0, -2], 1000)).toBeCloseTo(-1, 12);
    expect(interpolateLogF([100, 10_000], [0, -2], 50)).toBe(0);
    const calibrated = reduceRmsReadings([{ value: 3.5355, flag: 'ok' }], setting({ stimulus: 1000 }), { frequencyHz: [100, 10_000], gainDb: [0, -2] });
    expect(calibrated.gainDb).toBeCloseTo(21, 3);
  });

  it('averages phases across the ±180° cut without cancelling', () => {
    const response = (phaseDeg: number) => ({ gainDb: 0, gainStdDb: 0.01, phaseDeg, phaseStdDeg: 0.1 }) as StageResponse;
    // Deviations from the first: 0, 1.5, 0.5, 2 → mean +1 → 180° (an arithmetic mean of the raw values would give ≈ 0°).
    const combined = combineAcquisitions([response(179), response(-179.5), response(179.5), response(-179)]);
    expect(Math.abs(Math.abs(combined.phaseDeg) - 180)).toBeLessThan(0.01);
  });

  it('rejects an outlying acquisition (modified z-score, Iglewicz & Hoaglin 1993, via app/signal)', () => {
    const response = (gainDb: number) => ({ gainDb, gainStdDb: 0.001, phaseDeg: 0, phaseStdDeg: 0.1 }) as StageResponse;
    const combined = combineAcquisitions([response(10), response(10.001), response(9.999), response(10.0005), response(13)]);
    expect(combined.gainDb).toBeCloseTo(10, 2);
  });
});

describe('averaging segments of one record', () => {
  it('splits a record into equal consecutive segments that fit to the same amplitude and phase (IEEE 1057 fit, app/signal)', () => {
    const f = 1000, dt = 1e-5, n = 3000; // 30 cycles
    const wave = (a: number, phi: number) => Float64Array.from({ length: n }, (_, i) => a * Math.cos(2 * Math.PI * f * i * dt + phi));
    const record = { input: { channel: 1 as const, sampleIntervalS: dt, samplesV: wave(1, 0.3), clipped: false }, output: { channel: 2 as const, sampleIntervalS: dt, samplesV: wave(2, -1.2), clipped: false } };
    const segments = splitRecord(record, 3);
    expect(segments.map((s) => s.input.samplesV.length)).toEqual([1000, 1000, 1000]);
    expect(segments.map((s) => s.startTimeS)).toEqual([0, 1000 * dt, 2000 * dt]);
    for (const segment of segments) {
      const fit = sineFit3({ samplesV: segment.output.samplesV, sampleIntervalS: dt, frequencyHz: f, startTimeS: segment.startTimeS });
      expect(fit.amplitudeV).toBeCloseTo(2, 9);
      expect(fit.phaseRad).toBeCloseTo(-1.2, 9);
    }
  });
});

describe('cross-check with the scope\'s own measurement', () => {
  const makeScope = (reportedVpp: (channel: 1 | 2) => number): ScopeControl => {
    const wave = (channel: 1 | 2): Waveform => ({
      channel, sampleIntervalS: 1 / 40_000, clipped: false,
      samplesV: Float64Array.from({ length: 400 }, (_, i) => (channel === 1 ? 0.5 : 1) * Math.cos((2 * Math.PI * i) / 40)),
    });
    return {
      divisions: 10, verticalDivisions: 10, setVerticalScale: async () => {}, setupChannels: async () => {}, setTimebase: async () => {}, acquire: async () => {},
      fetchWaveform: async (channel) => wave(channel),
      fetchBoth: async () => ({ 1: wave(1), 2: wave(2) }),
      measureAmplitudeVpp: async (channel) => ({ value: reportedVpp(channel), flag: 'ok' }),
    };
  };
  const run = async (scope: ScopeControl) => {
    const instruments = { generator: { configureSine: async () => {}, setOutput: async () => {} }, scope } as unknown as SweepInstruments;
    const measurer = scopeMeasurer({ clock: manualClock(), expectedGainRatioAt: () => 2 });
    await measurer.prepare(instruments);
    const first = await (await measurer.acquire(instruments, setting({ step: 0 }), () => {}))();
    const second = await (await measurer.acquire(instruments, setting({ step: 1 }), () => {}))();
    return { first, second };
  };

  it('notes agreement once per sweep when the scope reads what the fit found (1 Vpp and 2 Vpp)', async () => {
    const { first, second } = await run(makeScope((channel) => (channel === 1 ? 1.0 : 2.0)));
    expect(first.note).toMatch(/agree within 10 %/);
    expect(first.advice).toBeUndefined();
    expect(second.note).toBeUndefined();
  });

  it('warns when the scope reads 10× the fit (a probe attenuation left at ×10)', async () => {
    const { first } = await run(makeScope((channel) => (channel === 1 ? 10 : 2.0)));
    expect(first.advice).toMatch(/probe attenuation/);
  });
});

describe('scope scales', () => {
  it('rounds up to the 1-2-5 sequence', () => {
    expect([0.013, 0.2, 0.21, 0.6, 7].map(niceScale)).toEqual([0.02, 0.2, 0.5, 1, 10]);
  });

  it('sends a new meter aperture only when it moves by more than 0.1 %', () => {
    expect(apertureChanged(NaN, 0.1)).toBe(true);
    expect(apertureChanged(0.1, 0.10005)).toBe(false);
    expect(apertureChanged(0.1, 0.2)).toBe(true);
  });

  it('widens a clipped channel and asks for the step again, then measures it cleanly', async () => {
    const scales: Array<[number, number]> = [];
    let current: { 1: number; 2: number } = { 1: 1, 2: 1 };
    const sample = (channel: 1 | 2): Waveform => {
      const amplitudeV = channel === 1 ? 0.5 : 5; // the output is 10× the input: 10× more than theory says
      const limitV = 5 * current[channel]; // ±5 divisions on screen
      const samplesV = Float64Array.from({ length: 400 }, (_, i) => Math.max(-limitV, Math.min(limitV, amplitudeV * Math.cos((2 * Math.PI * i) / 40))));
      return { channel, sampleIntervalS: 1 / 40_000, samplesV, clipped: amplitudeV >= limitV };
    };
    const scope: ScopeControl = {
      divisions: 10,
      verticalDivisions: 10,
      setVerticalScale: async (channel, voltsPerDiv) => { current = { ...current, [channel]: voltsPerDiv }; scales.push([current[1], current[2]]); },
      setupChannels: async (v) => { current = { ...v }; scales.push([v[1], v[2]]); },
      setTimebase: async () => {},
      acquire: async () => {},
      fetchWaveform: async (channel) => sample(channel),
      fetchBoth: async () => ({ 1: sample(1), 2: sample(2) }),
    };
    const instruments = { generator: { configureSine: async () => {}, setOutput: async () => {} }, scope } as unknown as SweepInstruments;
    const clock = manualClock();
    const measurer = scopeMeasurer({ clock, expectedGainRatioAt: () => 1 });
    await measurer.prepare(instruments);
    const step = setting({ stimulus: 1000 });
    // As the runner does: measure again while the measurer asks for it (each time with a wider scale).
    let remeasured = 0;
    let result;
    for (;;) {
      const read = await measurer.acquire(instruments, step, () => {});
      try {
        result = await read();
        break;
      } catch (error) {
        expect(error).toBeInstanceOf(RemeasureStep);
        remeasured++;
        expect(remeasured).toBeLessThan(4);
      }
    }
    // 5 V peak needs ≥ 1 V/div on ±5 divisions: 0.2 → 0.5 → 2 V/div (×2.5 per try, rounded up to 1-2-5).
    expect(remeasured).toBe(2);
    expect(result!.flags & PointFlag.overrange).toBe(0);
    expect(result!.gainDb).toBeCloseTo(20, 6); // 5 V / 0.5 V
    expect(scales[scales.length - 1][1]).toBeGreaterThan(scales[0][1]);
  });
});
