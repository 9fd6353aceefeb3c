/**
 * Simulated two-channel digitizer, spoken to in SCPI-1999 terms (what the
 * shipped scope profile sends): INPut<n>:STATe, SENSe<n>:VOLTage:RANGe,
 * SENSe:SWEep:TIME / :POINts, INITiate, *OPC?, STATus:OPERation:CONDition?,
 * FORMat[:DATA] / :BORDer, TRACe[:DATA]? CH<n>. Channel 1 is on the circuit
 * input, channel 2 on the output; INITiate captures one record of both on one
 * time base. TRACe:SCALing? CH<n> is this instrument's own query (SCPI-1999 has
 * none for waveform scaling): points, sample interval s, first-sample time s,
 * volts per code, code offset, volts offset.
 */
import type { BenchClock } from '../bench/clock';
import { encodeBlock } from '../scpi/block';
import { SCPI_INFINITY } from '../scpi/reading';
import type { BenchModel, BenchNode } from './bench-model';
import { booleanParam, expectParamCount, formatNr3, keywordParam, numberParam } from './parameters';
import { keywordIs } from './program-message';
import { SimCommandError } from './scpi-errors';
import { SimInstrument, SIMULATED_MANUFACTURER } from './sim-instrument';
import { sliceBounds, UNTIMED_BEFORE_END_S } from './slices';
import { SOFTWARE_VERSION } from '../contract/version';

/** Codes for the full range (SENSe:VOLTage:RANGe) per integer width; the converter reaches a little beyond it. */
const CODES_PER_RANGE: Record<8 | 16, number> = { 8: 125, 16: 32000 };
/** The converter's input limit as a multiple of the range: the 16-bit code 32767 (a simulated figure). */
const LIMIT_PER_RANGE = 32767 / 32000;
const SAMPLES_PER_SLICE = 512;
const LAST_SLICE_SAMPLES = 64;
/** STATus:OPERation condition bit 4, MEASuring (SCPI-1999 Vol. 1 status reporting, bit recalled from memory). */
const OPERATION_MEASURING = 16;

type DataFormat = { kind: 'ascii' } | { kind: 'integer'; bits: 8 | 16; unsigned: boolean } | { kind: 'real32' };

interface Capture {
  intervalS: number;
  /** Volts as seen by the converter (clipped to its input limit). */
  channels: [Float64Array, Float64Array];
  rangeV: [number, number];
}

const CHANNEL_NODE: Record<1 | 2, BenchNode> = { 1: 'input', 2: 'output' };
const POWER_ON = { rangeV: 5, recordS: 0.01, points: 2000 };

export class SimScope extends SimInstrument {
  private rangeV: [number, number] = [POWER_ON.rangeV, POWER_ON.rangeV];
  private channelOn: [boolean, boolean] = [true, true];
  private recordS = POWER_ON.recordS;
  private points = POWER_ON.points;
  private format: DataFormat = { kind: 'integer', bits: 16, unsigned: false };
  private littleEndian = false;
  private capture: Capture | undefined;
  /** Samples of the latest record, computed slice by slice; done a little after the record's time is over. */
  private acquisition: Promise<void> | undefined;
  /** The latest record's time is over (what *OPC? waits for). */
  private recordOver: Promise<void> | undefined;
  private recordIsOver = false;
  private measuring = false;
  /** Fault injection: every sample at the converter's limit (an overdriven input). */
  forcedReading: 'overrange' | 'nan' | undefined;

  constructor(
    private readonly model: BenchModel,
    clock: BenchClock,
  ) {
    super({ manufacturer: SIMULATED_MANUFACTURER, model: 'simulated scope', serialNumber: 'SIM-SCP-0001', firmware: SOFTWARE_VERSION }, clock);
    this.define('INPut#[:STATe]', ({ params, suffixes }) => {
      this.channelOn[channelIndex(suffixes[0])] = booleanParam(params);
    });
    this.define('INPut#[:STATe]?', ({ suffixes }) => (this.channelOn[channelIndex(suffixes[0])] ? '1' : '0'));
    this.define('[SENSe#]:VOLTage[:DC]:RANGe[:UPPer]', ({ params, suffixes }) => {
      this.rangeV[channelIndex(suffixes[0])] = numberParam(params, 5e-3, 500);
    });
    this.define('[SENSe#]:VOLTage[:DC]:RANGe[:UPPer]?', ({ suffixes }) => formatNr3(this.rangeV[channelIndex(suffixes[0])]));
    this.define('[SENSe]:SWEep:TIME', ({ params }) => {
      this.recordS = numberParam(params, 1e-8, 500);
    });
    this.define('[SENSe]:SWEep:TIME?', () => formatNr3(this.recordS));
    this.define('[SENSe]:SWEep:POINts', ({ params }) => {
      this.points = Math.round(numberParam(params, 100, 100_000));
    });
    this.define('[SENSe]:SWEep:POINts?', () => String(this.points));
    this.define('[SENSe]:SWEep:TINTerval?', () => formatNr3(this.recordS / this.points));
    this.define('FORMat[:DATA]', ({ params }) => {
      this.format = dataFormatParam(params);
    });
    this.define('FORMat[:DATA]?', () => formatName(this.format));
    this.define('FORMat:BORDer', ({ params }) => {
      this.littleEndian = keywordParam(params, ['NORMal', 'SWAPped'] as const) === 'SWAPped';
    });
    this.define('FORMat:BORDer?', () => (this.littleEndian ? 'SWAP' : 'NORM'));
    this.define('INITiate[:IMMediate]', () => {
      this.startAcquisition();
    });
    this.define('STATus:OPERation:CONDition?', () => String(this.measuring ? OPERATION_MEASURING : 0));
    this.define('TRACe:SCALing?', async ({ params }) => {
      const channel = traceParam(params);
      const capture = await this.completedCapture();
      const { voltsPerCode, codeOffset } = this.codeScaling(capture.rangeV[channel - 1]);
      return [String(capture.channels[0].length), formatNr3(capture.intervalS), formatNr3(0), formatNr3(voltsPerCode), String(codeOffset), formatNr3(0)].join(',');
    });
    this.define('TRACe[:DATA]?', async ({ params }) => {
      const channel = traceParam(params);
      const capture = await this.completedCapture();
      const encoded = this.encode(capture, channel);
      return typeof encoded === 'string' ? encoded : encodeBlock(encoded);
    });
  }

  protected reset(): void {
    this.rangeV = [POWER_ON.rangeV, POWER_ON.rangeV];
    this.channelOn = [true, true];
    this.recordS = POWER_ON.recordS;
    this.points = POWER_ON.points;
    this.format = { kind: 'integer', bits: 16, unsigned: false };
    this.littleEndian = false;
    this.measuring = false;
    this.capture = undefined;
    this.recordOver = undefined;
    this.recordIsOver = false;
  }

  // The acquisition is complete when its time is over; the last slice's samples are computed while the
  // reply travels (as a scope processes its record), and the data queries wait for them.
  protected override async pendingOperations(): Promise<void> {
    await this.recordOver;
  }

  /** The completed record, once its samples are all computed. */
  private async completedCapture(): Promise<Capture> {
    if (this.recordIsOver) await this.acquisition;
    return this.requireCapture();
  }

  private startAcquisition(): void {
    const startS = this.clock.nowS();
    const intervalS = this.recordS / this.points;
    const points = this.points;
    const rangeV: [number, number] = [this.rangeV[0], this.rangeV[1]];
    this.capture = undefined;
    this.recordIsOver = false;
    this.measuring = true;
    let over = () => {};
    const recordOver = new Promise<void>((resolve) => (over = resolve)).then(() => {
      if (this.recordOver === recordOver) {
        this.recordIsOver = true;
        this.measuring = false;
      }
    });
    this.recordOver = recordOver;
    this.acquisition = this.record(startS, intervalS, points, rangeV, over).then((channels) => {
      this.capture = { intervalS, channels, rangeV };
    });
  }

  /**
   * Both channels, sampled slice by slice once each slice's time has passed. `over` is called as soon as
   * the record's time is over, and the samples still to compute wait one turn of the event loop, so a
   * waiting *OPC? has its reply under way first.
   */
  private async record(startS: number, intervalS: number, points: number, rangeV: [number, number], over: () => void): Promise<[Float64Array, Float64Array]> {
    const channels: [Float64Array, Float64Array] = [new Float64Array(points), new Float64Array(points)];
    const bounds = sliceBounds(points, SAMPLES_PER_SLICE, LAST_SLICE_SAMPLES);
    const endS = startS + points * intervalS;
    let isOver = false;
    for (let k = 0; k + 1 < bounds.length; k++) {
      const first = bounds[k];
      const next = bounds[k + 1];
      const sliceEndS = startS + next * intervalS;
      await this.clock.sleepS(sliceEndS - this.clock.nowS(), { coarse: (endS - sliceEndS) / this.clock.timeScale > UNTIMED_BEFORE_END_S });
      if (!isOver && (next === points || this.clock.nowS() >= endS)) {
        isOver = true;
        over();
        await new Promise<void>((resolve) => setImmediate(resolve));
      }
      for (const channel of [1, 2] as const) {
        const samples = this.model.sample(CHANNEL_NODE[channel], startS + first * intervalS, intervalS, next - first);
        if (!this.channelOn[channel - 1]) samples.fill(0);
        const limitV = LIMIT_PER_RANGE * rangeV[channel - 1];
        for (let i = 0; i < samples.length; i++) samples[i] = Math.max(-limitV, Math.min(limitV, samples[i]));
        channels[channel - 1].set(samples, first);
      }
    }
    return channels;
  }

  private requireCapture(): Capture {
    if (!this.capture) throw new SimCommandError('dataStale', 'no completed acquisition (send INITiate and wait with *OPC?)');
    return this.capture;
  }

  /** Volts per code and the code of 0 V for the present data format and a channel's range. */
  private codeScaling(rangeV: number): { voltsPerCode: number; codeOffset: number } {
    if (this.format.kind !== 'integer') return { voltsPerCode: 1, codeOffset: 0 };
    return { voltsPerCode: rangeV / CODES_PER_RANGE[this.format.bits], codeOffset: this.format.unsigned ? 2 ** (this.format.bits - 1) : 0 };
  }

  /** A channel of the capture in the present format: bytes for a block, text for ASCII. */
  private encode(capture: Capture, channel: 1 | 2): Uint8Array | string {
    const rangeV = capture.rangeV[channel - 1];
    const limitV = LIMIT_PER_RANGE * rangeV;
    const samples = this.forcedReading ? new Float64Array(capture.channels[channel - 1].length).fill(limitV) : capture.channels[channel - 1];
    const format = this.format;
    // At the converter's limit a real or ASCII sample reads SCPI overrange, 9.9E37 (SCPI-1999 Vol. 1 §7.2.1.4, recalled from memory).
    const real = (v: number) => (Math.abs(v) >= limitV ? Math.sign(v) * SCPI_INFINITY : v);
    if (format.kind === 'ascii') return Array.from(samples, (v) => formatNr3(real(v))).join(',');
    if (format.kind === 'real32') {
      const bytes = new Uint8Array(samples.length * 4);
      const view = new DataView(bytes.buffer);
      for (let i = 0; i < samples.length; i++) view.setFloat32(i * 4, real(samples[i]), this.littleEndian);
      return bytes;
    }
    const { voltsPerCode, codeOffset } = this.codeScaling(rangeV);
    const size = format.bits / 8;
    const [low, high] = format.unsigned ? [0, 2 ** format.bits - 1] : [-(2 ** (format.bits - 1)), 2 ** (format.bits - 1) - 1];
    const bytes = new Uint8Array(samples.length * size);
    const view = new DataView(bytes.buffer);
    for (let i = 0; i < samples.length; i++) {
      // A sample at the input limit reads the extreme code, as a saturated converter does.
      const atLimit = Math.abs(samples[i]) >= limitV;
      const code = atLimit ? (samples[i] > 0 ? high : low) : Math.max(low, Math.min(high, Math.round(samples[i] / voltsPerCode) + codeOffset));
      if (size === 1) {
        if (format.unsigned) view.setUint8(i, code);
        else view.setInt8(i, code);
      } else if (format.unsigned) view.setUint16(i * 2, code, this.littleEndian);
      else view.setInt16(i * 2, code, this.littleEndian);
    }
    return bytes;
  }
}

function channelIndex(suffix: number): 0 | 1 {
  if (suffix !== 1 && suffix !== 2) throw new SimCommandError('illegalParameterValue', `channel ${suffix}`);
  return (suffix - 1) as 0 | 1;
}

/** The trace name of a channel: CH1 or CH2 (this instrument's names). */
function traceParam(params: string[]): 1 | 2 {
  expectParamCount(params, 1);
  const match = /^CH([12])$/i.exec(params[0]);
  if (!match) throw new SimCommandError('illegalParameterValue', `${params[0]} (traces are CH1, CH2)`);
  return Number(match[1]) as 1 | 2;
}

/** FORMat[:DATA] ASCii | INTeger,8|16 | UINTeger,8|16 | REAL,32 (SCPI-1999 Vol. 2 FORMat; UINTeger recalled from memory). */
function dataFormatParam(params: string[]): DataFormat {
  if (params.length === 1 && keywordIs(params[0], 'ASCii')) return { kind: 'ascii' };
  if (params.length === 2 && keywordIs(params[0], 'REAL') && params[1] === '32') return { kind: 'real32' };
  if (params.length === 2 && (keywordIs(params[0], 'INTeger') || keywordIs(params[0], 'UINTeger')) && (params[1] === '8' || params[1] === '16')) {
    return { kind: 'integer', bits: Number(params[1]) as 8 | 16, unsigned: keywordIs(params[0], 'UINTeger') };
  }
  throw new SimCommandError('illegalParameterValue', 'ASCii, INTeger,8|16, UINTeger,8|16 or REAL,32');
}

function formatName(format: DataFormat): string {
  if (format.kind === 'ascii') return 'ASC';
  if (format.kind === 'real32') return 'REAL,32';
  return `${format.unsigned ? 'UINT' : 'INT'},${format.bits}`;
}
