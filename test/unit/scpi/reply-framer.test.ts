/**
 * Reply framing. Sources: IEEE 488.2 §8.5 (response message terminator NL;
 * CR LF accepted as common practice on serial links), §8.7.9 (definite-length
 * arbitrary block `#<n><len><bytes>`) — clause numbers recalled from memory.
 */
import { describe, expect, it } from 'vitest';
import { encodeBlock, frameReply } from '../../../app/scpi';

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
