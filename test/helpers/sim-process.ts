/**
 * `rolloff sim` in a process of its own, as the benchmarks run it (instruments
 * are other processes, so the simulation's work is not charged to the
 * program measured): started with the given options, its printed scope and
 * role addresses parsed per kind of link.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { join } from 'node:path';

type LinkKind = 'socket' | 'vxi11' | 'pty';
type Role = 'generator' | 'meter' | 'scope';

export interface SimProcess {
  process: ChildProcess;
  /** Addresses per link kind and role, as `rolloff sim` printed them. */
  addresses: Record<LinkKind, Partial<Record<Role, string>>>;
  scope: Record<LinkKind, string | undefined>;
  stop(): void;
}

const KIND_OF = (address: string): LinkKind | undefined =>
  address.startsWith('tcp://') ? 'socket' : address.startsWith('TCPIP::') ? 'vxi11' : address.startsWith('serial://') ? 'pty' : undefined;

export async function startSimProcess(args: string[]): Promise<SimProcess> {
  const child = spawn(process.execPath, [join(import.meta.dirname, '../../app/cli/bin.mjs'), 'sim', ...args], { stdio: ['ignore', 'pipe', 'inherit'] });
  const text = await new Promise<string>((resolve, reject) => {
    let output = '';
    child.stdout!.on('data', (chunk) => {
      output += chunk;
      if (output.includes('Press Ctrl-C')) resolve(output);
    });
    child.on('exit', () => reject(new Error(`rolloff sim exited: ${output}`)));
  });
  const addresses: SimProcess['addresses'] = { socket: {}, vxi11: {}, pty: {} };
  for (const [, role, address] of text.matchAll(/^\s+(generator|meter|scope)\s+(\S+)/gm)) {
    const kind = KIND_OF(address);
    if (kind) addresses[kind][role as Role] = address;
  }
  return {
    process: child,
    addresses,
    scope: { socket: addresses.socket.scope, vxi11: addresses.vxi11.scope, pty: addresses.pty.scope },
    stop: () => child.kill('SIGINT'),
  };
}
