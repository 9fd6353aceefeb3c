/**
 * One scenario run against the simulated bench over whichever link the test
 * opened (PTY or TCP), so both transports are held to the same checks.
 *
 * Expected values come from the theory engine (app/circuit solveAc) applied
 * to the design with the generator's 50 Ω source resistance added in series
 * (voltage-divider model of a generator output, handbook), and the sine
 * relations Vrms = Vpk/√2 (handbook formula).
 */
import { expect } from 'vitest';
import { openInstrument, type OpenedInstrument } from '../../../app/bench';
import { parseDesign, solveAc, type Design } from '../../../app/circuit';
import type { SimulatedBench } from '../../../app/sim';
import { sineFit3 } from '../../../app/signal';
import { degreesFromRadians } from '../../../app/units';

export const TEST_DESIGN_JSON = {
  name: 'Integration test: inverting low-pass, gain −10, corner ≈ 1.06 kHz (invented)',
  input: 'in',
  output: 'out',
  parts: [
    { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '1k' },
    { id: 'R2', type: 'resistor', nodes: ['inv', 'out'], value: '10k' },
    { id: 'C1', type: 'capacitor', nodes: ['inv', 'out'], value: '15n' },
    { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] } },
  ],
};

/** Theory: complex transfer from generator EMF (behind 50 Ω) to a node. */
export function theoryFromEmf(design: Design, node: string, frequencyHz: number): { gain: number; phaseDeg: number } {
  const withSource: Design = {
    ...design,
    input: 'emf',
    output: node,
    parts: [...design.parts, { id: 'RS', type: 'resistor', nodes: ['emf', design.input], value: 50 }],
  };
  const response = solveAc(withSource, Float64Array.of(frequencyHz));
  return { gain: Math.hypot(response.re[0], response.im[0]), phaseDeg: degreesFromRadians(Math.atan2(response.im[0], response.re[0])) };
}

/**
 * Least-squares amplitude and phase of a sine at a known frequency (IEEE Std 1057 three-parameter
 * form, app/signal sineFit3): phaseDeg is φ of A·cos(2πf·t + φ) (only differences are compared), with
 * the largest residual from the fitted sine.
 */
export function fitSine(samplesV: Float64Array, intervalS: number, frequencyHz: number): { amplitudeV: number; phaseDeg: number; residualMaxV: number } {
  const fit = sineFit3({ samplesV, sampleIntervalS: intervalS, frequencyHz });
  let residualMaxV = 0;
  for (let i = 0; i < samplesV.length; i++) {
    const fittedV = fit.amplitudeV * Math.cos(2 * Math.PI * frequencyHz * i * intervalS + fit.phaseRad) + fit.offsetV;
    residualMaxV = Math.max(residualMaxV, Math.abs(samplesV[i] - fittedV));
  }
  return { amplitudeV: fit.amplitudeV, phaseDeg: degreesFromRadians(fit.phaseRad), residualMaxV };
}

export interface OpenedBench {
  generator: OpenedInstrument<'generator'>;
  meter: OpenedInstrument<'meter'>;
  scope: OpenedInstrument<'scope'>;
  close(): Promise<void>;
}

export async function openBench(bench: SimulatedBench): Promise<OpenedBench> {
  const generator = await openInstrument(bench.addresses.generator, 'generator', 'scpi-generator', { maxStimulusVpp: 2 });
  const meter = await openInstrument(bench.addresses.meter, 'meter', 'scpi-meter');
  const scope = await openInstrument(bench.addresses.scope, 'scope', 'scpi-scope');
  return {
    generator,
    meter,
    scope,
    close: async () => {
      for (const instrument of [generator, meter, scope]) await instrument.close().catch(() => undefined);
    },
  };
}

/** The checks every transport must pass. */
export async function runBenchScenario(bench: SimulatedBench): Promise<void> {
  const design = parseDesign(TEST_DESIGN_JSON);
  const opened = await openBench(bench);
  try {
    const { generator, meter, scope } = opened;
    for (const instrument of [generator, meter, scope]) expect(instrument.identity.manufacturer).toMatch(/simulated/);

    // Generator: set and read back the frequency.
    const frequencyHz = 1000;
    const amplitudeVpp = 1;
    await generator.control.configureSine({ frequencyHz, amplitudeVpp, offsetV: 0 });
    await generator.control.setOutput(true);
    expect(await generator.control.readFrequencyHz()).toEqual({ value: frequencyHz, flag: 'ok' });
    await generator.control.configureSine({ frequencyHz: 1234.5, amplitudeVpp, offsetV: 0 });
    expect((await generator.control.readFrequencyHz()).value).toBe(1234.5);
    await generator.control.configureSine({ frequencyHz, amplitudeVpp, offsetV: 0 });
    await bench.clock.sleepS(0.01); // ≫ 7τ (τ = R2·C1 = 150 µs)

    // Meter: AC RMS of the output against theory (high-Z setting: EMF = displayed amplitude).
    const out = theoryFromEmf(design, 'out', frequencyHz);
    const expectedRmsV = (out.gain * amplitudeVpp) / 2 / Math.SQRT2;
    await meter.control.setIntegration(0.1);
    const rms = await meter.control.readAcRmsV();
    expect(rms.flag).toBe('ok');
    // 0.3 %: stratified-sampling scatter of the simulated meter plus its 300 kHz bandwidth (5e−6 at 1 kHz).
    expect(Math.abs(rms.value / expectedRmsV - 1)).toBeLessThan(3e-3);
    const dc = await meter.control.readDcV();
    expect(Math.abs(dc.value)).toBeLessThan(0.01);

    // Scope: both channels of one acquisition; amplitude and phase against theory; block intact.
    const input = theoryFromEmf(design, 'in', frequencyHz);
    await scope.control.setupChannels({ 1: 0.2, 2: 1 });
    await scope.control.setTimebase(5 / frequencyHz);
    await scope.control.acquire();
    const ch1 = await scope.control.fetchWaveform(1);
    const ch2 = await scope.control.fetchWaveform(2);
    expect(ch1.samplesV.length).toBe(2000);
    expect(ch1.sampleIntervalS).toBeCloseTo(5 / frequencyHz / 2000, 12);
    expect(ch1.clipped || ch2.clipped).toBe(false);
    const fit1 = fitSine(ch1.samplesV, ch1.sampleIntervalS, frequencyHz);
    const fit2 = fitSine(ch2.samplesV, ch2.sampleIntervalS, frequencyHz);
    expect(Math.abs(fit1.amplitudeV / ((input.gain * amplitudeVpp) / 2) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(fit2.amplitudeV / ((out.gain * amplitudeVpp) / 2) - 1)).toBeLessThan(1e-3);
    const measuredPhaseDeg = ((fit2.phaseDeg - fit1.phaseDeg + 540) % 360) - 180;
    const theoryPhaseDeg = ((out.phaseDeg - input.phaseDeg + 540) % 360) - 180;
    expect(Math.abs(measuredPhaseDeg - theoryPhaseDeg)).toBeLessThan(0.1);
    // A corrupted or mis-framed byte would leave a residual far above one 16-bit code (5·V/div/32000).
    expect(fit2.residualMaxV).toBeLessThan((5 * 1) / 32000);
    expect(fit1.residualMaxV).toBeLessThan((5 * 0.2) / 32000);

    // Both channels in one program message (units separated by ';', IEEE 488.2 §8.4.1, recalled from
    // memory): the same preamble and the same samples as the per-channel reads, in one round trip.
    const both = await scope.control.fetchBoth();
    expect([...both[1].samplesV]).toEqual([...ch1.samplesV]);
    expect([...both[2].samplesV]).toEqual([...ch2.samplesV]);
    expect([both[1].sampleIntervalS, both[2].sampleIntervalS]).toEqual([ch1.sampleIntervalS, ch2.sampleIntervalS]);

    // The raw block: binary, containing bytes equal to LF and CR, delivered whole and identical on refetch.
    const raw1 = await scope.session.queryBlock('TRACe:DATA? CH2');
    const raw2 = await scope.session.queryBlock('TRACe:DATA? CH2');
    expect(raw1.length).toBe(4000);
    expect(raw1.includes(0x0a) || raw1.includes(0x0d)).toBe(true);
    expect(Buffer.from(raw1).equals(Buffer.from(raw2))).toBe(true);

    // The shipped profile has no scope-side measurements: SCPI-1999 has no peak-to-peak or phase query for a digitizer.
    expect(scope.control.measureAmplitudeVpp).toBeUndefined();

    // Nothing went wrong on the way.
    for (const instrument of [generator, meter, scope]) expect(await instrument.session.drainErrors()).toEqual([]);
  } finally {
    await opened.close();
  }
}
