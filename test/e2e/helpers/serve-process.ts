/**
 * Runs the real `rolloff serve` as a child process (the same command a user
 * types) on a temp database and an ephemeral port, and reads the address it
 * prints.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(__dirname, '../../..');

export interface ServeProcess {
  url: string;
  /** The serve process's id (a run it drives names it as its owner). */
  pid: number;
  dbPath: string;
  output: () => string;
  /** SIGTERM (clean stop); removes the temp folder unless the database was given by the caller. */
  stop(): Promise<void>;
  /** SIGKILL: the process dies mid-work, as in a crash or power cut. The database stays. */
  kill(): Promise<void>;
}

export async function startServe(extraArgs: string[] = [], options: { dbPath?: string; env?: Record<string, string> } = {}): Promise<ServeProcess> {
  const dir = options.dbPath ? undefined : mkdtempSync(join(tmpdir(), 'rolloff-serve-'));
  const dbPath = options.dbPath ?? join(dir!, 'bench.sqlite');
  const child: ChildProcess = spawn(process.execPath, ['app/cli/bin.mjs', 'serve', '--port', '0', '--db', dbPath, ...extraArgs], {
    cwd: ROOT,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: { ...process.env, NO_COLOR: '1', ...options.env },
  });
  let output = '';
  child.stdout!.on('data', (chunk) => (output += chunk));
  child.stderr!.on('data', (chunk) => (output += chunk));
  const exited = new Promise<void>((r) => child.once('exit', () => r()));
  const url = await new Promise<string>((resolvePromise, reject) => {
    const timer = setTimeout(() => reject(new Error(`rolloff serve printed no address within 30 s:\n${output}`)), 30_000);
    const check = () => {
      const match = /(http:\/\/127\.0\.0\.1:\d+\/\S*)/.exec(output);
      if (match) {
        clearTimeout(timer);
        resolvePromise(match[1]);
      }
    };
    child.stdout!.on('data', check);
    child.on('exit', (code) => {
      clearTimeout(timer);
      reject(new Error(`rolloff serve exited with ${code}:\n${output}`));
    });
  });
  const end = async (signal: NodeJS.Signals) => {
    if (child.exitCode === null && child.signalCode === null) {
      child.kill(signal);
      await Promise.race([exited, new Promise((r) => setTimeout(r, 5_000))]);
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
    }
  };
  return {
    url,
    pid: child.pid!,
    dbPath,
    output: () => output,
    async stop() {
      await end('SIGTERM');
      if (dir) rmSync(dir, { recursive: true, force: true });
    },
    kill: () => end('SIGKILL'),
  };
}

/** Calls one service method over the host's HTTP API, as the window does; throws with the service's message on refusal. */
export async function callService<T>(serve: ServeProcess, method: string, args: unknown[]): Promise<T> {
  const response = await fetch(new URL(`api/${method}`, serve.url), { method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(args) });
  const body = (await response.json()) as { result?: T; error?: { message: string } };
  if (!response.ok) throw new Error(`${method}: ${body.error?.message}`);
  return body.result as T;
}
