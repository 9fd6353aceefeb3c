/**
 * Faults the simulated bench can inject, per instrument, to exercise the
 * recovery paths of the session and the sweep runner:
 * - drop-link: the link closes now (TCP sockets reset, the PTY pair torn down
 *   and remade at the same path); one-shot, reconnecting works afterwards;
 * - garbage: replies replaced by random bytes (with `probability`, default 1);
 * - slow: every reply delayed by `delayS` more (wall-clock seconds);
 * - no-reply: queries get no reply (with `probability`, default 1);
 * - hang: the instrument stops processing commands until the fault is cleared
 *   (a command that never completes);
 * - overrange / nan: meter measurements read 9.9E37 / 9.91E37, scope samples sit at the converter's limit;
 * - refuse: commands with one header (e.g. SOURce:VOLTage) are refused with
 *   -222 "Data out of range" and not applied, the rest are taken — an
 *   instrument that refuses part of a settings message;
 * - unknown-headers: the listed headers (SCPI pattern form, e.g. "INPut#[:STATe]", "TRACe:SCALing?") are not
 *   understood: each queues −113 "Undefined header", as an instrument without that command does;
 * - no-joined-messages: a program message of several units (joined by ';') is refused whole with −100
 *   "Command error", as an instrument that takes one command per message does.
 */
import { ValidationError } from '../errors';

export type SimFault =
  | { kind: 'drop-link' }
  | { kind: 'garbage'; probability?: number }
  | { kind: 'slow'; delayS: number }
  | { kind: 'no-reply'; probability?: number }
  | { kind: 'hang' }
  | { kind: 'overrange' }
  | { kind: 'nan' }
  | { kind: 'refuse'; header: string }
  | { kind: 'unknown-headers'; headers: string[] }
  | { kind: 'no-joined-messages' };

export const FAULT_KINDS = ['drop-link', 'garbage', 'slow', 'no-reply', 'hang', 'overrange', 'nan', 'refuse', 'unknown-headers', 'no-joined-messages'] as const;

/**
 * Parses the CLI form: "KIND", "KIND:VALUE" (probability or delay), "refuse:HEADER" or
 * "unknown-headers:HEADER,HEADER" (SCPI patterns, which contain ':' themselves), optionally "ROLE=" first.
 */
export function parseFaultSpec(text: string): { role: 'generator' | 'meter' | 'scope' | 'all'; fault: SimFault } {
  const where = `--fault ${text}`;
  let rest = text.trim();
  let role: 'generator' | 'meter' | 'scope' | 'all' = 'all';
  const roleMatch = /^(generator|meter|scope|all)=(.*)$/.exec(rest);
  if (roleMatch) {
    role = roleMatch[1] as typeof role;
    rest = roleMatch[2];
  }
  if (rest.startsWith('refuse:')) {
    const header = rest.slice('refuse:'.length).trim();
    if (!/^[A-Za-z*:\[\]#]+$/.test(header)) throw new ValidationError(where, `"${header}" is not a command header`, 'Give the header to refuse, e.g. generator=refuse:SOURce:VOLTage.');
    return { role, fault: { kind: 'refuse', header } };
  }
  if (rest.startsWith('unknown-headers:')) {
    const headers = rest.slice('unknown-headers:'.length).split(',').map((h) => h.trim()).filter((h) => h !== '');
    if (headers.length === 0) throw new ValidationError(where, 'unknown-headers needs the headers to refuse, e.g. unknown-headers:INPut#[:STATe],TRACe:SCALing?');
    return { role, fault: { kind: 'unknown-headers', headers } };
  }
  const [kind, valueText] = rest.split(':');
  const value = valueText === undefined ? undefined : Number(valueText);
  if (valueText !== undefined && !Number.isFinite(value)) throw new ValidationError(where, `"${valueText}" is not a number`);
  const probability = (): number | undefined => {
    if (value !== undefined && !(value >= 0 && value <= 1)) throw new ValidationError(where, 'probability must be between 0 and 1');
    return value;
  };
  switch (kind) {
    case 'drop-link':
    case 'hang':
    case 'overrange':
    case 'nan':
    case 'no-joined-messages':
      return { role, fault: { kind } };
    case 'garbage':
    case 'no-reply':
      return { role, fault: { kind, probability: probability() } };
    case 'slow':
      if (value === undefined || !(value >= 0)) throw new ValidationError(where, 'slow needs a delay in seconds, e.g. slow:0.5');
      return { role, fault: { kind, delayS: value } };
    default:
      throw new ValidationError(where, `unknown fault "${kind}"`, `Faults: ${FAULT_KINDS.join(', ')}; optionally ROLE=KIND[:VALUE], e.g. meter=garbage:0.1, generator=refuse:SOURce:VOLTage or scope=unknown-headers:INPut#[:STATe],TRACe:SCALing?.`);
  }
}

/** The live fault of one instrument, with a way to wait while it hangs. */
export class FaultState {
  private fault: SimFault | undefined;
  private releaseHang: (() => void) | undefined;
  private hangReleased: Promise<void> = Promise.resolve();

  get current(): SimFault | undefined {
    return this.fault;
  }

  set(fault: SimFault | undefined): void {
    const wasHung = this.fault?.kind === 'hang';
    this.fault = fault;
    if (fault?.kind === 'hang' && !wasHung) {
      this.hangReleased = new Promise((resolve) => {
        this.releaseHang = resolve;
      });
    } else if (wasHung && fault?.kind !== 'hang') {
      this.releaseHang?.();
    }
  }

  /** Resolves at once unless the instrument hangs; then when the hang is cleared. */
  whileHung(): Promise<void> {
    return this.fault?.kind === 'hang' ? this.hangReleased : Promise.resolve();
  }
}
