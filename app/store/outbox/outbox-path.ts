/**
 * Where a bench keeps the outbox of a server store: one file per database
 * (its run ids mean nothing elsewhere), in ROLLOFF_OUTBOX_DIR if set, else in
 * the "outbox" folder of the user data folder, beside the default SQLite file.
 */
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { userDataFolder } from '../paths';

export const OUTBOX_DIR_ENV = 'ROLLOFF_OUTBOX_DIR';

/** `shownLocation` is the address without its password (what the store shows as its location). */
export function outboxPathFor(shownLocation: string, env: Record<string, string | undefined> = process.env): string {
  const folder = env[OUTBOX_DIR_ENV] || join(userDataFolder(), 'outbox');
  const readable = shownLocation.replace(/^[a-z]+:\/\//i, '').replace(/[^A-Za-z0-9@._-]+/g, '_').slice(0, 80);
  const digest = createHash('sha256').update(shownLocation).digest('hex').slice(0, 12);
  return join(folder, `${readable}-${digest}.sqlite`);
}
