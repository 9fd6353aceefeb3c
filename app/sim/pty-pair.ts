/**
 * A pair of connected pseudo-terminals made by socat: bytes written to one
 * come out of the other, with the same termios behaviour as a real serial
 * port. Used by the simulated bench (one end is the simulated instrument, the
 * other the address users connect to) and by tests.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync, lstatSync, mkdtempSync, rmSync, unlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { UserError } from '../errors';

export interface PtyPair {
  /** Path of one end (a symlink to the pty device). */
  a: string;
  /** Path of the other end. */
  b: string;
  close(): Promise<void>;
}

export class PtyUnavailableError extends UserError {}

const WAIT_FOR_LINKS_S = 5;

/**
 * Starts `socat -d -d pty,raw,echo=0,link=A pty,raw,echo=0,link=B` and waits
 * until both links exist. Without explicit paths the links go in a fresh temp dir.
 */
export async function openPtyPair(paths?: { a: string; b: string }): Promise<PtyPair> {
  let ownDir: string | undefined;
  if (!paths) {
    ownDir = mkdtempSync(join(tmpdir(), 'rolloff-pty-'));
    paths = { a: join(ownDir, 'a'), b: join(ownDir, 'b') };
  }
  const { a, b } = paths;
  // A link left by a crashed run would look "ready" before socat replaces it.
  removeStaleLink(a);
  removeStaleLink(b);
  const child = spawn('socat', ['-d', '-d', `pty,raw,echo=0,link=${a}`, `pty,raw,echo=0,link=${b}`], { stdio: ['ignore', 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr?.on('data', (chunk: Buffer) => {
    if (stderr.length < 4000) stderr += chunk.toString();
  });
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  let spawnError: Error | undefined;
  child.once('error', (error) => {
    spawnError = error;
  });

  const deadline = Date.now() + WAIT_FOR_LINKS_S * 1000;
  while (!(existsSync(a) && existsSync(b))) {
    if (spawnError) throw new PtyUnavailableError(`cannot start socat: ${spawnError.message}`, 'Install socat (Debian: apt-get install socat).');
    if (child.exitCode !== null) throw new PtyUnavailableError(`socat exited (${child.exitCode}) before making the pseudo-terminals: ${stderr.trim()}`, 'Check that the link paths are writable and not in use.');
    if (Date.now() > deadline) {
      child.kill('SIGTERM');
      throw new PtyUnavailableError(`socat made no pseudo-terminals within ${WAIT_FOR_LINKS_S} s`, 'Check that socat works on this machine.');
    }
    await new Promise((resolve) => setTimeout(resolve, 10));
  }

  let closed = false;
  return {
    a,
    b,
    close: async () => {
      if (closed) return;
      closed = true;
      await stopSocat(child, exited);
      removeStaleLink(a);
      removeStaleLink(b);
      if (ownDir) rmSync(ownDir, { recursive: true, force: true });
    },
  };
}

/** Removes a symbolic link at `path`; refuses to touch anything else that is there. */
function removeStaleLink(path: string): void {
  let stats;
  try {
    stats = lstatSync(path);
  } catch {
    return; // nothing there
  }
  if (!stats.isSymbolicLink()) throw new PtyUnavailableError(`${path} exists and is not a pseudo-terminal link`, 'Choose a folder where the links generator, meter and scope can be made, or remove that file.');
  unlinkSync(path);
}

async function stopSocat(child: ChildProcess, exited: Promise<number | null>): Promise<void> {
  if (child.exitCode === null && child.signalCode === null) {
    child.kill('SIGTERM');
    const timer = setTimeout(() => child.kill('SIGKILL'), 2000);
    await exited;
    clearTimeout(timer);
  }
}
