/**
 * The key a bench's own settings (its maximum stimulus) are stored under
 * (RolloffStore.getBenchSettings): the bench's name (bench-name.ts) and whether
 * its instruments are the simulated bench the service runs or real ones. The
 * simulated bench of a machine and its real instruments are two benches here,
 * so a limit chosen for a simulation never reaches a real circuit, and one
 * bench's limit never reaches another bench.
 *
 * Through-calibrations are keyed otherwise, by the generator and meter they
 * measured (instrumentPairKey in the service): a calibration belongs to one
 * pair of instruments, known once they answer, while the limit must be known
 * before the generator is opened at all.
 */
import type { BenchIdentity } from '../contract/contract';

export function benchKey(bench: BenchIdentity): string {
  return `bench=${bench.name};instruments=${bench.simulated ? 'simulated' : 'real'}`;
}

export function sameBench(a: BenchIdentity | undefined, b: BenchIdentity | undefined): boolean {
  return a !== undefined && b !== undefined && benchKey(a) === benchKey(b);
}
