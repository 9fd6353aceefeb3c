/**
 * Splits the incoming byte stream into replies. A reply is either a line of
 * ASCII ending in LF or CR LF (IEEE 488.2 §8.5 response message terminator;
 * CR LF is common practice on serial links), or a definite-length block
 * (IEEE 488.2 §8.7.9) followed by the terminator. Blocks are framed by their
 * byte count so binary data containing LF/CR passes intact. This is why
 * replies are not framed by @serialport/parser-readline (which the simulated
 * instruments use for their ASCII command input, app/sim/link-server.ts): a
 * line parser would cut a block at its first 0x0A byte.
 */

export type FrameResult =
  | { kind: 'text'; text: string; consumed: number }
  | { kind: 'block'; bytes: Uint8Array; consumed: number }
  | { kind: 'malformed'; description: string; preview: string; consumed: number }
  | { kind: 'incomplete' };

const LF = 0x0a;
const CR = 0x0d;
const HASH = 0x23;
const DIGIT_0 = 0x30;
const DIGIT_9 = 0x39;

/** A line longer than this without a terminator is garbage, not a reply. */
export const MAX_TEXT_REPLY_BYTES = 1 << 20;

export function frameReply(buffer: Uint8Array): FrameResult {
  if (buffer.length === 0) return { kind: 'incomplete' };
  if (buffer[0] === HASH) {
    if (buffer.length < 2) return { kind: 'incomplete' };
    const digitCount = buffer[1] - DIGIT_0;
    if (digitCount >= 1 && digitCount <= 9) return frameDefiniteBlock(buffer, digitCount);
    // "#0" is the indefinite form: data up to the terminator (not binary-safe on a byte stream).
    if (digitCount === 0) return frameIndefiniteBlock(buffer);
    // Otherwise "#H1F", "#B101", "#Q17": non-decimal numerics, plain text.
  }
  return frameTextLine(buffer);
}

/** One unit of a response message: text (numbers, strings, lists) or a definite-length block. */
export type ResponseUnit = { kind: 'text'; text: string } | { kind: 'block'; bytes: Uint8Array };

export type UnitsFrameResult =
  | { kind: 'units'; units: ResponseUnit[]; consumed: number }
  | { kind: 'malformed'; description: string; preview: string; consumed: number }
  | { kind: 'incomplete' };

const SEMICOLON = 0x3b;
const QUOTE = 0x22;

/**
 * Frames one response message made of several units separated by ';' and
 * ended by the terminator (IEEE 488.2 §8.4.1 and §8.4.2, recalled from
 * memory), as a program message with several queries gets it. Each unit is a
 * definite-length block (framed by its count, so its bytes may hold ';' or LF)
 * or text up to the next ';' or terminator outside a quoted string.
 */
export function frameResponseUnits(buffer: Uint8Array): UnitsFrameResult {
  const units: ResponseUnit[] = [];
  let at = 0;
  for (;;) {
    if (at >= buffer.length) return { kind: 'incomplete' };
    let end: number;
    if (buffer[at] === HASH && at + 1 < buffer.length && buffer[at + 1] > DIGIT_0 && buffer[at + 1] <= DIGIT_9) {
      const headerEnd = at + 2 + (buffer[at + 1] - DIGIT_0);
      if (buffer.length < headerEnd) return { kind: 'incomplete' };
      const length = blockLength(buffer, at + 2, headerEnd);
      if (length === undefined) return malformedUpToLineEnd(buffer, NON_DIGIT_LENGTH);
      end = headerEnd + length;
      if (buffer.length <= end) return { kind: 'incomplete' };
      units.push({ kind: 'block', bytes: buffer.slice(headerEnd, end) });
    } else if (buffer[at] === HASH && at + 1 >= buffer.length) {
      return { kind: 'incomplete' };
    } else {
      let quoted = false;
      end = at;
      while (end < buffer.length && (quoted || (buffer[end] !== SEMICOLON && buffer[end] !== LF))) {
        const byte = buffer[end];
        if (byte === QUOTE) quoted = !quoted;
        else if ((byte < 0x20 || byte > 0x7e) && byte !== 0x09 && !(byte === CR && buffer[end + 1] === LF)) {
          return malformedUpToLineEnd(buffer, 'response units of printable ASCII or definite-length blocks');
        }
        end++;
      }
      if (end >= buffer.length) return end - at > MAX_TEXT_REPLY_BYTES ? malformedAll(buffer) : { kind: 'incomplete' };
      const textEnd = buffer[end] === LF && end > at && buffer[end - 1] === CR ? end - 1 : end;
      units.push({ kind: 'text', text: asciiText(buffer, at, textEnd) });
    }
    // After a unit: ';' and the next unit, or the terminator (LF or CR LF).
    if (buffer[end] === SEMICOLON) {
      at = end + 1;
      continue;
    }
    if (buffer[end] === LF) return { kind: 'units', units, consumed: end + 1 };
    if (buffer[end] === CR) {
      if (buffer.length < end + 2) return { kind: 'incomplete' };
      if (buffer[end + 1] === LF) return { kind: 'units', units, consumed: end + 2 };
    }
    return { kind: 'malformed', description: 'response units separated by ";" and ended by a line terminator', preview: preview(buffer.subarray(0, 40)), consumed: end };
  }
}

function frameDefiniteBlock(buffer: Uint8Array, digitCount: number): FrameResult {
  const headerEnd = 2 + digitCount;
  if (buffer.length < headerEnd) return { kind: 'incomplete' };
  const length = blockLength(buffer, 2, headerEnd);
  if (length === undefined) return malformedUpToLineEnd(buffer, NON_DIGIT_LENGTH);
  const dataEnd = headerEnd + length;
  if (buffer.length < dataEnd + 1) return { kind: 'incomplete' };
  const bytes = buffer.slice(headerEnd, dataEnd);
  if (buffer[dataEnd] === LF) return { kind: 'block', bytes, consumed: dataEnd + 1 };
  if (buffer[dataEnd] === CR) {
    if (buffer.length < dataEnd + 2) return { kind: 'incomplete' };
    if (buffer[dataEnd + 1] === LF) return { kind: 'block', bytes, consumed: dataEnd + 2 };
  }
  return { kind: 'malformed', description: `a block of ${length} bytes not followed by a line terminator`, preview: preview(buffer.subarray(0, 40)), consumed: dataEnd };
}

function frameIndefiniteBlock(buffer: Uint8Array): FrameResult {
  const end = buffer.indexOf(LF);
  if (end < 0) return buffer.length > MAX_TEXT_REPLY_BYTES ? malformedAll(buffer) : { kind: 'incomplete' };
  return { kind: 'block', bytes: buffer.slice(2, end), consumed: end + 1 };
}

function frameTextLine(buffer: Uint8Array): FrameResult {
  const end = buffer.indexOf(LF);
  if (end < 0) return buffer.length > MAX_TEXT_REPLY_BYTES ? malformedAll(buffer) : { kind: 'incomplete' };
  let textEnd = end;
  if (textEnd > 0 && buffer[textEnd - 1] === CR) textEnd--;
  for (let i = 0; i < textEnd; i++) {
    const byte = buffer[i];
    // Response data is 7-bit printable ASCII (IEEE 488.2 §8.7); anything else means a wrong baud rate or noise.
    if ((byte < 0x20 || byte > 0x7e) && byte !== 0x09) {
      return { kind: 'malformed', description: 'a line of printable ASCII', preview: preview(buffer.subarray(0, Math.min(end, 80))), consumed: end + 1 };
    }
  }
  return { kind: 'text', text: asciiText(buffer, 0, textEnd), consumed: end + 1 };
}

const NON_DIGIT_LENGTH = 'a block header with a non-digit length';

/** The byte count written in a block header's digits buffer[from, to), or undefined if one is not a digit. */
function blockLength(buffer: Uint8Array, from: number, to: number): number | undefined {
  let length = 0;
  for (let i = from; i < to; i++) {
    if (buffer[i] < DIGIT_0 || buffer[i] > DIGIT_9) return undefined;
    length = length * 10 + (buffer[i] - DIGIT_0);
  }
  return length;
}

/** buffer[from, to) as text, one character per byte (already checked to be printable ASCII). */
function asciiText(buffer: Uint8Array, from: number, to: number): string {
  let text = '';
  for (let i = from; i < to; i++) text += String.fromCharCode(buffer[i]);
  return text;
}

type Unframed = { kind: 'malformed'; description: string; preview: string; consumed: number } | { kind: 'incomplete' };

function malformedUpToLineEnd(buffer: Uint8Array, description: string): Unframed {
  const end = buffer.indexOf(LF);
  if (end < 0) return buffer.length > MAX_TEXT_REPLY_BYTES ? malformedAll(buffer) : { kind: 'incomplete' };
  return { kind: 'malformed', description, preview: preview(buffer.subarray(0, Math.min(end, 80))), consumed: end + 1 };
}

function malformedAll(buffer: Uint8Array): Unframed {
  return { kind: 'malformed', description: `a reply terminated within ${MAX_TEXT_REPLY_BYTES} bytes`, preview: preview(buffer.subarray(0, 80)), consumed: buffer.length };
}

/** Printable view of raw bytes for messages and the traffic log. */
export function preview(bytes: Uint8Array): string {
  let out = '';
  for (const byte of bytes) {
    if (byte >= 0x20 && byte <= 0x7e) out += String.fromCharCode(byte);
    else out += `\\x${byte.toString(16).padStart(2, '0')}`;
  }
  return out;
}
