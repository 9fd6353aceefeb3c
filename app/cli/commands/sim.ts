/**
 * `rolloff sim`: starts the simulated bench and prints the addresses it answers
 * on; runs until Ctrl-C. Everything it reports is simulated.
 */
import { UserError, ValidationError } from '../../errors';
import { startSimulatedBench, parseFaultSpec, type SimFault } from '../../sim';
import { INSTRUMENT_ROLES, type InstrumentRole } from '../../contract/contract';
import { formatEngineering } from '../../units';
import { optionFlag, optionNumber, optionString, type CommandSpec } from '../args';
import { DATABASE_OPTION, SIMULATED_BENCH_OPTIONS, simulatedBenchFrom } from '../common-options';
import { chooseDesign, designContent, designOption, DESIGN_PLACEHOLDER } from '../design-option';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';

export const simCommand: CommandSpec = {
  name: 'sim',
  summary: 'Start the simulated bench (simulated generator, meter and scope around a design)',
  usage: `--design ${DESIGN_PLACEHOLDER} [--port PORT | --pty DIR] [--vxi11] [options]`,
  options: [
    designOption('the simulated circuit (required)'),
    DATABASE_OPTION,
    { name: 'port', aliases: ['tcp'], kind: 'integer', placeholder: 'PORT', description: 'raw TCP sockets on 127.0.0.1: generator on PORT, meter PORT+1, scope PORT+2 (0: any free ports; the default)' },
    { name: 'pty', kind: 'string', placeholder: 'DIR', description: 'serial pseudo-terminals DIR/generator, DIR/meter, DIR/scope (needs socat)' },
    { name: 'vxi11', kind: 'flag', description: 'also serve the instruments over VXI-11 (LAN instruments inst0 generator, inst1 meter, inst2 scope), registered with the portmapper on 127.0.0.1 (needs rpcbind)' },
    ...SIMULATED_BENCH_OPTIONS,
    { name: 'latency', kind: 'number', placeholder: 'S', description: 'delay before each reply', defaultValue: 0 },
    { name: 'fault', kind: 'string', placeholder: '[ROLE=]KIND[:VALUE]', repeatable: true, description: 'inject a fault: garbage[:P], no-reply[:P], slow:S, hang, overrange, nan' },
  ],
  details: `
Channel 1 of the scope is the circuit input, channel 2 the output. The
generator has a 50 Ω output resistance; its amplitude is calibrated for its
load setting. Every *IDN? reply says "simulated". --measurement-noise is flat
(the same density at every frequency, on both channels and the meter);
--circuit-noise is the design's computed output noise, shaped by the circuit
(output only). --design 3 simulates stored design 3 of --db.
Examples:
  rolloff sim --design app/circuit/examples/inverting-lowpass.json --port 5025
  rolloff sim --design d.json --pty /tmp/bench --measurement-noise 1m --fault meter=garbage:0.05
  rolloff sim --design d.json --vxi11      (then e.g. TCPIP::127.0.0.1::inst2::INSTR is the scope)`,
  async run(parsed) {
    const designText = optionString(parsed, 'design');
    if (!designText) throw new ValidationError('--design', 'is required', 'Give the circuit to simulate: a stored design\'s id or a design file, e.g. --design app/circuit/examples/inverting-lowpass.json.');
    const choice = chooseDesign(designText);
    const tcpPort = optionNumber(parsed, 'port');
    if (tcpPort !== undefined && (tcpPort < 0 || tcpPort > 65533)) throw new ValidationError('--port', `${tcpPort} is not a usable port (0–65533; three consecutive ports are used)`);
    const pty = optionString(parsed, 'pty');
    const { timeScale, noiseVrms, circuitNoise, seed } = simulatedBenchFrom(parsed);
    if (!(optionNumber(parsed, 'latency')! >= 0)) throw new ValidationError('--latency', 'must be zero or more');
    const design = 'content' in choice ? choice.content : await storedDesignContent(optionString(parsed, 'db'), choice);
    const faults: Partial<Record<InstrumentRole, SimFault>> = {};
    for (const spec of (parsed.options.fault as string[] | undefined) ?? []) {
      const { role, fault } = parseFaultSpec(spec);
      if (fault.kind === 'drop-link') throw new ValidationError('--fault', 'drop-link is a one-shot event; use it from the in-process API');
      for (const target of role === 'all' ? INSTRUMENT_ROLES : [role]) faults[target] = fault;
    }
    const bench = await startSimulatedBench({
      design,
      designSource: 'path' in choice ? choice.path : `stored design ${choice.storedId}`,
      ...(pty !== undefined ? { pty } : { tcpPort: tcpPort ?? 0 }),
      timeScale,
      noiseVrms,
      circuitNoise,
      latencyS: optionNumber(parsed, 'latency')!,
      seed,
      faults,
      vxi11: optionFlag(parsed, 'vxi11'),
    }).catch((error: unknown) => {
      if (error instanceof UserError) throw error;
      const code = (error as NodeJS.ErrnoException)?.code;
      if (code === 'EADDRINUSE') throw new UserError(`--port ${tcpPort}: a port in ${tcpPort}–${(tcpPort ?? 0) + 2} is already in use`, 'Pick another port, or --port 0 for any free ports.');
      throw error;
    });
    const lines = [
      `Simulated bench running — SIMULATED instruments, design "${bench.design.name}"`,
      `  generator  ${bench.addresses.generator}`,
      `  meter      ${bench.addresses.meter}`,
      `  scope      ${bench.addresses.scope}   (ch1 = circuit input, ch2 = output)`,
      ...(bench.vxi11Addresses
        ? [
            `  over VXI-11 (core channel port ${bench.vxi11Server!.corePort}, registered with the portmapper on 127.0.0.1):`,
            `  generator  ${bench.vxi11Addresses.generator}`,
            `  meter      ${bench.vxi11Addresses.meter}`,
            `  scope      ${bench.vxi11Addresses.scope}`,
          ]
        : []),
      `  time scale ×${timeScale}, measurement noise ${formatEngineering(noiseVrms, 'Vrms')}${circuitNoise ? ' and the circuit\'s own' : ''}${Object.keys(faults).length ? `, faults: ${Object.entries(faults).map(([r, f]) => `${r}=${f!.kind}`).join(', ')}` : ''}`,
      'Press Ctrl-C to stop.',
    ];
    process.stdout.write(`${lines.join('\n')}\n`);
    await new Promise<void>((resolve) => {
      process.once('SIGINT', () => resolve());
      process.once('SIGTERM', () => resolve());
    });
    await bench.stop();
    process.stdout.write('Simulated bench stopped.\n');
    return 0;
  },
};

/** A stored design's JSON, read from --db and the store closed again: the simulated bench needs only the circuit. */
async function storedDesignContent(database: string | undefined, choice: ReturnType<typeof chooseDesign>): Promise<unknown> {
  const service = await openLocalServiceAt(resolveDatabasePath(database));
  try {
    return await designContent(service, choice);
  } finally {
    await service.close();
  }
}
