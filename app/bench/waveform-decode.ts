/**
 * Turns a waveform block and its preamble into volts:
 * volts = (code − codeOffset) · voltsPerCode + voltsOffset.
 */
import { ScpiMalformedReplyError } from '../scpi/errors';
import { parseNumberList } from '../scpi/reading';
import type { PreambleField, WaveformEncoding } from './profile';

export interface WaveformScaling {
  points: number | undefined;
  sampleIntervalS: number;
  voltsPerCode: number;
  codeOffset: number;
  voltsOffset: number;
}

export function parsePreamble(reply: string, fields: readonly PreambleField[], command: string): WaveformScaling {
  const numbers = parseNumberList(reply, command);
  if (numbers.length < fields.length) throw new ScpiMalformedReplyError(command, reply, `a preamble of ${fields.length} numbers (${fields.join(', ')})`);
  const get = (name: PreambleField): number | undefined => {
    const index = fields.indexOf(name);
    return index < 0 ? undefined : numbers[index];
  };
  const sampleIntervalS = get('sampleIntervalS')!;
  if (!(sampleIntervalS > 0)) throw new ScpiMalformedReplyError(command, reply, 'a preamble with a positive sample interval');
  const voltsPerCode = get('voltsPerCode') ?? 1;
  if (!(voltsPerCode > 0)) throw new ScpiMalformedReplyError(command, reply, 'a preamble with a positive volts-per-code');
  return { points: get('points'), sampleIntervalS, voltsPerCode, codeOffset: get('codeOffset') ?? 0, voltsOffset: get('voltsOffset') ?? 0 };
}

export const BYTES_PER_SAMPLE: Record<WaveformEncoding, number> = { int8: 1, 'int16-le': 2, 'int16-be': 2, 'float32-le': 4, 'float32-be': 4 };
const CODE_LIMITS: Partial<Record<WaveformEncoding, [number, number]>> = { int8: [-128, 127], 'int16-le': [-32768, 32767], 'int16-be': [-32768, 32767] };

export function decodeWaveform(bytes: Uint8Array, encoding: WaveformEncoding, scaling: WaveformScaling, command: string): { samplesV: Float64Array; clipped: boolean } {
  const size = BYTES_PER_SAMPLE[encoding];
  if (bytes.length % size !== 0) throw new ScpiMalformedReplyError(command, `<block of ${bytes.length} bytes>`, `a whole number of ${size}-byte samples`);
  const count = bytes.length / size;
  if (scaling.points !== undefined && scaling.points !== count) {
    throw new ScpiMalformedReplyError(command, `<block of ${count} samples>`, `${scaling.points} samples as the preamble says`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const samplesV = new Float64Array(count);
  const limits = CODE_LIMITS[encoding];
  let clipped = false;
  for (let i = 0; i < count; i++) {
    let code: number;
    switch (encoding) {
      case 'int8': code = view.getInt8(i); break;
      case 'int16-le': code = view.getInt16(i * 2, true); break;
      case 'int16-be': code = view.getInt16(i * 2, false); break;
      case 'float32-le': code = view.getFloat32(i * 4, true); break;
      case 'float32-be': code = view.getFloat32(i * 4, false); break;
    }
    if (limits && (code <= limits[0] || code >= limits[1])) clipped = true;
    samplesV[i] = (code - scaling.codeOffset) * scaling.voltsPerCode + scaling.voltsOffset;
  }
  return { samplesV, clipped };
}
