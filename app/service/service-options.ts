/** How a RolloffService is set up; each part of the service reads the few options it needs. */
import type { BenchClock } from '../bench';
import type { SimulatedBenchSettings } from './simulated-bench';

export interface RolloffServiceOptions {
  /**
   * The user's ceiling on generator output (--max-stimulus): saved as the
   * setting of the bench the service starts on (startOn), or of the first bench
   * it uses. Left out, that bench's stored setting applies, else none.
   */
  maxStimulusVpp?: number;
  /**
   * Which of this machine's benches the service starts on, so its stored
   * maximum stimulus applies before anything is connected (CLI and serve:
   * --simulated or not). Left out, the first connect, simulated bench or resume decides.
   */
  startOn?: 'simulated bench' | 'real instruments';
  /** Folder of user instrument profiles (else ROLLOFF_PROFILE_DIR). */
  profileFolder?: string;
  /** Simulated bench options: time scale (bench seconds per wall second), noise, link latency, seed. */
  simulatedBench?: Partial<SimulatedBenchSettings>;
  /** Give up on a run when the link stays down this long (bench seconds). Default 120 s. */
  giveUpAfterS?: number;
  /** Time an instrument needs after a setting change (s). Default 10 ms (common practice, no source). */
  instrumentSettleS?: number;
  /**
   * The clock sweeps count settling and integration on when this service runs no simulated bench of its
   * own (that bench brings its clock). Default real time; a test gives the clock of a bench it started.
   */
  clock?: BenchClock;
  /** Meter aperture for meter and DC runs (s). Default 0.1 s = 5 power-line cycles at 50 Hz (common practice). */
  meterIntegrationS?: number;
  /** Largest number of refinement points added after the coarse pass. Default 8. */
  maxRefinementPoints?: number;
  /** This bench's name, recorded with each run (default: ROLLOFF_BENCH or the host name, app/bench/bench-name.ts). */
  benchName?: string;
  /** Pass on the sweeps other processes drive on a shared store as this service's events (windows: serve, desktop). */
  followLab?: boolean | { forcePolling?: boolean; pollIntervalMs?: number };
  /** Who this service is, for the run owner shown to other processes (e.g. "rolloff sweep"). Default "rolloff". */
  ownerLabel?: string;
  /** Heartbeat renewal (ms) and the age after which another process's heartbeat counts as stale (ms); defaults in run-ownership.ts. */
  heartbeatIntervalMs?: number;
  staleAfterMs?: number;
}
