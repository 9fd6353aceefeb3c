/**
 * The system portmapper (Debian's rpcbind) the VXI-11 tests register with:
 * started here when nothing answers on 127.0.0.1:111. rpcbind needs root to
 * bind port 111; `-w` makes it keep registrations across restarts (rpcbind(8)).
 */
import { execFileSync } from 'node:child_process';
import { portAnswers, PORTMAPPER_PORT } from '../../app/scpi/vxi11/portmapper';
import { toolPath } from './required-tool';

export function portmapperAnswers(): Promise<boolean> {
  return portAnswers('127.0.0.1', PORTMAPPER_PORT, 1000);
}

/** Makes sure a portmapper answers on 127.0.0.1:111, starting rpcbind if none does. */
export async function ensurePortmapper(): Promise<void> {
  if (await portmapperAnswers()) return;
  const program = toolPath('rpcbind');
  if (!program) throw new Error('rpcbind not found; install it with: apt-get install rpcbind');
  if (process.getuid?.() !== 0) throw new Error('no portmapper answers on 127.0.0.1:111 and only root can start rpcbind; start it with: sudo rpcbind -w (or systemctl start rpcbind)');
  execFileSync(program, ['-w']);
  for (let i = 0; i < 50; i++) {
    if (await portmapperAnswers()) return;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error('rpcbind was started but nothing answers on 127.0.0.1:111 within 5 s');
}
