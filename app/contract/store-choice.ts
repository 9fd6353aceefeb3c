/**
 * The store the window works on, as the window shows it and chooses another
 * (storeInUse, chooseStore): a SQLite file path or a PostgreSQL address.
 *
 * A password typed into an address is refused here, at the boundary, so it is
 * never shown back, saved in a settings file or logged: the lab store's
 * password belongs in PGPASSWORD or a password file, which the store reads
 * itself (app/store/postgres/connection.ts).
 */
import * as v from 'valibot';
import { oneOf, shortText, withHint } from './field-schemas';
import { absentOr, listOf, replyObject, replyText } from './reply-fields';

/**
 * Where the store in use was named: --db, ROLLOFF_DB, the desktop window's
 * saved setting, nowhere (the default file), or in the window of a host that
 * keeps the choice until it stops (rolloff serve).
 */
export const DATABASE_SOURCES = ['command line', 'environment', 'saved setting', 'default', 'chosen in the window'] as const;
export type DatabaseSource = (typeof DATABASE_SOURCES)[number];

/** scheme://user:password@… — the part between "//" and "@" holds a ":" (an empty password counts: it is refused too). */
const PASSWORD_IN_ADDRESS = /^[a-z][a-z0-9+.-]*:\/\/[^/@?#]*:[^/@?#]*@/i;

export function hasPasswordInAddress(location: string): boolean {
  return PASSWORD_IN_ADDRESS.test(location);
}

export const PASSWORD_HINT = 'Leave the password out of the address (postgres://USER@HOST:PORT/DATABASE) and give it by PGPASSWORD in the environment Rolloff starts in, or in a password file (~/.pgpass, or the file PGPASSFILE names).';

/** The chosen location, trimmed; an address with a password is refused without repeating it. */
export const StoreLocationSchema = v.pipe(
  shortText(false),
  v.transform((location) => location.trim()),
  v.check((location) => !hasPasswordInAddress(location), withHint('has a password in it, which is not accepted here (it would be shown and saved)', PASSWORD_HINT)),
);

export const StoreInUseSchema = replyObject({
  /** The file path, or the lab store's address without its password. */
  location: replyText,
  kind: oneOf(['sqlite file', 'lab store'] as const),
  source: oneOf(DATABASE_SOURCES),
  /**
   * What a choice made in the window does: `saved` for the next starts (the
   * desktop window's settings file, `settingsFile`), or `until restart`
   * (rolloff serve: the choice applies to that process until it stops).
   */
  choiceKept: oneOf(['saved', 'until restart'] as const),
  settingsFile: absentOr(replyText),
  /** Things to know, one sentence each: the settings file could not be read, or --db/ROLLOFF_DB overrides the saved setting. */
  notes: listOf(replyText),
});
export type StoreInUse = v.InferOutput<typeof StoreInUseSchema>;
