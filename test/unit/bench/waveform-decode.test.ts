/**
 * Waveform decoding: volts = (code − codeOffset)·voltsPerCode + voltsOffset
 * (the linear scaling our profiles declare; common practice for digitizers),
 * integers in two's complement or unsigned, IEEE 754 floats, either byte
 * order, and SCPI's 9.9E37 overrange value (SCPI-1999 Vol. 1 §7.2.1.4, clause
 * recalled from memory).
 */
import { describe, expect, it } from 'vitest';
import { decodeAsciiWaveform, decodeBinaryWaveform, scalingFrom, type WaveformScalingSource } from '../../../app/bench';
import { ScpiMalformedReplyError } from '../../../app/scpi';

const ALL_FIELDS: WaveformScalingSource = { fields: ['points', 'sampleIntervalS', 'xOriginS', 'voltsPerCode', 'codeOffset', 'voltsOffset'], fixed: {} };
const rounded = (values: Float64Array) => [...values].map((v) => Number(v.toFixed(9)));

describe('waveform decoding', () => {
  it('scales 16-bit signed codes in either byte order', () => {
    const scaling = scalingFrom(ALL_FIELDS, '3,1E-6,0,0.001,10,0.5', 'TRACe:SCALing?');
    const little = Uint8Array.from([0x0a, 0x00, 0x14, 0x00, 0xf6, 0xff]); // 10, 20, −10
    const big = Uint8Array.from([0x00, 0x0a, 0x00, 0x14, 0xff, 0xf6]);
    for (const [bytes, byteOrder] of [[little, 'little'], [big, 'big']] as const) {
      const { samplesV, clipped } = decodeBinaryWaveform(bytes, { format: 'binary', sample: 'int16', byteOrder }, scaling, 'TRACe:DATA?');
      expect(rounded(samplesV)).toEqual([0.5, 0.51, 0.48]);
      expect(clipped).toBe(false);
    }
    expect(scaling.sampleIntervalS).toBe(1e-6);
  });

  it('reads unsigned 8- and 16-bit codes around their code offset, and flags the extreme codes as clipped', () => {
    const source: WaveformScalingSource = { fields: [], fixed: { sampleIntervalS: 1e-3, voltsPerCode: 0.01, codeOffset: 128 } };
    const scaling = scalingFrom(source, undefined, 'fixed');
    const eight = decodeBinaryWaveform(Uint8Array.from([128, 138, 118]), { format: 'binary', sample: 'uint8', byteOrder: 'big' }, scaling, 'Q?');
    expect(rounded(eight.samplesV)).toEqual([0, 0.1, -0.1]);
    expect(eight.clipped).toBe(false);
    expect(decodeBinaryWaveform(Uint8Array.from([255, 128]), { format: 'binary', sample: 'uint8', byteOrder: 'big' }, scaling, 'Q?').clipped).toBe(true);
    expect(decodeBinaryWaveform(Uint8Array.from([0x80, 0x00]), { format: 'binary', sample: 'int8', byteOrder: 'big' }, scaling, 'Q?').clipped).toBe(true); // −128
    const sixteen = scalingFrom({ fields: [], fixed: { sampleIntervalS: 1e-3, voltsPerCode: 1e-4, codeOffset: 32768 } }, undefined, 'fixed');
    const u16 = decodeBinaryWaveform(Uint8Array.from([0x80, 0x0a, 0x7f, 0xf6]), { format: 'binary', sample: 'uint16', byteOrder: 'big' }, sixteen, 'Q?');
    expect(rounded(u16.samplesV)).toEqual([0.001, -0.001]);
  });

  it('reads float32 volts; SCPI overrange samples mark the record clipped and take the largest finite magnitude', () => {
    const scaling = scalingFrom({ fields: ['sampleIntervalS'], fixed: {} }, '1E-3', 'Q?');
    const floats = new Uint8Array(new Float32Array([0.25, -1.5]).buffer);
    expect([...decodeBinaryWaveform(floats, { format: 'binary', sample: 'float32', byteOrder: 'little' }, scaling, 'Q?').samplesV]).toEqual([0.25, -1.5]);
    const over = new Uint8Array(new Float32Array([0.25, -9.9e37, -1.5]).buffer);
    const decoded = decodeBinaryWaveform(over, { format: 'binary', sample: 'float32', byteOrder: 'little' }, scaling, 'Q?');
    expect(decoded.clipped).toBe(true);
    expect([...decoded.samplesV]).toEqual([0.25, -1.5, -1.5]);
  });

  it('reads ASCII numbers', () => {
    const scaling = scalingFrom({ fields: [], fixed: { sampleIntervalS: 2e-6 } }, undefined, 'fixed');
    const { samplesV, clipped } = decodeAsciiWaveform('+1.5E-01,-2.0E-01,3', scaling, 'TRACe:DATA?');
    expect([...samplesV]).toEqual([0.15, -0.2, 3]);
    expect(clipped).toBe(false);
    expect(() => decodeAsciiWaveform('1,2,x', scaling, 'TRACe:DATA?')).toThrow(ScpiMalformedReplyError);
  });

  it('refuses data whose size disagrees with the scaling or the sample size, naming the bytes', () => {
    const scaling = scalingFrom(ALL_FIELDS, '4,1E-6,0,1,0,0', 'Q?');
    const int16 = { format: 'binary', sample: 'int16', byteOrder: 'little' } as const;
    expect(() => decodeBinaryWaveform(new Uint8Array(6), int16, scaling, 'Q?')).toThrow(/4 samples as the scaling says, not 3/);
    expect(() => decodeBinaryWaveform(Uint8Array.from([1, 2, 3, 4, 5, 6, 7]), int16, scaling, 'Q?')).toThrow(/block of 7 bytes: 01 02 03/);
  });

  it('refuses a scaling reply with the wrong field count or a non-positive interval', () => {
    expect(() => scalingFrom(ALL_FIELDS, '1,2', 'Q?')).toThrow(/6 numbers .* not 2/);
    expect(() => scalingFrom(ALL_FIELDS, '4,0,0,1,0,0', 'Q?')).toThrow(/positive sample interval/);
  });

  it('takes each quantity from the reply field or from the fixed value, and skips ignored fields', () => {
    const scaling = scalingFrom({ fields: ['ignore', 'sampleIntervalS'], fixed: { voltsPerCode: 0.5, voltsOffset: -1 } }, '99,1E-5', 'Q?');
    expect(scaling).toEqual({ points: undefined, sampleIntervalS: 1e-5, voltsPerCode: 0.5, codeOffset: 0, voltsOffset: -1 });
  });
});
