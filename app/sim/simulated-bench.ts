/**
 * The simulated bench: a simulated generator, meter and two-channel scope
 * (ch1 = circuit input, ch2 = circuit output) around a circuit computed by
 * the theory engine, each answering SCPI on its own TCP port or PTY. Always
 * labelled simulated: every *IDN? manufacturer field says so.
 */
import { mkdtempSync, rmSync, existsSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseDesign, type Design } from '../circuit';
import { SeededRandom } from '../numeric';
import { scaledClock, type BenchClock } from '../bench/clock';
import { INSTRUMENT_ROLES as ROLES, type InstrumentRole } from '../contract/contract';
import { ValidationError } from '../errors';
import { BenchModel } from './bench-model';
import { CircuitUnderTest } from './circuit-under-test';
import { listenPty, listenTcp, LOOPBACK_HOST, type Endpoint } from './endpoints';
import { DEFAULT_VXI11_DEVICE } from '../scpi/address';
import { FaultState, type SimFault } from './faults';
import type { LinkOptions } from './link-server';
import { SimGenerator } from './sim-generator';
import { HeaderPattern } from './program-message';
import { SimMeter } from './sim-meter';
import { SimScope } from './sim-scope';
import type { SimInstrument } from './sim-instrument';
import { startVxi11Server, type Vxi11Server } from './vxi11-server';

/** The generator's output resistance, ohms (the usual bench-generator figure). */
export const SIM_SOURCE_IMPEDANCE_OHM = 50;

export interface SimulatedBenchOptions {
  /** A design file's JSON or a parsed Design. */
  design: unknown;
  /** Where the design came from (file path), named in design errors. */
  designSource?: string;
  /** TCP: 0 for an ephemeral port per instrument, or N for N, N+1, N+2 (generator, meter, scope). */
  tcpPort?: number;
  /** PTY: a folder (or true for a temp folder) where the serial links generator, meter, scope appear. */
  pty?: string | true;
  /** Bench seconds per wall second (default 1). Ignored when `clock` is given. */
  timeScale?: number;
  clock?: BenchClock;
  /** Flat white noise added to every simulated voltage (the measurement's own noise), V RMS (default 0). */
  noiseVrms?: number;
  /** Add the circuit's own noise at the output, shaped by the circuit as the theory engine computes it (default off). */
  circuitNoise?: boolean;
  /** Wall-clock delay before each reply, seconds (default 0). */
  latencyS?: number;
  faults?: Partial<Record<InstrumentRole, SimFault>>;
  seed?: number;
  /**
   * Also serve the instruments over VXI-11, registered with the portmapper on
   * 127.0.0.1 (see vxi11-server.ts): device inst0 generator, inst1 meter,
   * inst2 scope. Only one process at a time can hold the registration.
   */
  vxi11?: boolean | { port?: number; maxRecvSizeBytes?: number };
}

/** Device names on the simulated bench's VXI-11 server, one per instrument. */
export const VXI11_DEVICE_NAMES: Record<InstrumentRole, string> = { generator: 'inst0', meter: 'inst1', scope: 'inst2' };

export interface SimulatedBench {
  addresses: Record<InstrumentRole, string>;
  /** VISA resource strings of the same instruments over VXI-11, when served (`vxi11` option). */
  vxi11Addresses?: Record<InstrumentRole, string>;
  /** The VXI-11 server, when served: its ports and device_read counts. */
  vxi11Server?: Vxi11Server;
  clock: BenchClock;
  design: Design;
  /** The signal model, for tests that compare readings with theory. */
  model: BenchModel;
  /** The simulated generator, for tests that read what it actually holds. */
  generator: SimGenerator;
  readonly simulated: true;
  /** Sets (or with null clears) a fault on one instrument or all of them. */
  setFault(role: InstrumentRole | 'all', fault: SimFault | null): Promise<void>;
  stop(): Promise<void>;
}


export async function startSimulatedBench(options: SimulatedBenchOptions): Promise<SimulatedBench> {
  const design = parseDesign(options.design, options.designSource ?? 'simulated bench design');
  const clock = options.clock ?? scaledClock(options.timeScale ?? 1);
  const noiseVrms = options.noiseVrms ?? 0;
  if (!(noiseVrms >= 0) || !Number.isFinite(noiseVrms)) throw new ValidationError('noiseVrms', `${noiseVrms} is not a non-negative number of volts`);
  const latencyS = options.latencyS ?? 0;
  if (!(latencyS >= 0) || !Number.isFinite(latencyS)) throw new ValidationError('latencyS', `${latencyS} is not a non-negative number of seconds`);
  const seed = options.seed ?? 1;
  if (options.tcpPort !== undefined && options.pty !== undefined) throw new ValidationError('simulated bench', 'give either a TCP port or a PTY folder, not both');

  const model = new BenchModel(new CircuitUnderTest(design, SIM_SOURCE_IMPEDANCE_OHM), clock, noiseVrms, seed, options.circuitNoise === true);
  const meter = new SimMeter(model, clock);
  const scope = new SimScope(model, clock);
  const generator = new SimGenerator(model, clock);
  const instruments: Record<InstrumentRole, SimInstrument> = { generator, meter, scope };
  const faults: Record<InstrumentRole, FaultState> = { generator: new FaultState(), meter: new FaultState(), scope: new FaultState() };
  const linkRandom = new SeededRandom(seed ^ 0x5eed);

  let ptyDir: string | undefined;
  let ownPtyDir = false;
  if (options.pty !== undefined) {
    if (options.pty === true) {
      ptyDir = mkdtempSync(join(tmpdir(), 'rolloff-bench-'));
      ownPtyDir = true;
    } else {
      ptyDir = options.pty;
      if (!existsSync(ptyDir) || !statSync(ptyDir).isDirectory()) throw new ValidationError('--pty', `"${ptyDir}" is not a folder`, 'Give an existing folder; the links generator, meter and scope are made inside it.');
    }
  }

  const endpoints: Partial<Record<InstrumentRole, Endpoint>> = {};
  let vxi11Server: Vxi11Server | undefined;
  const stopAll = async () => {
    await vxi11Server?.stop().catch(() => undefined);
    for (const endpoint of Object.values(endpoints)) await endpoint?.stop().catch(() => undefined);
    if (ownPtyDir && ptyDir) rmSync(ptyDir, { recursive: true, force: true });
  };
  try {
    for (const [index, role] of ROLES.entries()) {
      const linkOptions: LinkOptions = { latencyS, faults: faults[role], random: linkRandom };
      endpoints[role] = ptyDir
        ? await listenPty(instruments[role], join(ptyDir, role), linkOptions)
        : await listenTcp(instruments[role], options.tcpPort ? options.tcpPort + index : 0, linkOptions);
    }
    if (options.vxi11) {
      const settings = options.vxi11 === true ? {} : options.vxi11;
      vxi11Server = await startVxi11Server({
        devices: ROLES.map((role) => ({ name: VXI11_DEVICE_NAMES[role], instrument: instruments[role], linkOptions: { latencyS, faults: faults[role], random: linkRandom } })),
        port: settings.port,
        maxRecvSizeBytes: settings.maxRecvSizeBytes,
      });
    }
  } catch (error) {
    await stopAll();
    throw error;
  }

  const setFault = async (role: InstrumentRole | 'all', fault: SimFault | null) => {
    for (const target of role === 'all' ? ROLES : [role]) {
      if (fault?.kind === 'drop-link') {
        await endpoints[target]!.dropLinks();
        vxi11Server?.dropLinks(VXI11_DEVICE_NAMES[target]);
        continue;
      }
      faults[target].set(fault ?? undefined);
      instruments[target].refusing = fault?.kind === 'refuse' ? new HeaderPattern(fault.header) : undefined;
      const forced = fault?.kind === 'overrange' || fault?.kind === 'nan' ? fault.kind : undefined;
      if (target === 'meter') meter.forcedReading = forced;
      if (target === 'scope') scope.forcedReading = forced;
      instruments[target].refuseHeaders(fault?.kind === 'unknown-headers' ? fault.headers : []);
      instruments[target].oneUnitPerMessage = fault?.kind === 'no-joined-messages';
    }
  };
  for (const role of ROLES) {
    const fault = options.faults?.[role];
    if (fault) await setFault(role, fault);
  }

  let stopped = false;
  return {
    addresses: { generator: endpoints.generator!.address, meter: endpoints.meter!.address, scope: endpoints.scope!.address },
    vxi11Addresses: vxi11Server ? vxi11AddressesOf(VXI11_DEVICE_NAMES) : undefined,
    vxi11Server,
    clock,
    design,
    model,
    generator,
    simulated: true,
    setFault,
    stop: async () => {
      if (stopped) return;
      stopped = true;
      for (const role of ROLES) faults[role].set(undefined);
      await stopAll();
    },
  };
}

/** `TCPIP::127.0.0.1::INSTR` for inst0 (the VISA default device), `TCPIP::127.0.0.1::instN::INSTR` for the others. */
function vxi11AddressesOf(names: Record<InstrumentRole, string>): Record<InstrumentRole, string> {
  const resource = (name: string) => (name === DEFAULT_VXI11_DEVICE ? `TCPIP::${LOOPBACK_HOST}::INSTR` : `TCPIP::${LOOPBACK_HOST}::${name}::INSTR`);
  return { generator: resource(names.generator), meter: resource(names.meter), scope: resource(names.scope) };
}
