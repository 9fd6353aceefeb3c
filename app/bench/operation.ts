/**
 * Runs one profile operation: fills its templates and sends them in order.
 * The reply of a query operation is its last command's reply.
 *
 * Settings are collected and go out at the next flush() (a control method
 * calls it at its end) or query, as one program message — units joined by ';',
 * each header rooted with ':' so none is read relative to the one before
 * (SCPI-1999 Vol 1 §6.2, recalled from memory) — with, under profile
 * checkErrors, the first error-queue read as its last unit; without it,
 * `*OPC?` (IEEE 488.2 §10.19), so a flush always ends at a moment the
 * instrument confirmed — settling is counted from there. A rejected
 * setting surfaces as ScpiInstrumentError naming the commands of the batch,
 * before any measurement is taken with it, at one write and one round trip
 * per batch (each reply costs the link's latency, each write a turn).
 */
import { parseErrorEntry } from '../scpi/error-entry';
import { ScpiInstrumentError, ScpiMalformedReplyError } from '../scpi/errors';
import type { ResponseUnit } from '../scpi/reply-framer';
import type { ScpiSession } from '../scpi/session';
import type { Profile } from './profile';
import { ProfileError } from './errors';
import { fillTemplate } from './template';

/** One command to send, and how long to wait after it (the profile's per-command wait). */
export interface Outgoing {
  text: string;
  waitS: number;
}

export class OperationRunner {
  /** Settings collected since the last flush, in order. */
  private unsent: Outgoing[] = [];

  constructor(
    private readonly session: ScpiSession,
    private readonly profile: Profile,
  ) {}

  has(name: string): boolean {
    return this.profile.operations[name] !== undefined;
  }

  private commands(name: string, values: Record<string, number>): Outgoing[] {
    const templates = this.profile.operations[name];
    if (!templates) throw new ProfileError(this.profile.source, `operations.${name}`, 'is missing');
    const waits = this.profile.waitsS[name];
    return templates.map((template, i) => ({ text: fillTemplate(template, values), waitS: waits?.[i] ?? 0 }));
  }

  /** Drops the settings collected since the last flush (a caller that gave up before confirming them). */
  discardUnsent(): void {
    this.unsent = [];
  }

  /** A setting: its commands go out, with the error check, at the next flush or query. */
  async set(name: string, values: Record<string, number> = {}): Promise<void> {
    this.unsent.push(...this.commands(name, values));
  }

  /**
   * Sends the collected settings and, under checkErrors, reads the error queue in the same exchange (else
   * *OPC?); throws the first error. A command with a wait ends a batch: the batch is confirmed, then the
   * wait runs, then the rest goes out.
   */
  async flush(): Promise<void> {
    while (this.unsent.length > 0) {
      const cut = this.unsent.findIndex((c) => c.waitS > 0);
      const batch = cut < 0 ? this.unsent : this.unsent.slice(0, cut + 1);
      this.unsent = cut < 0 ? [] : this.unsent.slice(cut + 1);
      await this.sendConfirmed(batch.map((c) => c.text));
      const waitS = batch[batch.length - 1].waitS;
      if (waitS > 0) await sleepS(waitS);
    }
  }

  private async sendConfirmed(commands: string[]): Promise<void> {
    const confirmation = this.profile.checkErrors ? ERROR_QUERY : '*OPC?';
    const reply = await this.sendThenQuery(commands, confirmation, this.profile.timeoutS);
    const sent = [...commands, confirmation].join('; ');
    if (!this.profile.checkErrors) {
      if (reply.trim() !== '1') throw new ScpiMalformedReplyError(sent, reply, 'the operation-complete reply 1');
      return;
    }
    const first = parseErrorEntry(reply, ERROR_QUERY);
    if (first.code === 0) return;
    await this.session.drainErrors().catch(() => undefined); // the rest of the queue belongs to the same batch
    throw new ScpiInstrumentError(first.code, first.message, commands.join('; '), this.session.link);
  }

  /**
   * `commands` then `query`, by the profile's program-message policy: joined, one program message
   * (`:A;:B;Q?`) in one write; separate, a write per command and the query alone.
   */
  private async sendThenQuery(commands: string[], query: string, timeoutS: number): Promise<string> {
    if (this.profile.programMessages === 'joined') return this.session.query(programMessage([...commands, query]), { timeoutS });
    for (const command of commands) await this.session.write(command);
    return this.session.query(query, { timeoutS });
  }

  /** A query with a text reply. */
  async queryText(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<string> {
    return this.session.query(await this.queryMessage(name, values), { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /**
   * A setting operation followed by `query` (e.g. `*OPC?`), in one program message under the joined
   * policy: the query's reply says when the instrument has done what the commands started.
   */
  async setThenQuery(name: string, query: string, values: Record<string, number> = {}, timeoutS?: number): Promise<string> {
    await this.flush();
    const commands = this.commands(name, values);
    if (commands.some((c) => c.waitS > 0)) {
      await this.sendLeading([...commands, { text: query, waitS: 0 }]);
      return this.session.query(query, { timeoutS: timeoutS ?? this.profile.timeoutS });
    }
    return this.sendThenQuery(commands.map((c) => c.text), query, timeoutS ?? this.profile.timeoutS);
  }

  /** A query with a block reply. */
  async queryBlock(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<Uint8Array> {
    return this.session.queryBlock(await this.queryMessage(name, values), { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** A query whose one response message holds several units (text or block), e.g. `A?;B?`. */
  async queryUnits(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<ResponseUnit[]> {
    return this.session.queryUnits(await this.queryMessage(name, values), { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /**
   * Flushes the settings, sends a query operation's leading commands where the policy or their waits
   * say so, and returns what is left to send as the query: under the joined policy and without waits
   * the whole operation as one program message (e.g. `:SENSe:FUNCtion "VOLTage:AC";:READ?`), so the
   * instrument gets the query with the commands before it rather than a write turn later.
   */
  private async queryMessage(name: string, values: Record<string, number>): Promise<string> {
    await this.flush();
    const commands = this.commands(name, values);
    if (this.profile.programMessages === 'joined' && !commands.some((c) => c.waitS > 0)) return programMessage(commands.map((c) => c.text));
    await this.sendLeading(commands);
    return commands[commands.length - 1].text;
  }

  /** Writes all but the last command, each alone, waiting after those that ask for it. */
  private async sendLeading(commands: Outgoing[]): Promise<void> {
    for (const command of commands.slice(0, -1)) {
      await this.session.write(command.text);
      if (command.waitS > 0) await sleepS(command.waitS);
    }
  }

  /** The command text an operation would send (for messages). */
  describe(name: string, values: Record<string, number> = {}): string {
    return this.commands(name, values).map((c) => c.text).join('; ');
  }
}

/** Wall-clock wait: an instrument's own settling takes real time, whatever the bench clock's scale. */
function sleepS(seconds: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, seconds * 1000));
}

const ERROR_QUERY = ':SYSTem:ERRor?';

/**
 * For a caller outside a control (the profile checker): writes `commands` by the profile's policy, all
 * but the last when `keepLast` (a query to send by the caller), and returns the text still to send.
 */
export async function writeByPolicy(session: ScpiSession, profile: Profile, commands: string[], keepLast: boolean): Promise<string | undefined> {
  if (profile.programMessages === 'joined') {
    if (keepLast) return programMessage(commands);
    await session.write(programMessage(commands));
    return undefined;
  }
  for (const command of keepLast ? commands.slice(0, -1) : commands) await session.write(command);
  return keepLast ? commands[commands.length - 1] : undefined;
}

/** Several commands as one program message: units joined by ';', each header rooted. */
export function programMessage(commands: readonly string[]): string {
  return commands.length === 1 ? commands[0] : commands.map(rooted).join(';');
}

/** A command whose first header starts at the root: ':' added unless it has one or is a common (*) command. */
function rooted(command: string): string {
  const trimmed = command.trimStart();
  return trimmed.startsWith(':') || trimmed.startsWith('*') ? trimmed : `:${trimmed}`;
}
