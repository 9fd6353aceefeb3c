/**
 * The VXI-11 wire format below the transport: XDR items (RFC 4506), record
 * marking (RFC 5531 §11), RPC call/reply headers (RFC 5531 §9) and the
 * mapping of VXI-11 error codes (§B.5.2) to the session's named errors.
 * Expected bytes are written out from the RFCs' definitions, not produced by
 * the code under test.
 */
import { describe, expect, it } from 'vitest';
import { ScpiDisconnectedError, ScpiLinkError, ScpiLockedError, ScpiTimeoutError } from '../../../app/scpi';
import { XdrReader, XdrWriter, XdrDecodeError } from '../../../app/scpi/vxi11/xdr';
import { RecordAssembler, encodeRecord } from '../../../app/scpi/vxi11/record-marking';
import { AcceptStat, decodeCall, decodeReply, encodeAcceptedReply, encodeCall } from '../../../app/scpi/vxi11/rpc-message';
import { vxi11Failure } from '../../../app/scpi/vxi11/vxi11-errors';

describe('XDR (RFC 4506)', () => {
  it('writes big-endian four-byte integers and zero-pads opaque data and strings to four bytes (§4.1, §4.10, §4.11)', () => {
    const bytes = new XdrWriter().int(-2).uint(0x0607af).bool(true).string('inst0').finish();
    expect(Array.from(bytes)).toEqual([0xff, 0xff, 0xff, 0xfe, 0, 0x06, 0x07, 0xaf, 0, 0, 0, 1, 0, 0, 0, 5, 0x69, 0x6e, 0x73, 0x74, 0x30, 0, 0, 0]);
    const reader = new XdrReader(bytes);
    expect([reader.int(), reader.uint(), reader.bool(), reader.string()]).toEqual([-2, 0x0607af, true, 'inst0']);
    expect(reader.remaining).toBe(0);
  });

  it('refuses a message that ends early and an opaque item over its limit', () => {
    expect(() => new XdrReader(Uint8Array.of(0, 0, 0, 8, 1, 2)).opaque()).toThrow(XdrDecodeError);
    expect(() => new XdrReader(new XdrWriter().string('a long device name').finish()).string(4)).toThrow(/exceeds/);
  });
});

describe('record marking (RFC 5531 §11)', () => {
  it('sends a record as one last fragment: top bit set, 31-bit length', () => {
    expect(Array.from(encodeRecord(Uint8Array.of(1, 2, 3)))).toEqual([0x80, 0, 0, 3, 1, 2, 3]);
  });

  it('reassembles a record sent in several fragments, split at any byte', () => {
    const records: number[][] = [];
    const assembler = new RecordAssembler((r) => records.push(Array.from(r)));
    // fragment 1 (not last): 2 bytes; fragment 2 (last): 3 bytes; then a second record of 1 byte.
    const stream = [0, 0, 0, 2, 10, 11, 0x80, 0, 0, 3, 12, 13, 14, 0x80, 0, 0, 1, 99];
    for (const byte of stream) assembler.push(Uint8Array.of(byte));
    expect(records).toEqual([[10, 11, 12, 13, 14], [99]]);
  });
});

describe('ONC RPC messages (RFC 5531 §9)', () => {
  it('a call carries xid, CALL, RPC version 2, program, version, procedure and AUTH_NONE credential and verifier', () => {
    const bytes = encodeCall({ xid: 7, program: 100000, version: 2, procedure: 3, args: Uint8Array.of(0, 0, 0, 9) });
    const words = Array.from({ length: bytes.length / 4 }, (_, i) => new DataView(bytes.buffer).getUint32(4 * i));
    expect(words).toEqual([7, 0, 2, 100000, 2, 3, 0, 0, 0, 0, 9]);
    expect(decodeCall(bytes)).toEqual({ call: { xid: 7, program: 100000, version: 2, procedure: 3, args: Uint8Array.of(0, 0, 0, 9) } });
  });

  it('an accepted reply with PROG_MISMATCH carries the versions served', () => {
    const reply = decodeReply(encodeAcceptedReply(9, AcceptStat.programMismatch, undefined, { low: 1, high: 1 }));
    expect(reply).toMatchObject({ xid: 9, status: 'accepted', acceptStat: AcceptStat.programMismatch, versionLow: 1, versionHigh: 1 });
  });
});

describe('VXI-11 error codes as named errors (§B.5.2, recalled from memory)', () => {
  const context = { link: 'vxi-11 127.0.0.1 inst0', operation: 'device_read', command: '*IDN?', ioTimeoutS: 2, lockTimeoutS: 1 };
  it.each([
    [15, ScpiTimeoutError],
    [11, ScpiLockedError],
    [4, ScpiDisconnectedError],
    [17, ScpiDisconnectedError],
    [23, ScpiLinkError],
    [8, ScpiLinkError],
  ])('code %i is a %o', (code, type) => {
    expect(vxi11Failure(code, context)).toBeInstanceOf(type);
  });

  it('keeps the code and its meaning where no named error fits', () => {
    const error = vxi11Failure(8, context) as ScpiLinkError;
    expect(error.code).toBe(8);
    expect(error.message).toMatch(/operation not supported/);
  });
});
