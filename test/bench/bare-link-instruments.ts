/**
 * Two stand-in instruments with nothing of Rolloff's SCPI, simulation or store:
 * a generator that acknowledges any line after the link latency, and a scope
 * that, given "ACQUIRE <seconds>", waits the record's length and then the link
 * latency before it says "1". Both wait with the simulated bench's own clock
 * (app/bench/clock.ts), so their replies come exactly as late as the simulated
 * bench's would. They run in a process of their own, as instruments do.
 *
 * Run by sweep-efficiency.ts: npx tsx test/bench/bare-link-instruments.ts LATENCY_S
 * prints "generator PORT scope PORT" once both listen.
 */
import { createServer, type Server, type Socket } from 'node:net';
import { ReadlineParser } from '@serialport/parser-readline';
import { realClock } from '../../app/bench/clock';

const latencyS = Number(process.argv[2]);

/** Answers each LF-terminated line in turn (framed by @serialport/parser-readline, as the simulated bench's links are). */
function serveLines(answer: (line: string) => Promise<void>, socket: Socket): void {
  socket.setNoDelay(true);
  let chain = Promise.resolve();
  socket.pipe(new ReadlineParser({ delimiter: '\n', encoding: 'latin1' })).on('data', (line: string) => {
    chain = chain.then(() => answer(line));
  });
  socket.on('error', () => socket.destroy());
}

function listen(answer: (socket: Socket, line: string) => Promise<void>): Promise<Server> {
  const server = createServer((socket) => serveLines((line) => answer(socket, line), socket));
  return new Promise((resolve) => server.listen(0, '127.0.0.1', () => resolve(server)));
}

const generator = await listen(async (socket) => {
  await realClock.sleepS(latencyS);
  socket.write('1\n');
});
const scope = await listen(async (socket, line) => {
  await realClock.sleepS(Number(line.split(' ')[1]));
  await realClock.sleepS(latencyS);
  socket.write('1\n');
});
const portOf = (server: Server) => (server.address() as { port: number }).port;
process.stdout.write(`generator ${portOf(generator)} scope ${portOf(scope)}\n`);
process.on('SIGINT', () => process.exit(0));
