/**
 * Definite-length arbitrary block data, IEEE 488.2 §8.7.9:
 * `#` <one digit n, 1–9> <n digits giving the byte count> <the bytes>.
 * The bytes are binary and may contain LF or CR, so replies are framed by the
 * count, never by searching for a terminator inside the block.
 */

/** Encodes bytes as a definite-length block (no terminator). */
export function encodeBlock(bytes: Uint8Array): Uint8Array {
  const length = String(bytes.length);
  if (length.length > 9) throw new RangeError('block too large for a definite-length header');
  const header = new TextEncoder().encode(`#${length.length}${length}`);
  const out = new Uint8Array(header.length + bytes.length);
  out.set(header, 0);
  out.set(bytes, header.length);
  return out;
}
