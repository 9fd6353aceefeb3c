/**
 * Simulated two-channel digitizing scope: channel 1 on the circuit input,
 * channel 2 on the output. INITiate captures one record of both channels on
 * one time base; *OPC? answers when the record is complete; WAVeform:DATA?
 * returns it as a definite-length block (16-bit integers or 32-bit floats).
 */
import type { BenchClock } from '../bench/clock';
import { encodeBlock } from '../scpi/block';
import { SCPI_INFINITY, SCPI_NOT_A_NUMBER } from '../scpi/reading';
import { degreesFromRadians, wrapPhaseDeg } from '../units';
import type { BenchModel, BenchNode } from './bench-model';
import { booleanParam, expectParamCount, formatNr3, keywordParam, numberParam } from './parameters';
import { keywordIs } from './program-message';
import { SimCommandError } from './scpi-errors';
import { SimInstrument, SIMULATED_MANUFACTURER } from './sim-instrument';
import { sliceBounds } from './slices';
import { SOFTWARE_VERSION } from '../contract/version';

export const SIM_SCOPE_DIVISIONS = 10;
/** Codes for ±5 vertical divisions; the 16-bit converter clips beyond ±32767. */
const CODES_PER_FIVE_DIVISIONS = 32000;
const CODE_LIMIT = 32767;
const SAMPLES_PER_SLICE = 512;
const LAST_SLICE_SAMPLES = 64;

interface Capture {
  intervalS: number;
  /** Volts as seen by the converter (clipped to its range). */
  channels: [Float64Array, Float64Array];
  voltsPerCode: [number, number];
  frequencyHz: number;
}

const CHANNEL_NODE: Record<1 | 2, BenchNode> = { 1: 'input', 2: 'output' };

export class SimScope extends SimInstrument {
  private voltsPerDiv: [number, number] = [1, 1];
  private channelOn: [boolean, boolean] = [true, true];
  private secondsPerDiv = 1e-3;
  private points = 2000;
  private format: 'int16' | 'real32' = 'int16';
  private littleEndian = false;
  private source: 1 | 2 = 1;
  private capture: Capture | undefined;
  /** Samples of the latest record, computed slice by slice; done a little after the record's time is over. */
  private acquisition: Promise<void> | undefined;
  /** The latest record's time is over (what *OPC? waits for). */
  private recordOver: Promise<void> | undefined;
  private recordIsOver = false;
  /** Fault injection: replace measurement replies by SCPI overrange / not-a-number. */
  forcedReading: 'overrange' | 'nan' | undefined;

  constructor(
    private readonly model: BenchModel,
    clock: BenchClock,
  ) {
    super({ manufacturer: SIMULATED_MANUFACTURER, model: 'simulated scope', serialNumber: 'SIM-SCP-0001', firmware: SOFTWARE_VERSION }, clock);
    this.define('CHANnel#[:STATe]', ({ params, suffixes }) => {
      this.channelOn[channelIndex(suffixes[0])] = booleanParam(params);
    });
    this.define('CHANnel#:SCALe', ({ params, suffixes }) => {
      this.voltsPerDiv[channelIndex(suffixes[0])] = numberParam(params, 1e-3, 100);
    });
    this.define('CHANnel#:SCALe?', ({ suffixes }) => formatNr3(this.voltsPerDiv[channelIndex(suffixes[0])]));
    this.define('TIMebase:SCALe', ({ params }) => {
      this.secondsPerDiv = numberParam(params, 1e-9, 50);
    });
    this.define('TIMebase:SCALe?', () => formatNr3(this.secondsPerDiv));
    this.define('ACQuire:POINts', ({ params }) => {
      this.points = Math.round(numberParam(params, 100, 100_000));
    });
    this.define('ACQuire:POINts?', () => String(this.points));
    this.define('FORMat[:DATA]', ({ params }) => {
      if (params.length === 2 && keywordIs(params[0], 'INTeger') && params[1] === '16') this.format = 'int16';
      else if (params.length === 2 && keywordIs(params[0], 'REAL') && params[1] === '32') this.format = 'real32';
      else throw new SimCommandError('illegalParameterValue', 'INTeger,16 or REAL,32');
    });
    this.define('FORMat:BORDer', ({ params }) => {
      this.littleEndian = keywordParam(params, ['NORMal', 'SWAPped'] as const) === 'SWAPped';
    });
    this.define('INITiate[:IMMediate]', () => {
      this.startAcquisition();
    });
    this.define('WAVeform:SOURce', ({ params }) => {
      this.source = channelParam(params);
    });
    this.define('WAVeform:PREamble?', async () => {
      const capture = await this.completedCapture();
      const voltsPerCode = this.format === 'int16' ? capture.voltsPerCode[this.source - 1] : 1;
      // points, sample interval, x origin, volts per code, code offset, volts offset
      return [String(capture.channels[0].length), formatNr3(capture.intervalS), formatNr3(0), formatNr3(voltsPerCode), '0', formatNr3(0)].join(',');
    });
    this.define('WAVeform:DATA?', async () => encodeBlock(this.encode(await this.completedCapture(), this.source)));
    this.define('MEASure:VPP?', async ({ params }) => {
      const channel = channelParam(params);
      const capture = await this.completedCapture();
      if (this.forcedReading) return this.forced();
      const samples = capture.channels[channel - 1];
      let min = Infinity;
      let max = -Infinity;
      for (const v of samples) {
        min = Math.min(min, v);
        max = Math.max(max, v);
      }
      const limitV = CODE_LIMIT * capture.voltsPerCode[channel - 1];
      if (max >= limitV || min <= -limitV) return formatNr3(SCPI_INFINITY);
      return formatNr3(max - min);
    });
    this.define('MEASure:PHASe?', async ({ params }) => {
      if (params.length !== 2) throw new SimCommandError('missingParameter', 'CHANnel1,CHANnel2');
      const capture = await this.completedCapture();
      if (this.forcedReading) return this.forced();
      const [a, b] = params.map((p) => channelParam([p]));
      const phaseA = phaseAtRad(capture.channels[a - 1], capture.intervalS, capture.frequencyHz);
      const phaseB = phaseAtRad(capture.channels[b - 1], capture.intervalS, capture.frequencyHz);
      if (phaseA === undefined || phaseB === undefined) return formatNr3(SCPI_NOT_A_NUMBER);
      return formatNr3(wrapPhaseDeg(degreesFromRadians(phaseB - phaseA)));
    });
  }

  protected reset(): void {
    this.voltsPerDiv = [1, 1];
    this.channelOn = [true, true];
    this.secondsPerDiv = 1e-3;
    this.points = 2000;
    this.format = 'int16';
    this.littleEndian = false;
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
    const recordS = this.secondsPerDiv * SIM_SCOPE_DIVISIONS;
    const intervalS = recordS / this.points;
    const points = this.points;
    const voltsPerCode: [number, number] = [(5 * this.voltsPerDiv[0]) / CODES_PER_FIVE_DIVISIONS, (5 * this.voltsPerDiv[1]) / CODES_PER_FIVE_DIVISIONS];
    this.capture = undefined;
    this.recordIsOver = false;
    let over = () => {};
    const recordOver = new Promise<void>((resolve) => (over = resolve)).then(() => {
      if (this.recordOver === recordOver) this.recordIsOver = true;
    });
    this.recordOver = recordOver;
    const frequencyHz = this.model.generatorOutput.frequencyHz;
    this.acquisition = this.record(startS, intervalS, points, voltsPerCode, over).then((channels) => {
      this.capture = { intervalS, channels, voltsPerCode, frequencyHz };
    });
  }

  /**
   * Both channels, sampled slice by slice once each slice's time has passed. `over` is called as soon as
   * the record's time is over, and the samples still to compute wait one turn of the event loop, so a
   * waiting *OPC? has its reply under way first.
   */
  private async record(startS: number, intervalS: number, points: number, voltsPerCode: [number, number], over: () => void): Promise<[Float64Array, Float64Array]> {
    const channels: [Float64Array, Float64Array] = [new Float64Array(points), new Float64Array(points)];
    const bounds = sliceBounds(points, SAMPLES_PER_SLICE, LAST_SLICE_SAMPLES);
    const endS = startS + points * intervalS;
    let isOver = false;
    for (let k = 0; k + 1 < bounds.length; k++) {
      const first = bounds[k];
      const next = bounds[k + 1];
      await this.clock.sleepS(startS + next * intervalS - this.clock.nowS());
      if (!isOver && (next === points || this.clock.nowS() >= endS)) {
        isOver = true;
        over();
        await new Promise<void>((resolve) => setImmediate(resolve));
      }
      for (const channel of [1, 2] as const) {
        const samples = this.model.sample(CHANNEL_NODE[channel], startS + first * intervalS, intervalS, next - first);
        if (!this.channelOn[channel - 1]) samples.fill(0);
        const limitV = CODE_LIMIT * voltsPerCode[channel - 1];
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

  private forced(): string {
    return formatNr3(this.forcedReading === 'nan' ? SCPI_NOT_A_NUMBER : SCPI_INFINITY);
  }

  private encode(capture: Capture, channel: 1 | 2): Uint8Array {
    const samples = capture.channels[channel - 1];
    const bytes = new Uint8Array(samples.length * (this.format === 'int16' ? 2 : 4));
    const view = new DataView(bytes.buffer);
    const voltsPerCode = capture.voltsPerCode[channel - 1];
    for (let i = 0; i < samples.length; i++) {
      if (this.format === 'int16') view.setInt16(i * 2, Math.max(-CODE_LIMIT, Math.min(CODE_LIMIT, Math.round(samples[i] / voltsPerCode))), this.littleEndian);
      else view.setFloat32(i * 4, samples[i], this.littleEndian);
    }
    return bytes;
  }
}

function channelIndex(suffix: number): 0 | 1 {
  if (suffix !== 1 && suffix !== 2) throw new SimCommandError('illegalParameterValue', `channel ${suffix}`);
  return (suffix - 1) as 0 | 1;
}

function channelParam(params: string[]): 1 | 2 {
  expectParamCount(params, 1);
  const match = /^CHAN(?:NEL)?([12])$/i.exec(params[0]);
  if (!match) throw new SimCommandError('illegalParameterValue', params[0]);
  return Number(match[1]) as 1 | 2;
}

/** Phase of the component at `frequencyHz` (single-bin DFT), radians; undefined without signal. */
function phaseAtRad(samples: Float64Array, intervalS: number, frequencyHz: number): number | undefined {
  let re = 0;
  let im = 0;
  for (let i = 0; i < samples.length; i++) {
    const angle = 2 * Math.PI * frequencyHz * i * intervalS;
    re += samples[i] * Math.cos(angle);
    im -= samples[i] * Math.sin(angle);
  }
  if (Math.hypot(re, im) === 0) return undefined;
  return Math.atan2(im, re);
}
