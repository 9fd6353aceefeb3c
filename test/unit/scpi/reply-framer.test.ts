/**
 * Reply framing. Sources: IEEE 488.2 §8.5 (response message terminator NL;
 * CR LF accepted as common practice on serial links), §8.7.9 (definite-length
 * arbitrary block `#<n><len><bytes>`) — clause numbers recalled from memory.
 */
import { describe, expect, it } from 'vitest';
import { encodeBlock, frameReply, frameResponseUnits } from '../../../app/scpi';

const bytes = (text: string) => new TextEncoder().encode(text);

describe('frameReply', () => {
  it('frames a line ending in LF and one ending in CR LF to the same text (IEEE 488.2 §8.5; CR LF common practice)', () => {
    expect(frameReply(bytes('+1.0E+03\n'))).toEqual({ kind: 'text', text: '+1.0E+03', consumed: 9 });
    expect(frameReply(bytes('+1.0E+03\r\n'))).toEqual({ kind: 'text', text: '+1.0E+03', consumed: 10 });
  });

  it('waits for the terminator before delivering', () => {
    expect(frameReply(bytes('+1.0E+0'))).toEqual({ kind: 'incomplete' });
    expect(frameReply(new Uint8Array(0))).toEqual({ kind: 'incomplete' });
  });

  it('frames a block by its length even when the data contains LF and CR bytes (IEEE 488.2 §8.7.9)', () => {
    const data = Uint8Array.from([0x0a, 0x0d, 0x0a, 0x23, 0x00, 0xff, 0x0a]);
    const block = encodeBlock(data);
    expect(new TextDecoder().decode(block.subarray(0, 3))).toBe('#17');
    const framed = frameReply(Uint8Array.from([...block, 0x0a, ...bytes('next\n')]));
    expect(framed.kind).toBe('block');
    if (framed.kind !== 'block') return;
    expect([...framed.bytes]).toEqual([...data]);
    expect(framed.consumed).toBe(block.length + 1);
  });

  it('accepts CR LF after a block and waits while the block is incomplete', () => {
    const block = encodeBlock(Uint8Array.from([1, 2, 3]));
    expect(frameReply(block).kind).toBe('incomplete');
    const framed = frameReply(Uint8Array.from([...block, 0x0d, 0x0a]));
    expect(framed).toMatchObject({ kind: 'block', consumed: block.length + 2 });
  });

  it('handles a multi-digit length header (#42000…)', () => {
    const data = new Uint8Array(2000).map((_, i) => i % 256);
    const framed = frameReply(Uint8Array.from([...encodeBlock(data), 0x0a]));
    expect(framed.kind === 'block' && framed.bytes.length).toBe(2000);
  });

  it('treats #H/#B/#Q non-decimal numerics as text, not blocks (IEEE 488.2 §7.7.4)', () => {
    expect(frameReply(bytes('#H1F\n'))).toMatchObject({ kind: 'text', text: '#H1F' });
  });

  it('reports a non-ASCII line as malformed and consumes it so the stream resyncs (common practice)', () => {
    const framed = frameReply(Uint8Array.from([0xfe, 0x41, 0x0a, ...bytes('OK\n')]));
    expect(framed).toMatchObject({ kind: 'malformed', consumed: 3 });
  });

  it('reports a block not followed by a terminator as malformed', () => {
    const framed = frameReply(Uint8Array.from([...encodeBlock(Uint8Array.from([1, 2])), 0x41]));
    expect(framed.kind).toBe('malformed');
  });
});

describe('frameResponseUnits (one response message, several units)', () => {
  // Units separated by ';', one terminator at the end: IEEE 488.2 §8.4.1/§8.4.2 (recalled from memory).
  const data1 = Uint8Array.from([0x3b, 0x0a, 0x0d, 0x23, 0x31, 0x00]); // ';', LF, CR, '#', '1', 0: look like separators
  const data2 = Uint8Array.from([0xff, 0x0a]);
  const message = Uint8Array.from([...bytes('2000,+1.0E-05;'), ...encodeBlock(data1), 0x3b, ...bytes('"a;b",3;'), ...encodeBlock(data2), 0x0a]);

  it('splits text and blocks at ";" outside blocks and quoted strings', () => {
    const framed = frameResponseUnits(Uint8Array.from([...message, ...bytes('next\n')]));
    expect(framed.kind).toBe('units');
    if (framed.kind !== 'units') return;
    expect(framed.consumed).toBe(message.length);
    expect(framed.units.map((u) => u.kind)).toEqual(['text', 'block', 'text', 'block']);
    expect(framed.units[0]).toEqual({ kind: 'text', text: '2000,+1.0E-05' });
    expect(framed.units[2]).toEqual({ kind: 'text', text: '"a;b",3' });
    expect([...(framed.units[1] as { bytes: Uint8Array }).bytes]).toEqual([...data1]);
    expect([...(framed.units[3] as { bytes: Uint8Array }).bytes]).toEqual([...data2]);
  });

  it('waits for the whole message at every cut point', () => {
    for (let cut = 0; cut < message.length; cut++) expect(frameResponseUnits(message.subarray(0, cut))).toEqual({ kind: 'incomplete' });
  });

  it('takes a single text unit with CR LF as one unit', () => {
    expect(frameResponseUnits(bytes('1\r\n'))).toEqual({ kind: 'units', units: [{ kind: 'text', text: '1' }], consumed: 3 });
  });

  it('calls a block followed by neither ";" nor a terminator malformed, and non-ASCII text too', () => {
    expect(frameResponseUnits(Uint8Array.from([...encodeBlock(data2), 0x41, 0x0a])).kind).toBe('malformed');
    expect(frameResponseUnits(Uint8Array.from([0x31, 0xfe, 0x3b, 0x0a])).kind).toBe('malformed');
  });
});
