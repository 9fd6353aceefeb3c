/**
 * `rolloff serve`: the window's views and the service contract over HTTP and
 * WebSocket, for a plain browser — the same renderer the desktop shell runs.
 */
import { UserError } from '../../errors';
import { optionFlag, optionNumber, optionString, type CommandSpec } from '../args';
import { SAFETY_NOTICE_SHORT } from '../../contract/safety';
import { resolveDatabaseChoice } from '../../store';
import { bundleRenderer } from '../../host/renderer-bundle';
import { startWebHost } from '../../host/web-host';
import { openHostedService } from '../../host/hosted-service';
import { SETTINGS } from '../../contract/vocabulary';
import { benchDescription, limitSourceText } from '../../contract/bench-text';
import type { LocalService } from '../../service/local-service';

/** Which limit the window starts with, and whose it is. */
function maximumStimulusLine(service: LocalService): string {
  const limit = service.stimulusLimit;
  if (limit) return `${SETTINGS.maxStimulus.label}: ${limitSourceText(limit)}.`;
  return `${SETTINGS.maxStimulus.label}: not set for ${service.bench ? benchDescription(service.bench) : 'this bench'}; set it on the Bench view.`;
}
import { DATABASE_OPTION, SIMULATED_BENCH_OPTIONS, maxStimulusFrom, maxStimulusOption, simulatedBenchFrom } from '../common-options';

export const serveCommand: CommandSpec = {
  name: 'serve',
  summary: 'Serve the Rolloff window to a browser (HTTP + WebSocket), headless',
  usage: '[options]',
  options: [
    { name: 'host', kind: 'string', description: 'address to listen on; anything but loopback requires the printed access token', defaultValue: '127.0.0.1', placeholder: 'ADDRESS' },
    { name: 'port', kind: 'integer', description: 'TCP port of the window\'s address (0 picks a free one)', defaultValue: 8765, placeholder: 'PORT' },
    DATABASE_OPTION,
    { name: 'simulated', kind: 'flag', aliases: ['virtual'], description: 'serve the window for the simulated bench (simulated instruments; start it on the Bench view, which uses the simulated bench options with or without this flag)' },
    ...SIMULATED_BENCH_OPTIONS,
    maxStimulusOption('saved for the bench served: the simulated bench with --simulated, else the real instruments; without it that bench\'s saved limit applies, or set it on the Bench view'),
    { name: 'require-token', kind: 'flag', description: 'require the access token even on a loopback address' },
  ],
  details: `
Open the printed address in a browser. On 127.0.0.1 (the default) only this
machine can connect. With --host set to any other address a random access token
is printed and every request without it is refused; anyone who can reach the
address and has the token can drive your instruments, so share it with care.
Stop with Ctrl+C: running sweeps are paused (resumable), nothing is lost.
Another store can be chosen on the Bench view; it applies until this process
stops (the next start opens --db, ROLLOFF_DB or the default file again).

Examples:
  rolloff serve --simulated --time-scale 10 --max-stimulus 2
  rolloff serve --simulated --circuit-noise --measurement-noise 0 --max-stimulus 1   (for noise runs)
  rolloff serve --db bench.sqlite --port 9000`,

  async run(parsed) {
    const host = optionString(parsed, 'host') ?? '127.0.0.1';
    const port = optionNumber(parsed, 'port') ?? 8765;
    if (port < 0 || port > 65_535) throw new UserError(`--port ${port} is not a TCP port`, 'Use a number from 1 to 65535, or 0 for any free port.');
    const simulated = optionFlag(parsed, 'simulated');
    const simulatedBench = simulatedBenchFrom(parsed);
    const maxStimulusVpp = maxStimulusFrom(parsed);
    const database = resolveDatabaseChoice(optionString(parsed, 'db'));

    const files = await bundleRenderer();
    // A store chosen in the window (Bench view) applies to this process until it stops; nothing is saved.
    const hosted = await openHostedService(database.location, {
      maxStimulusVpp,
      startOn: simulated ? 'simulated bench' : 'real instruments',
      ownerLabel: 'rolloff serve',
      simulatedBench,
    }, { source: database.source });
    let webHost: Awaited<ReturnType<typeof startWebHost>>;
    try {
      webHost = await startWebHost({
        api: hosted.api,
        subscribe: hosted.subscribe,
        files,
        host,
        port,
        // Without the flag the web host applies its own rule: a token off loopback.
        requireToken: optionFlag(parsed, 'require-token') || undefined,
      });
    } catch (error) {
      await hosted.close();
      const code = (error as NodeJS.ErrnoException).code;
      if (code === 'EADDRINUSE') throw new UserError(`port ${port} on ${host} is already in use`, 'Pick another with --port, or --port 0 for any free port.');
      if (code === 'EADDRNOTAVAIL' || code === 'ENOTFOUND') throw new UserError(`cannot listen on ${host}: no such address on this machine`, 'Use 127.0.0.1, or an address of one of this machine\'s network interfaces.');
      if (code === 'EACCES') throw new UserError(`not allowed to listen on port ${port}`, 'Ports below 1024 need special rights; use a higher one.');
      throw error;
    }

    const lines = [
      `Rolloff is serving the window${simulated ? ' with the simulated bench (SIMULATED instruments)' : ''}.`,
      `Database: ${hosted.service.databaseLocation}`, // a lab store's address without its password
      maximumStimulusLine(hosted.service),
      `Open ${webHost.url}`,
    ];
    if (webHost.token) lines.push(`Access token: ${webHost.token}`, '  Every request must carry it (the address above does); anyone with it can drive this bench.');
    lines.push('Stop with Ctrl+C.', '', SAFETY_NOTICE_SHORT, '');
    process.stdout.write(lines.join('\n'));

    await new Promise<void>((resolvePromise) => {
      const stop = () => resolvePromise();
      process.once('SIGINT', stop);
      process.once('SIGTERM', stop);
    });
    process.stdout.write('Stopping: pausing running sweeps and closing the database…\n');
    await webHost.close();
    await hosted.close();
    return 0;
  },
};
