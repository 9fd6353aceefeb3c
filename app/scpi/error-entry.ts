/**
 * One entry of the SCPI error queue, as returned by SYSTem:ERRor[:NEXT]?:
 * `<code>,"<message>"`, with 0,"No error" meaning the queue is empty
 * (SCPI-1999 Vol. 2 §21.8; Vol. 1 §21.8.8 lists the standard codes — clause
 * numbers recalled from memory).
 */
import { ScpiMalformedReplyError } from './errors';

export interface InstrumentErrorEntry {
  code: number;
  message: string;
}

const ENTRY = /^\s*([+-]?\d+)\s*,\s*"((?:[^"]|"")*)"\s*$/;

export function parseErrorEntry(reply: string, command = 'SYSTem:ERRor?'): InstrumentErrorEntry {
  const match = ENTRY.exec(reply);
  if (!match) throw new ScpiMalformedReplyError(command, reply, 'an error entry <code>,"<message>"');
  // Inside a string, a doubled quote stands for one quote (IEEE 488.2 string response data).
  return { code: Number(match[1]), message: match[2].replace(/""/g, '"') };
}

export function formatErrorEntry(entry: InstrumentErrorEntry): string {
  return `${entry.code},"${entry.message.replace(/"/g, '""')}"`;
}
