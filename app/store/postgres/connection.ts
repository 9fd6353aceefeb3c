/**
 * A PostgreSQL database address as the user gives it with --db or ROLLOFF_DB
 * (postgres://user@host:port/dbname, or postgresql://…), turned into what the
 * pg client needs. Credentials come from the address, the standard PG*
 * environment variables (PGUSER, PGPASSWORD, PGHOST, …) or a password file
 * (~/.pgpass or PGPASSFILE), all read by the pg client itself; a password is
 * never part of a message, a record or a log: every shown address goes through
 * redactDatabaseUrl.
 */
import { createRequire } from 'node:module';
import { userInfo } from 'node:os';
import type { PoolConfig } from 'pg';
import { parseIntoClientConfig } from 'pg-connection-string';
import { StoreUnavailableError, StoreUnreachableError } from '../errors';

/** pgpass (node-postgres' own reader of the PostgreSQL password file format) ships no types. */
type PasswordFileLookup = (connection: { host: string; port: number; database: string; user: string }, found: (password: string | undefined) => void) => void;
const lookUpPasswordFile = createRequire(import.meta.url)('pgpass') as PasswordFileLookup;

export const POSTGRES_SCHEMES: readonly string[] = ['postgres', 'postgresql'];

/** The address with any password removed (user, host, port, database and options kept). */
export function redactDatabaseUrl(location: string): string {
  try {
    const url = new URL(location);
    if (url.password) url.password = '';
    return url.toString().replace(/^(\w+:\/\/[^:@/]*):@/, '$1@');
  } catch {
    // Not parseable: hide everything between "//" and "@", where a password would be.
    return location.replace(/\/\/[^@/]*@/, '//…@');
  }
}

/** Checks the address and gives the pool settings for it. */
export function poolConfigFor(location: string, applicationName: string): PoolConfig {
  let url: URL;
  try {
    url = new URL(location);
  } catch {
    throw new StoreUnavailableError(
      redactDatabaseUrl(location),
      'is not a valid PostgreSQL address',
      'Write it as postgres://USER@HOST:PORT/DATABASE, e.g. postgres://rolloff@127.0.0.1:5432/lab (the password belongs in ~/.pgpass or PGPASSWORD).',
    );
  }
  if (!POSTGRES_SCHEMES.includes(url.protocol.replace(/:$/, ''))) {
    throw new StoreUnavailableError(redactDatabaseUrl(location), 'is not a postgres:// or postgresql:// address', 'Write it as postgres://USER@HOST:PORT/DATABASE.');
  }
  const parsed = parseIntoClientConfig(location);
  const env = process.env;
  const user = parsed.user || env.PGUSER || userInfo().username;
  // The lookup key libpq uses for ~/.pgpass: the address's values, else PG* variables, else libpq's defaults.
  const lookup = {
    host: parsed.host || env.PGHOST || 'localhost',
    port: Number(parsed.port || env.PGPORT || 5432),
    database: parsed.database || env.PGDATABASE || user,
    user,
  };
  const password = parsed.password || env.PGPASSWORD || (() => new Promise<string>((resolve) => lookUpPasswordFile(lookup, (found) => resolve(found ?? ''))));
  return {
    ...parsed,
    ...lookup,
    password,
    application_name: applicationName,
    // Durable commit on whatever the server's default: a point is on the server's disk when insertPoint resolves.
    options: '-c synchronous_commit=on -c TimeZone=UTC',
    max: 4,
    connectionTimeoutMillis: 10_000,
    idleTimeoutMillis: 30_000,
  };
}

/** PostgreSQL's SQLSTATE of a server error (https://www.postgresql.org/docs/current/errcodes-appendix.html). */
export function sqlState(error: unknown): string | undefined {
  const code = (error as { code?: unknown } | null)?.code;
  return typeof code === 'string' && /^[0-9A-Z]{5}$/.test(code) ? code : undefined;
}

/** Network-level failures (server down, unreachable, connection cut), as Node names them. */
const NETWORK_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EHOSTUNREACH', 'ENETUNREACH', 'ENOTFOUND', 'EAI_AGAIN', 'EPIPE']);

/** True when the failure means "the server cannot be reached now" (worth retrying later), not "the request was wrong". */
export function isUnreachable(error: unknown): boolean {
  const code = (error as { code?: unknown } | null)?.code;
  if (typeof code === 'string' && NETWORK_CODES.has(code)) return true;
  const state = sqlState(error);
  // 08xxx connection exceptions, 57P01-57P03 admin shutdown / crash shutdown / cannot connect now
  if (state && (state.startsWith('08') || state === '57P01' || state === '57P02' || state === '57P03')) return true;
  const message = error instanceof Error ? error.message : '';
  return /Connection terminated|connection timeout|timeout exceeded when trying to connect|Client has encountered a connection error/i.test(message);
}

/** A failure to connect, said plainly, with what to check; the password never appears. */
export function connectionFailure(shownLocation: string, error: unknown): StoreUnavailableError {
  const state = sqlState(error);
  const detail = error instanceof Error ? error.message : String(error);
  if (state === '28P01' || state === '28000') {
    return new StoreUnavailableError(
      shownLocation,
      `the server refused the login (${detail})`,
      'Check the user name in the address and the password in ~/.pgpass, PGPASSFILE or PGPASSWORD; ask the lab store\'s administrator if the role exists.',
    );
  }
  if (state === '3D000') {
    return new StoreUnavailableError(shownLocation, `the database does not exist (${detail})`, 'Create it first (see "Lab store" in README.md): createdb -O ROLE DATABASE.');
  }
  if (isUnreachable(error)) {
    return new StoreUnreachableError(
      shownLocation,
      `the PostgreSQL server cannot be reached (${detail})`,
      'Check that the server runs and accepts connections at this host and port (pg_isready -h HOST -p PORT), or use a local SQLite file with --db FILE.sqlite.',
    );
  }
  return new StoreUnavailableError(shownLocation, `cannot be opened: ${detail}`, 'Check the address, the server log, and the role\'s rights on the database.');
}
