/**
 * Transports side by side, in one run, against the same simulated scope:
 * raw TCP socket, VXI-11 (ONC RPC through the portmapper) and a PTY (socat
 * pseudo-terminal, the serial path). Two figures per transport: the query
 * round trip (*IDN?, median of many) and a 10,000-point waveform transfer
 * (TRACe:DATA? of a 16-bit record: "#520000" and 20,000 bytes, a definite-length block;
 * median), each with its ratio to the raw socket. The simulated bench runs in
 * its own processes (`rolloff sim`), as instruments do, with no added
 * latency, so the figures are the transports' own cost on this machine.
 *
 * Needs rpcbind (VXI-11 registers with it; started here as in the tests when no
 * portmapper answers, which needs root) and socat (the PTY).
 * Run: npx tsx test/bench/transports.ts [--queries 300] [--transfers 20]
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { makeDesignFromTemplate } from '../../app/circuit/templates';
import { connect, type ScpiSession } from '../../app/scpi';
import { startSimProcess } from '../helpers/sim-process';
import { ensurePortmapper } from '../helpers/portmapper';
import { median } from '../../app/numeric';

function argument(name: string, fallback: number): number {
  const at = process.argv.indexOf(`--${name}`);
  return at > 0 ? Number(process.argv[at + 1]) : fallback;
}

async function measure(session: ScpiSession, queries: number, transfers: number): Promise<{ queryMs: number; transferMs: number; blockBytes: number }> {
  await session.write('SENSe:SWEep:POINts 10000');
  await session.write('INITiate');
  await session.operationComplete({ timeoutS: 10 });
  // Warm-up: the first exchanges pay for JIT and buffers on both sides.
  for (let i = 0; i < 20; i++) await session.query('*IDN?');
  await session.queryBlock('TRACe:DATA? CH1');
  const queryTimes: number[] = [];
  for (let i = 0; i < queries; i++) {
    const started = performance.now();
    await session.query('*IDN?');
    queryTimes.push(performance.now() - started);
  }
  const transferTimes: number[] = [];
  let blockBytes = 0;
  for (let i = 0; i < transfers; i++) {
    const started = performance.now();
    blockBytes = (await session.queryBlock('TRACe:DATA? CH1')).length;
    transferTimes.push(performance.now() - started);
  }
  return { queryMs: median(queryTimes), transferMs: median(transferTimes), blockBytes };
}

async function main(): Promise<void> {
  const queries = argument('queries', 300);
  const transfers = argument('transfers', 20);
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-bench-'));
  writeFileSync(join(folder, 'design.json'), JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
  const ptyFolder = mkdtempSync(join(folder, 'pty-'));
  await ensurePortmapper(); // VXI-11 clients find the instruments through it; started as in the tests when none answers
  const lan = await startSimProcess(['--design', join(folder, 'design.json'), '--port', '0', '--vxi11']);
  const serial = await startSimProcess(['--design', join(folder, 'design.json'), '--pty', ptyFolder]).catch((error: Error) => {
    lan.stop();
    throw error;
  });
  try {
    const kinds = [
      ['raw socket', lan.scope.socket],
      ['VXI-11', lan.scope.vxi11],
      ['PTY (serial)', serial.scope.pty],
    ] as const;
    const results: Array<{ name: string; address: string; queryMs: number; transferMs: number; blockBytes: number }> = [];
    for (const [name, address] of kinds) {
      if (!address) throw new Error(`rolloff sim printed no ${name} address`);
      const session = await connect(address, { timeoutS: 10 });
      try {
        results.push({ name, address, ...(await measure(session, queries, transfers)) });
      } finally {
        await session.close();
      }
    }
    const socket = results[0];
    console.log(`transports on the simulated scope: *IDN? round trip (median of ${queries}) and a 10,000-point waveform (median of ${transfers}), same run`);
    console.log('transport       query round trip   ratio   waveform (bytes)          ratio   address');
    for (const r of results) {
      console.log(
        `${r.name.padEnd(15)} ${r.queryMs.toFixed(3).padStart(10)} ms   ${(r.queryMs / socket.queryMs).toFixed(2).padStart(5)}   ${r.transferMs.toFixed(2).padStart(8)} ms (${r.blockBytes})  ${(r.transferMs / socket.transferMs).toFixed(2).padStart(5)}   ${r.address}`,
      );
    }
  } finally {
    lan.stop();
    serial.stop();
    // Give the sim processes a moment to unregister from the portmapper and close their PTYs.
    await new Promise((resolve) => setTimeout(resolve, 500));
    rmSync(folder, { recursive: true, force: true });
  }
}

await main();
