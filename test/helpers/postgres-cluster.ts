/**
 * A throw-away PostgreSQL cluster for tests and benchmarks: initdb in a fresh
 * temporary folder, postgres on a free loopback port with its socket inside
 * that folder, one role and database for Rolloff, everything removed at the
 * end. Nothing on the machine is touched: no system service, no /var/run.
 *
 * PostgreSQL refuses to run as root ("initdb: cannot be run as root"), so when
 * the tests run as root every server program runs as the `postgres` user that
 * Debian's package creates, through runuser, and the folder is handed to it.
 */
import { spawnSync } from 'node:child_process';
import { chownSync, existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { requireTool } from './required-tool';

const SERVER_USER = 'postgres';
/** Debian installs each major version's programs here (postgresql-common layout). */
const DEBIAN_BIN_ROOT = '/usr/lib/postgresql';

/** The folder holding initdb, pg_ctl and postgres: PG_BINDIR, else Debian's newest version, else PATH. */
export function findPostgresBinDir(): string | undefined {
  const fromEnv = process.env.PG_BINDIR;
  if (fromEnv && existsSync(join(fromEnv, 'initdb'))) return fromEnv;
  if (existsSync(DEBIAN_BIN_ROOT)) {
    const versions = readdirSync(DEBIAN_BIN_ROOT)
      .filter((name) => /^\d+(\.\d+)?$/.test(name) && existsSync(join(DEBIAN_BIN_ROOT, name, 'bin', 'initdb')))
      .sort((a, b) => Number(b) - Number(a));
    if (versions.length > 0) return join(DEBIAN_BIN_ROOT, versions[0], 'bin');
  }
  const which = spawnSync('sh', ['-c', 'command -v initdb'], { encoding: 'utf8' });
  const initdb = which.status === 0 ? which.stdout.trim() : '';
  return initdb ? initdb.slice(0, -'/initdb'.length) : undefined;
}

/** Checks once per test file; under CI=true a missing server fails, naming the package. */
export function postgresAvailable(): boolean {
  return findPostgresBinDir() !== undefined || requireTool('initdb');
}

function isRoot(): boolean {
  return typeof process.getuid === 'function' && process.getuid() === 0;
}

function userIds(user: string): { uid: number; gid: number } {
  const uid = spawnSync('id', ['-u', user], { encoding: 'utf8' });
  const gid = spawnSync('id', ['-g', user], { encoding: 'utf8' });
  if (uid.status !== 0 || gid.status !== 0) {
    throw new Error(`running as root, PostgreSQL needs the non-root user "${user}", which does not exist. Install the Debian package postgresql, which creates it.`);
  }
  return { uid: Number(uid.stdout.trim()), gid: Number(gid.stdout.trim()) };
}

/** A free TCP port on 127.0.0.1, as the kernel hands out for port 0. */
export async function freeLoopbackPort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const address = server.address();
      const port = typeof address === 'object' && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

export interface PostgresCluster {
  readonly port: number;
  /** The Rolloff role's password (also in passwordFile, in ~/.pgpass format). */
  readonly role: string;
  readonly password: string;
  readonly database: string;
  /** postgres://role@127.0.0.1:port/database, without the password. */
  readonly url: string;
  /** The same URL with the password in it. */
  readonly urlWithPassword: string;
  /** A password file (PGPASSFILE format) for the Rolloff role. */
  readonly passwordFile: string;
  readonly folder: string;
  /** Runs SQL as the cluster's superuser (psql over the local socket); returns stdout. */
  sql(statement: string, database?: string): string;
  /** A new empty database owned by the Rolloff role; its URL without password. */
  createDatabase(name: string): string;
  /** Stops the server (immediate: like a pulled cable for the clients) and starts it again later. */
  stop(): void;
  start(): void;
  /** Stops the server and removes the folder. Idempotent. */
  remove(): void;
}

export interface ClusterOptions {
  /** Extra postgres settings (-c name=value). */
  settings?: Record<string, string>;
}

export async function startPostgresCluster(options: ClusterOptions = {}): Promise<PostgresCluster> {
  const binDir = findPostgresBinDir();
  if (!binDir) throw new Error('PostgreSQL server programs not found. Install the Debian package postgresql (bash test/install-debian-packages.sh).');
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-pg-'));
  const dataDir = join(folder, 'data');
  const socketDir = folder;
  const logFile = join(folder, 'server.log');
  const asServerUser = isRoot();
  if (asServerUser) {
    const { uid, gid } = userIds(SERVER_USER);
    chownSync(folder, uid, gid);
  }
  const run = (program: string, args: string[], input?: string): string => {
    const command = asServerUser ? 'runuser' : join(binDir, program);
    const fullArgs = asServerUser ? ['-u', SERVER_USER, '--', join(binDir, program), ...args] : args;
    const result = spawnSync(command, fullArgs, { encoding: 'utf8', input, cwd: folder, env: { ...process.env, LC_ALL: 'C' } });
    if (result.status !== 0) {
      const log = existsSync(logFile) ? spawnSync('tail', ['-n', '20', logFile], { encoding: 'utf8' }).stdout : '';
      throw new Error(`${program} ${args.join(' ')} failed (${result.status ?? result.signal}): ${result.stderr || result.stdout}${log ? `\nserver log:\n${log}` : ''}`);
    }
    return result.stdout;
  };

  const role = 'rolloff_test';
  const password = `pw-${Math.random().toString(36).slice(2)}-${process.pid}`;
  const database = 'rolloff';
  let port = 0;
  let running = false;
  let removed = false;
  // Local socket connections (the helper's own psql) trust the OS user; TCP needs the password, as a lab server would.
  run('initdb', ['-D', dataDir, '-U', SERVER_USER, '--auth-local=trust', '--auth-host=scram-sha-256', '-E', 'UTF8', '--no-locale', '--no-instructions']);

  const settings = { listen_addresses: '127.0.0.1', unix_socket_directories: socketDir, max_connections: '60', ...options.settings };
  const start = (): void => {
    const serverOptions = [`-p ${port}`, ...Object.entries(settings).map(([name, value]) => `-c ${name}=${value}`)].join(' ');
    run('pg_ctl', ['-D', dataDir, '-l', logFile, '-o', serverOptions, '-w', '-t', '60', 'start']);
    running = true;
  };
  const stop = (): void => {
    if (!running) return;
    run('pg_ctl', ['-D', dataDir, '-m', 'immediate', '-w', 'stop']);
    running = false;
  };
  const sql = (statement: string, db = 'postgres'): string =>
    run('psql', ['-X', '-q', '-A', '-t', '-v', 'ON_ERROR_STOP=1', '-h', socketDir, '-p', String(port), '-U', SERVER_USER, '-d', db], statement);
  const remove = (): void => {
    if (removed) return;
    removed = true;
    try {
      stop();
    } finally {
      rmSync(folder, { recursive: true, force: true });
      process.removeListener('exit', remove);
    }
  };

  // The port may be taken between finding it and binding it (another test file): try a few.
  for (let attempt = 0; ; attempt++) {
    port = await freeLoopbackPort();
    try {
      start();
      break;
    } catch (error) {
      if (attempt >= 4) {
        rmSync(folder, { recursive: true, force: true });
        throw error;
      }
    }
  }
  process.once('exit', remove); // a crashed test run leaves no server behind
  sql(`CREATE ROLE ${role} LOGIN PASSWORD '${password}'; CREATE DATABASE ${database} OWNER ${role};`);
  const passwordFile = join(folder, 'pgpass');
  writeFileSync(passwordFile, `127.0.0.1:${port}:*:${role}:${password}\n`, { mode: 0o600 });
  const urlOf = (db: string, withPassword: boolean) => `postgres://${role}${withPassword ? `:${encodeURIComponent(password)}` : ''}@127.0.0.1:${port}/${db}`;

  return {
    port,
    role,
    password,
    database,
    url: urlOf(database, false),
    urlWithPassword: urlOf(database, true),
    passwordFile,
    folder,
    sql,
    createDatabase(name: string) {
      if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`database name "${name}" must be lower-case letters, digits and _`);
      sql(`CREATE DATABASE ${name} OWNER ${role};`);
      return urlOf(name, false);
    },
    stop,
    start,
    remove,
  };
}
