/**
 * XDR, the External Data Representation (RFC 4506): every item is a multiple
 * of four bytes, big-endian. Only the types ONC RPC, the portmapper and
 * VXI-11 use: int/unsigned int (§4.1, §4.2), bool (§4.4), variable-length
 * opaque (§4.10) and string (§4.11), both padded with zeros to four bytes.
 * Section numbers recalled from memory.
 */

const latin1 = new TextDecoder('latin1');

export class XdrWriter {
  private bytes = new Uint8Array(64);
  private view = new DataView(this.bytes.buffer);
  private length = 0;

  int(value: number): this {
    this.reserve(4);
    this.view.setInt32(this.length, value, false);
    this.length += 4;
    return this;
  }

  uint(value: number): this {
    this.reserve(4);
    this.view.setUint32(this.length, value >>> 0, false);
    this.length += 4;
    return this;
  }

  bool(value: boolean): this {
    return this.uint(value ? 1 : 0);
  }

  /** Variable-length opaque: length, the bytes, zero padding to a multiple of four. */
  opaque(data: Uint8Array): this {
    this.uint(data.length);
    const padded = (data.length + 3) & ~3;
    this.reserve(padded);
    this.bytes.set(data, this.length);
    this.bytes.fill(0, this.length + data.length, this.length + padded);
    this.length += padded;
    return this;
  }

  /** An ASCII string (device names, machine names), as opaque bytes. */
  string(text: string): this {
    const data = new Uint8Array(text.length);
    for (let i = 0; i < text.length; i++) data[i] = text.charCodeAt(i) & 0xff;
    return this.opaque(data);
  }

  /** Already-encoded XDR items appended as they are. */
  raw(data: Uint8Array): this {
    this.reserve(data.length);
    this.bytes.set(data, this.length);
    this.length += data.length;
    return this;
  }

  finish(): Uint8Array {
    return this.bytes.slice(0, this.length);
  }

  private reserve(count: number): void {
    if (this.length + count <= this.bytes.length) return;
    let size = this.bytes.length * 2;
    while (size < this.length + count) size *= 2;
    const grown = new Uint8Array(size);
    grown.set(this.bytes.subarray(0, this.length));
    this.bytes = grown;
    this.view = new DataView(grown.buffer);
  }
}

/** Thrown when a message ends before its items do, or an item is out of range. */
export class XdrDecodeError extends Error {}

export class XdrReader {
  private at = 0;
  private readonly view: DataView;

  constructor(private readonly bytes: Uint8Array) {
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }

  get remaining(): number {
    return this.bytes.length - this.at;
  }

  int(): number {
    this.need(4);
    const value = this.view.getInt32(this.at, false);
    this.at += 4;
    return value;
  }

  uint(): number {
    this.need(4);
    const value = this.view.getUint32(this.at, false);
    this.at += 4;
    return value;
  }

  bool(): boolean {
    const value = this.uint();
    if (value > 1) throw new XdrDecodeError(`boolean item holds ${value}, not 0 or 1`);
    return value === 1;
  }

  opaque(maxLength = Number.MAX_SAFE_INTEGER): Uint8Array {
    const length = this.uint();
    if (length > maxLength) throw new XdrDecodeError(`opaque item of ${length} bytes exceeds the limit of ${maxLength}`);
    const padded = (length + 3) & ~3;
    this.need(padded);
    const data = this.bytes.slice(this.at, this.at + length);
    this.at += padded;
    return data;
  }

  string(maxLength?: number): string {
    return latin1.decode(this.opaque(maxLength));
  }

  /** Whatever follows, undecoded (procedure results handed on to their decoder). */
  rest(): Uint8Array {
    const data = this.bytes.subarray(this.at);
    this.at = this.bytes.length;
    return data;
  }

  private need(count: number): void {
    if (this.at + count > this.bytes.length) throw new XdrDecodeError(`message ends ${this.at + count - this.bytes.length} bytes early`);
  }
}
