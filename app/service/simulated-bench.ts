/**
 * The service's side of the simulated bench (app/sim): started on 127.0.0.1
 * (ephemeral ports) or on pseudo-terminals, sharing one scaled clock with the
 * sweep runner so settling and integration run `timeScale` times faster than
 * real time on both sides alike. Always simulated, and labelled so.
 */
import type { Design } from '../circuit';
import { scaledClock, type BenchClock } from '../bench/clock';
import type { InstrumentRole } from '../contract/contract';
import { SIMULATED_BENCH_DEFAULTS, startSimulatedBench, type GeneratorSettings, type SimFault } from '../sim';

export interface SimulatedBenchSettings {
  /** Bench seconds per wall-clock second (1 = real time). */
  timeScale: number;
  /** Flat white noise on every reading (the measurement's own), volts RMS. */
  noiseVrms: number;
  /** Also the circuit's own output noise, shaped by the circuit (theory engine). */
  circuitNoise: boolean;
  /** Extra delay per reply (wall seconds): a realistic link. */
  latencyS: number;
  seed: number;
  /** TCP on 127.0.0.1 (default), pseudo-terminals (serial path), or VXI-11 through the portmapper (LAN instruments). */
  link: 'tcp' | 'pty' | 'vxi11';
}

export interface SimulatedBenchHandle {
  addresses: Record<InstrumentRole, string>;
  clock: BenchClock;
  /** Sets (or with null clears) a fault on one instrument or all of them. */
  setFault(role: InstrumentRole | 'all', fault: SimFault | null): Promise<void>;
  /** Whether the simulated generator's output is on (tests check it is off after a sweep). */
  generatorOutputOn(): boolean;
  /** What the simulated generator holds now, and every state it takes from now on (tests read the instrument, not the runner). */
  generatorHeld(): Readonly<GeneratorSettings>;
  onGeneratorChange(listener: (held: Readonly<GeneratorSettings>) => void): () => void;
  stop(): Promise<void>;
}

const DEFAULTS: SimulatedBenchSettings = {
  timeScale: SIMULATED_BENCH_DEFAULTS.timeScale,
  noiseVrms: SIMULATED_BENCH_DEFAULTS.measurementNoiseVrms,
  circuitNoise: false,
  latencyS: 0,
  seed: SIMULATED_BENCH_DEFAULTS.seed,
  link: 'tcp',
};

export async function startSimulatedBenchFor(design: Design, settings: Partial<SimulatedBenchSettings>): Promise<SimulatedBenchHandle> {
  const chosen = { ...DEFAULTS, ...settings };
  const clock = scaledClock(chosen.timeScale);
  const bench = await startSimulatedBench({
    design,
    clock,
    ...(chosen.link === 'pty' ? { pty: true as const } : { tcpPort: 0 }),
    vxi11: chosen.link === 'vxi11',
    noiseVrms: chosen.noiseVrms,
    circuitNoise: chosen.circuitNoise,
    latencyS: chosen.latencyS,
    seed: chosen.seed,
  });
  return {
    addresses: chosen.link === 'vxi11' ? bench.vxi11Addresses! : bench.addresses,
    clock,
    setFault: (role, fault) => bench.setFault(role, fault),
    generatorOutputOn: () => bench.model.generatorOutput.on,
    generatorHeld: () => bench.generator.held,
    onGeneratorChange: (listener) => bench.generator.onChange(listener),
    stop: () => bench.stop(),
  };
}
