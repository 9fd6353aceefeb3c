/**
 * Simulated true-RMS voltmeter reading the circuit output. READ? measures
 * over the aperture starting when the command arrives (so it takes that long);
 * the AC reading has a first-order bandwidth limit; a fixed range reads
 * 9.9E37 (SCPI overrange) above 120 % of range.
 */
import type { BenchClock } from '../bench/clock';
import { SCPI_INFINITY, SCPI_NOT_A_NUMBER } from '../scpi/reading';
import type { BenchModel } from './bench-model';
import { booleanParam, formatNr3, numberParam, stringParam } from './parameters';
import { SimCommandError } from './scpi-errors';
import { SimInstrument, SIMULATED_MANUFACTURER } from './sim-instrument';
import { sliceBounds, UNTIMED_BEFORE_END_S } from './slices';
import { SOFTWARE_VERSION } from '../contract/version';

/** −3 dB bandwidth of the AC converter (a plausible bench-meter figure, invented). */
export const SIM_METER_AC_BANDWIDTH_HZ = 300e3;
const RANGES_V = [0.1, 1, 10, 100, 1000];
const OVERRANGE_FRACTION = 1.2;
const MIN_SAMPLES = 4096;
const MAX_SAMPLES = 200_000;
const SAMPLES_PER_SLICE = 4096;
const FINAL_SLICE_SAMPLES = 256;

type MeterFunction = 'ac' | 'dc';

export class SimMeter extends SimInstrument {
  private meterFunction: MeterFunction = 'dc';
  private rangeV: Record<MeterFunction, number | 'auto'> = { ac: 'auto', dc: 'auto' };
  private apertureS = 0.1;
  /** Fault injection: replace readings by SCPI overrange / not-a-number. */
  forcedReading: 'overrange' | 'nan' | undefined;

  constructor(
    private readonly model: BenchModel,
    clock: BenchClock,
  ) {
    super({ manufacturer: SIMULATED_MANUFACTURER, model: 'simulated meter', serialNumber: 'SIM-MTR-0001', firmware: SOFTWARE_VERSION }, clock);
    this.define('[SENSe]:FUNCtion[:ON]', ({ params }) => {
      const name = stringParam(params).toUpperCase().replace(/^VOLT(AGE)?:/, 'VOLT:');
      if (name === 'VOLT:AC') this.meterFunction = 'ac';
      else if (name === 'VOLT:DC' || name === 'VOLT') this.meterFunction = 'dc';
      else throw new SimCommandError('illegalParameterValue', params[0]);
    });
    this.define('[SENSe]:FUNCtion[:ON]?', () => (this.meterFunction === 'ac' ? '"VOLT:AC"' : '"VOLT:DC"'));
    for (const fn of ['ac', 'dc'] as const) {
      const node = fn.toUpperCase();
      this.define(`[SENSe]:VOLTage:${node}:RANGe[:UPPer]`, ({ params }) => {
        this.rangeV[fn] = RANGES_V.find((r) => r >= numberParam(params, 0, RANGES_V[RANGES_V.length - 1]))!;
      });
      this.define(`[SENSe]:VOLTage:${node}:RANGe[:UPPer]?`, () => formatNr3(this.rangeV[fn] === 'auto' ? RANGES_V[RANGES_V.length - 1] : (this.rangeV[fn] as number)));
      this.define(`[SENSe]:VOLTage:${node}:RANGe:AUTO`, ({ params }) => {
        if (booleanParam(params)) this.rangeV[fn] = 'auto';
        else if (this.rangeV[fn] === 'auto') this.rangeV[fn] = RANGES_V[RANGES_V.length - 1];
      });
      this.define(`CONFigure:VOLTage:${node}`, () => {
        this.meterFunction = fn;
        this.rangeV[fn] = 'auto';
      });
      this.define(`MEASure:VOLTage:${node}?`, async () => {
        this.meterFunction = fn;
        this.rangeV[fn] = 'auto';
        return this.measure();
      });
    }
    // One aperture for both functions (a simplification of this simulated meter).
    for (const node of ['', ':AC', ':DC']) {
      this.define(`[SENSe]:VOLTage${node}:APERture`, ({ params }) => {
        this.apertureS = numberParam(params, 1e-3, 10);
      });
      this.define(`[SENSe]:VOLTage${node}:APERture?`, () => formatNr3(this.apertureS));
    }
    this.define('READ?', () => this.measure());
  }

  protected reset(): void {
    this.meterFunction = 'dc';
    this.rangeV = { ac: 'auto', dc: 'auto' };
    this.apertureS = 0.1;
  }

  private async measure(): Promise<string> {
    const startS = this.clock.nowS();
    const apertureS = this.apertureS;
    const frequencyHz = this.model.generatorOutput.frequencyHz;
    const count = Math.min(MAX_SAMPLES, Math.max(MIN_SAMPLES, Math.ceil(64 * frequencyHz * apertureS)));
    // Integrated as the aperture runs, slice by slice once each slice is past (as an integrating
    // converter does): the reply then follows the aperture's end by one slice's computation, not by
    // the whole simulation, and a generator change during the aperture enters the slices after it.
    const bounds = sliceBounds(count, SAMPLES_PER_SLICE, FINAL_SLICE_SAMPLES);
    const endS = startS + apertureS;
    let sum = 0;
    let sumSquares = 0;
    for (let k = 0; k + 1 < bounds.length; k++) {
      const first = bounds[k];
      const next = bounds[k + 1];
      const sliceStartS = startS + (first / count) * apertureS;
      const sliceEndS = startS + (next / count) * apertureS;
      await this.clock.sleepS(sliceEndS - this.clock.nowS(), { coarse: (endS - sliceEndS) / this.clock.timeScale > UNTIMED_BEFORE_END_S });
      for (const v of this.model.sampleStratified('output', sliceStartS, sliceEndS - sliceStartS, next - first)) {
        sum += v;
        sumSquares += v * v;
      }
    }
    if (this.forcedReading) return formatNr3(this.forcedReading === 'nan' ? SCPI_NOT_A_NUMBER : SCPI_INFINITY);
    const meanV = sum / count;
    let value: number;
    if (this.meterFunction === 'dc') {
      value = meanV;
    } else {
      const acRmsV = Math.sqrt(Math.max(0, sumSquares / count - meanV * meanV));
      // First-order converter bandwidth: |1/(1 + j f/fbw)|.
      const output = this.model.generatorOutput;
      const bandwidthFactor = output.on && output.shape === 'sine' ? 1 / Math.hypot(1, frequencyHz / SIM_METER_AC_BANDWIDTH_HZ) : 1;
      value = acRmsV * bandwidthFactor;
    }
    const range = this.rangeV[this.meterFunction];
    const fullScale = range === 'auto' ? RANGES_V[RANGES_V.length - 1] : range;
    if (Math.abs(value) > fullScale * OVERRANGE_FRACTION) return formatNr3(SCPI_INFINITY);
    return formatNr3(value);
  }
}
