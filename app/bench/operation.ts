/**
 * Runs one profile operation: fills its templates and sends them in order.
 * The reply of a query operation is its last command's reply.
 *
 * Error checking (profile checkErrors): settings are written without waiting,
 * and the error queue is read once before the next query, or when a control
 * method calls flush() at its end — so a rejected setting still surfaces as
 * ScpiInstrumentError naming the commands since the last check, before any
 * measurement is taken with it, at one round trip per batch instead of one
 * per command (each reply costs the link's latency).
 */
import type { ResponseUnit } from '../scpi/reply-framer';
import type { ScpiSession } from '../scpi/session';
import type { Profile } from './profile';
import { ProfileError } from './errors';
import { fillTemplate } from './template';

export class OperationRunner {
  private unchecked: string[] = [];

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

  /** A setting: sends every command; the error check follows at the next flush or query. */
  async set(name: string, values: Record<string, number> = {}): Promise<void> {
    const commands = this.commands(name, values);
    for (const command of commands) {
      await this.session.write(command);
      if (this.profile.checkErrors) this.unchecked.push(command);
    }
  }

  /** Reads the error queue if settings were sent since the last check; throws the first error. */
  async flush(): Promise<void> {
    if (this.unchecked.length === 0) return;
    const commands = this.unchecked.join('; ');
    this.unchecked = [];
    await this.session.throwIfErrors(commands);
  }

  /** A query with a text reply. */
  async queryText(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<string> {
    await this.flush();
    const commands = this.commands(name, values);
    for (const command of commands.slice(0, -1)) await this.session.write(command);
    return this.session.query(commands[commands.length - 1], { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** A query with a block reply. */
  async queryBlock(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<Uint8Array> {
    await this.flush();
    const commands = this.commands(name, values);
    for (const command of commands.slice(0, -1)) await this.session.write(command);
    return this.session.queryBlock(commands[commands.length - 1], { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** A query whose one response message holds several units (text or block), e.g. `A?;B?`. */
  async queryUnits(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<ResponseUnit[]> {
    await this.flush();
    const commands = this.commands(name, values);
    for (const command of commands.slice(0, -1)) await this.session.write(command);
    return this.session.queryUnits(commands[commands.length - 1], { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** The command text an operation would send (for messages). */
  describe(name: string, values: Record<string, number> = {}): string {
    return this.commands(name, values).join('; ');
  }
}
