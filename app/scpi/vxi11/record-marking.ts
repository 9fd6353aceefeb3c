/**
 * ONC RPC over TCP, record marking (RFC 5531 §11, recalled from memory): a
 * record is sent as one or more fragments, each behind a four-byte big-endian
 * header whose top bit marks the last fragment and whose low 31 bits give the
 * fragment's length.
 */

const LAST_FRAGMENT = 0x8000_0000;
/** A record larger than this is refused rather than buffered (a stray peer must not exhaust memory). */
export const MAX_RECORD_BYTES = 64 * 1024 * 1024;

/** One record as a single last fragment. */
export function encodeRecord(record: Uint8Array): Uint8Array {
  const out = new Uint8Array(record.length + 4);
  new DataView(out.buffer).setUint32(0, (LAST_FRAGMENT | record.length) >>> 0, false);
  out.set(record, 4);
  return out;
}

export class RecordTooLargeError extends Error {}

/** Reassembles records from TCP bytes as they arrive, whatever the fragment and segment boundaries. */
export class RecordAssembler {
  private input: Uint8Array = new Uint8Array(0);
  private fragments: Uint8Array[] = [];
  private recordBytes = 0;

  constructor(private readonly onRecord: (record: Uint8Array) => void) {}

  push(bytes: Uint8Array): void {
    this.input = this.input.length === 0 ? bytes.slice() : concat([this.input, bytes]);
    for (;;) {
      if (this.input.length < 4) return;
      const header = new DataView(this.input.buffer, this.input.byteOffset, 4).getUint32(0, false);
      const length = header & ~LAST_FRAGMENT;
      if (this.recordBytes + length > MAX_RECORD_BYTES) throw new RecordTooLargeError(`RPC record over ${MAX_RECORD_BYTES} bytes`);
      if (this.input.length < 4 + length) return;
      this.fragments.push(this.input.slice(4, 4 + length));
      this.recordBytes += length;
      this.input = this.input.slice(4 + length);
      if ((header & LAST_FRAGMENT) !== 0) {
        const record = concat(this.fragments);
        this.fragments = [];
        this.recordBytes = 0;
        this.onRecord(record);
      }
    }
  }
}

export function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((sum, p) => sum + p.length, 0));
  let at = 0;
  for (const part of parts) {
    out.set(part, at);
    at += part.length;
  }
  return out;
}
