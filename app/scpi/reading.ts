/**
 * Numeric replies (IEEE 488.2 NR1/NR2/NR3) as readings. SCPI reserves 9.9E37
 * for "infinity" (overrange; −9.9E37 for negative infinity) and 9.91E37 for
 * not-a-number — SCPI-1999 Vol. 1, §7.2.1.4 and §7.2.1.5 (clause numbers
 * recalled from memory). Those are flags, never measurement values: a reading
 * that is not 'ok' carries value NaN so it cannot be plotted or averaged by mistake.
 */
import { ScpiMalformedReplyError } from './errors';

export type ReadingFlag = 'ok' | 'overrange' | 'nan';

export interface Reading {
  value: number;
  flag: ReadingFlag;
}

/** SCPI-1999 reserved values (see file comment). */
export const SCPI_INFINITY = 9.9e37;
export const SCPI_NOT_A_NUMBER = 9.91e37;

/** NR1 (integer), NR2 (fixed point), NR3 (exponent) per IEEE 488.2 §8.7.2–8.7.4 (recalled from memory). */
export const DECIMAL_NUMERIC = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** Parses one numeric reply into a Reading; `command` names the query in errors. */
export function parseReading(text: string, command: string): Reading {
  const trimmed = text.trim();
  if (!DECIMAL_NUMERIC.test(trimmed)) {
    throw new ScpiMalformedReplyError(command, text, 'a decimal number (NR1, NR2 or NR3)');
  }
  const value = Number(trimmed);
  return classifyNumber(value);
}

/** Classifies an already-parsed number against the SCPI reserved values. */
export function classifyNumber(value: number): Reading {
  const magnitude = Math.abs(value);
  // Relative tolerance: instruments print these with varying digit counts (9.91E+37, 9.910000E37).
  if (Math.abs(magnitude - SCPI_NOT_A_NUMBER) <= SCPI_NOT_A_NUMBER * 1e-4) return { value: Number.NaN, flag: 'nan' };
  if (Math.abs(magnitude - SCPI_INFINITY) <= SCPI_INFINITY * 1e-4 || !Number.isFinite(value)) return { value: Number.NaN, flag: 'overrange' };
  return { value, flag: 'ok' };
}

/** Parses a comma-separated list of numbers (e.g. a preamble). */
export function parseNumberList(text: string, command: string): number[] {
  const parts = text.trim().split(',');
  return parts.map((part) => {
    const trimmed = part.trim();
    if (!DECIMAL_NUMERIC.test(trimmed)) throw new ScpiMalformedReplyError(command, text, 'a comma-separated list of decimal numbers');
    return Number(trimmed);
  });
}
