/**
 * Waveform decoding: volts = (code − codeOffset)·voltsPerCode + voltsOffset
 * (the linear scaling our profiles declare; common practice for digitizers),
 * byte orders per IEEE 754 / two's complement.
 */
import { describe, expect, it } from 'vitest';
import { decodeWaveform, parsePreamble } from '../../../app/bench';
import { ScpiMalformedReplyError } from '../../../app/scpi';

const FIELDS = ['points', 'sampleIntervalS', 'xOriginS', 'voltsPerCode', 'codeOffset', 'voltsOffset'] as const;

describe('waveform decoding', () => {
  it('scales 16-bit little- and big-endian codes', () => {
    const scaling = parsePreamble('3,1E-6,0,0.001,10,0.5', [...FIELDS], 'WAV:PRE?');
    const le = Uint8Array.from([0x0a, 0x00, 0x14, 0x00, 0xf6, 0xff]); // 10, 20, −10
    const be = Uint8Array.from([0x00, 0x0a, 0x00, 0x14, 0xff, 0xf6]);
    for (const [bytes, encoding] of [[le, 'int16-le'], [be, 'int16-be']] as const) {
      const { samplesV, clipped } = decodeWaveform(bytes, encoding, scaling, 'WAV:DATA?');
      expect([...samplesV].map((v) => Number(v.toFixed(9)))).toEqual([0.5, 0.51, 0.48]);
      expect(clipped).toBe(false);
    }
    expect(scaling.sampleIntervalS).toBe(1e-6);
  });

  it('reads float32 volts and flags integer samples at the converter limit as clipped', () => {
    const floats = new Uint8Array(new Float32Array([0.25, -1.5]).buffer);
    const scaling = parsePreamble('2,1E-3,0,1,0,0', [...FIELDS], 'Q?');
    expect([...decodeWaveform(floats, 'float32-le', scaling, 'Q?').samplesV]).toEqual([0.25, -1.5]);
    const atLimit = decodeWaveform(Uint8Array.from([0xff, 0x7f, 0x00, 0x00]), 'int16-le', scaling, 'Q?');
    expect(atLimit.clipped).toBe(true);
  });

  it('refuses a block whose size disagrees with the preamble or the sample size', () => {
    const scaling = parsePreamble('4,1E-6,0,1,0,0', [...FIELDS], 'Q?');
    expect(() => decodeWaveform(new Uint8Array(6), 'int16-le', scaling, 'Q?')).toThrow(ScpiMalformedReplyError);
    expect(() => decodeWaveform(new Uint8Array(7), 'int16-le', scaling, 'Q?')).toThrow(/whole number/);
  });

  it('refuses a preamble with too few numbers or a non-positive interval', () => {
    expect(() => parsePreamble('1,2', [...FIELDS], 'Q?')).toThrow(ScpiMalformedReplyError);
    expect(() => parsePreamble('4,0,0,1,0,0', [...FIELDS], 'Q?')).toThrow(/positive sample interval/);
  });
});
