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

export class OperationRunner {
  /** Settings collected since the last flush, in order. */
  private unsent: string[] = [];

  constructor(
    private readonly session: ScpiSession,
    private readonly profile: Profile,
  ) {}

  has(name: string): boolean {
    return this.profile.operations[name] !== undefined;
  }

  private commands(name: string, values: Record<string, number>): string[] {
    const templates = this.profile.operations[name];
    if (!templates) throw new ProfileError(this.profile.source, `operations.${name}`, 'is missing');
    return templates.map((template) => fillTemplate(template, values));
  }

  /** A setting: its commands go out, with the error check, at the next flush or query. */
  async set(name: string, values: Record<string, number> = {}): Promise<void> {
    this.unsent.push(...this.commands(name, values));
  }

  /** Sends the collected settings as one message and, under checkErrors, reads the error queue in the same exchange; throws the first error. */
  async flush(): Promise<void> {
    if (this.unsent.length === 0) return;
    const commands = this.unsent;
    this.unsent = [];
    const message = commands.map(rooted).join(';');
    if (!this.profile.checkErrors) {
      const done = await this.session.query(`${message};*OPC?`);
      if (done.trim() !== '1') throw new ScpiMalformedReplyError(`${message};*OPC?`, done, 'the operation-complete reply 1');
      return;
    }
    const reply = await this.session.query(`${message};${ERROR_QUERY}`);
    const first = parseErrorEntry(reply, ERROR_QUERY);
    if (first.code === 0) return;
    await this.session.drainErrors().catch(() => undefined); // the rest of the queue belongs to the same batch
    throw new ScpiInstrumentError(first.code, first.message, commands.join('; '), this.session.link);
  }

  /** A query with a text reply. */
  async queryText(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<string> {
    await this.flush();
    return this.session.query(this.queryMessage(name, values), { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /**
   * A setting operation followed by `query` (e.g. `*OPC?`) in one program message, as one write: the
   * query's reply says when the instrument has done what the commands started. Returns that reply.
   */
  async setThenQuery(name: string, query: string, values: Record<string, number> = {}, timeoutS?: number): Promise<string> {
    await this.flush();
    const message = [...this.commands(name, values), query].map(rooted).join(';');
    return this.session.query(message, { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** A query with a block reply. */
  async queryBlock(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<Uint8Array> {
    await this.flush();
    return this.session.queryBlock(this.queryMessage(name, values), { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** A query whose one response message holds several units (text or block), e.g. `A?;B?`. */
  async queryUnits(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<ResponseUnit[]> {
    await this.flush();
    return this.session.queryUnits(this.queryMessage(name, values), { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /**
   * A query operation's commands as one program message (e.g. `:INITiate;*OPC?`): one write, so the
   * instrument gets the query together with the commands before it rather than a write turn later.
   * A single command goes out as written.
   */
  private queryMessage(name: string, values: Record<string, number>): string {
    const commands = this.commands(name, values);
    return commands.length === 1 ? commands[0] : commands.map(rooted).join(';');
  }

  /** The command text an operation would send (for messages). */
  describe(name: string, values: Record<string, number> = {}): string {
    return this.commands(name, values).join('; ');
  }
}

const ERROR_QUERY = ':SYSTem:ERRor?';

/** A command whose first header starts at the root: ':' added unless it has one or is a common (*) command. */
function rooted(command: string): string {
  const trimmed = command.trimStart();
  return trimmed.startsWith(':') || trimmed.startsWith('*') ? trimmed : `:${trimmed}`;
}
