/**
 * Turns a channel's waveform data and its scaling into volts:
 * volts = (code − codeOffset) · voltsPerCode + voltsOffset.
 * Data is a definite-length block of binary samples or an ASCII list of
 * numbers, as the profile's scope.data says; scaling quantities come from the
 * scaling reply's named fields or from fixed values (scope.scaling).
 */
import { ScpiMalformedReplyError } from '../scpi/errors';
import { classifyNumber, parseNumberList } from '../scpi/reading';
import type { SampleType, ScalingQuantity, WaveformData, WaveformScalingSource } from './profile';

export interface WaveformScaling {
  points: number | undefined;
  sampleIntervalS: number;
  voltsPerCode: number;
  codeOffset: number;
  voltsOffset: number;
}

/**
 * The scaling of a channel from the profile's fixed values and, when it names
 * fields, the waveformScaling reply (`reply`, undefined when there is none).
 */
export function scalingFrom(source: WaveformScalingSource, reply: string | undefined, command: string): WaveformScaling {
  const read = new Map<ScalingQuantity, number>();
  if (source.fields.length > 0) {
    const text = reply ?? '';
    const numbers = parseNumberList(text, command);
    if (numbers.length !== source.fields.length) {
      throw new ScpiMalformedReplyError(command, text, `${source.fields.length} numbers (${source.fields.join(', ')}), not ${numbers.length}`);
    }
    source.fields.forEach((name, i) => {
      if (name !== 'ignore') read.set(name, numbers[i]);
    });
  }
  const get = (name: ScalingQuantity): number | undefined => read.get(name) ?? source.fixed[name];
  const sampleIntervalS = get('sampleIntervalS')!;
  if (!(sampleIntervalS > 0)) throw new ScpiMalformedReplyError(command, reply ?? '', 'a positive sample interval');
  const voltsPerCode = get('voltsPerCode') ?? 1;
  if (!(voltsPerCode > 0)) throw new ScpiMalformedReplyError(command, reply ?? '', 'a positive volts-per-code');
  const points = get('points');
  if (points !== undefined && !(Number.isInteger(points) && points >= 0)) throw new ScpiMalformedReplyError(command, reply ?? '', 'a whole number of points');
  return { points, sampleIntervalS, voltsPerCode, codeOffset: get('codeOffset') ?? 0, voltsOffset: get('voltsOffset') ?? 0 };
}

export const BYTES_PER_SAMPLE: Record<SampleType, number> = { int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, float32: 4, float64: 8 };

/** Lowest and highest code of an integer sample type: a sample there sat at the converter's limit. */
const CODE_LIMITS: Partial<Record<SampleType, [number, number]>> = {
  int8: [-128, 127],
  uint8: [0, 255],
  int16: [-32768, 32767],
  uint16: [0, 65535],
  int32: [-2147483648, 2147483647],
};

export interface DecodedWaveform {
  samplesV: Float64Array;
  /** Some samples sat at the converter's limits (or read SCPI overrange): the vertical scale is too small. */
  clipped: boolean;
}

/** Binary samples of a definite-length block. */
export function decodeBinaryWaveform(bytes: Uint8Array, data: Extract<WaveformData, { format: 'binary' }>, scaling: WaveformScaling, command: string): DecodedWaveform {
  const size = BYTES_PER_SAMPLE[data.sample];
  if (bytes.length % size !== 0) throw new ScpiMalformedReplyError(command, describeBytes(bytes), `a whole number of ${size}-byte ${data.sample} samples`);
  const count = bytes.length / size;
  checkPoints(count, scaling, command, bytes);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const little = data.byteOrder === 'little';
  const read = sampleReader(view, data.sample, little);
  const codes = new Float64Array(count);
  for (let i = 0; i < count; i++) codes[i] = read(i);
  const limits = CODE_LIMITS[data.sample];
  if (limits) {
    let clipped = false;
    for (let i = 0; i < count; i++) if (codes[i] <= limits[0] || codes[i] >= limits[1]) clipped = true;
    return { samplesV: scale(codes, scaling), clipped };
  }
  return scaleWithOverrange(codes, scaling);
}

/** ASCII data: comma-separated decimal numbers (one response unit). */
export function decodeAsciiWaveform(text: string, scaling: WaveformScaling, command: string): DecodedWaveform {
  const numbers = text.trim() === '' ? [] : parseNumberList(text, command);
  checkPoints(numbers.length, scaling, command, text);
  return scaleWithOverrange(Float64Array.from(numbers), scaling);
}

function sampleReader(view: DataView, sample: SampleType, little: boolean): (i: number) => number {
  switch (sample) {
    case 'int8': return (i) => view.getInt8(i);
    case 'uint8': return (i) => view.getUint8(i);
    case 'int16': return (i) => view.getInt16(i * 2, little);
    case 'uint16': return (i) => view.getUint16(i * 2, little);
    case 'int32': return (i) => view.getInt32(i * 4, little);
    case 'float32': return (i) => view.getFloat32(i * 4, little);
    case 'float64': return (i) => view.getFloat64(i * 8, little);
  }
}

function checkPoints(count: number, scaling: WaveformScaling, command: string, received: Uint8Array | string): void {
  if (scaling.points !== undefined && scaling.points !== count) {
    throw new ScpiMalformedReplyError(command, typeof received === 'string' ? received.slice(0, 200) : describeBytes(received), `${scaling.points} samples as the scaling says, not ${count}`);
  }
}

function scale(codes: Float64Array, scaling: WaveformScaling): Float64Array {
  for (let i = 0; i < codes.length; i++) codes[i] = (codes[i] - scaling.codeOffset) * scaling.voltsPerCode + scaling.voltsOffset;
  return codes;
}

/**
 * Float and ASCII samples may carry SCPI's overrange or not-a-number values (9.9E37, 9.91E37): the record
 * is clipped, and those samples take the largest finite magnitude of the record (with their sign) so a fit
 * over the record stays finite while the caller widens the scale.
 */
function scaleWithOverrange(codes: Float64Array, scaling: WaveformScaling): DecodedWaveform {
  let clipped = false;
  let largest = 0;
  for (let i = 0; i < codes.length; i++) {
    if (classifyNumber(codes[i]).flag !== 'ok') clipped = true;
    else largest = Math.max(largest, Math.abs(codes[i]));
  }
  if (clipped) for (let i = 0; i < codes.length; i++) if (classifyNumber(codes[i]).flag !== 'ok') codes[i] = codes[i] < 0 ? -largest : largest;
  return { samplesV: scale(codes, scaling), clipped };
}

/** The start of a block as hex, for messages about a reply that did not parse. */
export function describeBytes(bytes: Uint8Array, limit = 32): string {
  const hex = Array.from(bytes.subarray(0, limit), (b) => b.toString(16).padStart(2, '0')).join(' ');
  return `<block of ${bytes.length} bytes: ${hex}${bytes.length > limit ? ' …' : ''}>`;
}
