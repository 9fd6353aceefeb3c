/**
 * The bench's sense of time. The simulated bench and the sweep runner share one
 * clock so a test can run the physics (settling, integration, record length)
 * `timeScale` times faster than real time and both sides agree on it.
 */
export interface BenchClock {
  /** Bench time in seconds since the clock was made (simulated seconds when scaled). */
  nowS(): number;
  /**
   * Waits `seconds` of bench time (seconds / timeScale of wall time), never less. When its timer fires
   * early the rest is polled; `coarse` waits on timers only (no CPU spent, may end ~1 ms late) for a wait
   * whose end nothing is timed from.
   */
  sleepS(seconds: number, options?: { coarse?: boolean }): Promise<void>;
  /** Bench seconds per wall-clock second; 1 for a real bench. */
  readonly timeScale: number;
}

function wallS(): number {
  return performance.now() / 1000;
}

/** A clock whose bench time runs `timeScale` times faster than the wall clock. */
export function scaledClock(timeScale: number): BenchClock {
  if (!(timeScale > 0) || !Number.isFinite(timeScale)) {
    throw new RangeError(`time scale must be a positive finite number, got ${timeScale}`);
  }
  const startWallS = wallS();
  return {
    timeScale,
    nowS: () => (wallS() - startWallS) * timeScale,
    // Never returns early: a timer may fire up to ~1 ms before its delay (fractional delays are
    // truncated and the event loop's cached time can lag), which would cut settling short. The
    // last millisecond is then polled on the event loop. The timer is set for the whole wait, not
    // short of it: polling longer on purpose costs a millisecond or two of CPU per wait, and on a
    // loaded machine a process that polls is scheduled later than one woken by its timer, so the
    // waits came out later, not sooner (sweep-efficiency benchmark, load average ~12). A coarse wait
    // never polls.
    sleepS: (seconds: number, options: { coarse?: boolean } = {}) =>
      new Promise<void>((resolve) => {
        const untilWallS = wallS() + Math.max(0, seconds / timeScale);
        const check = () => {
          const leftMs = (untilWallS - wallS()) * 1000;
          if (leftMs <= 0) resolve();
          else if (options.coarse) setTimeout(check, Math.max(1, leftMs));
          else if (leftMs > 1) setTimeout(check, leftMs);
          else setImmediate(check);
        };
        check();
      }),
  };
}

/** Real time: what a real bench runs on. */
export const realClock: BenchClock = scaledClock(1);
