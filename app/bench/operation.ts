/**
 * Runs one profile operation: fills its templates and sends them in order.
 * The reply of a query operation is its last command's reply. With the
 * profile's checkErrors, setting operations read the error queue afterwards
 * so a rejected command surfaces as ScpiInstrumentError naming it.
 */
import type { ScpiSession } from '../scpi/session';
import type { Profile } from './profile';
import { ProfileError } from './errors';
import { fillTemplate } from './template';

export class OperationRunner {
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

  /** A setting: sends every command, then checks the error queue. */
  async set(name: string, values: Record<string, number> = {}): Promise<void> {
    const commands = this.commands(name, values);
    for (const command of commands) await this.session.write(command);
    if (this.profile.checkErrors) await this.session.throwIfErrors(commands.join('; '));
  }

  /** A query with a text reply. */
  async queryText(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<string> {
    const commands = this.commands(name, values);
    for (const command of commands.slice(0, -1)) await this.session.write(command);
    const reply = await this.session.query(commands[commands.length - 1], { timeoutS: timeoutS ?? this.profile.timeoutS });
    return reply;
  }

  /** A query with a block reply. */
  async queryBlock(name: string, values: Record<string, number> = {}, timeoutS?: number): Promise<Uint8Array> {
    const commands = this.commands(name, values);
    for (const command of commands.slice(0, -1)) await this.session.write(command);
    return this.session.queryBlock(commands[commands.length - 1], { timeoutS: timeoutS ?? this.profile.timeoutS });
  }

  /** The command text an operation would send (for messages). */
  describe(name: string, values: Record<string, number> = {}): string {
    return this.commands(name, values).join('; ');
  }
}
