/**
 * The bench's sense of time. The simulated bench and the sweep runner share one
 * clock so a test can run the physics (settling, integration, record length)
 * `timeScale` times faster than real time and both sides agree on it.
 */
export interface BenchClock {
  /** Bench time in seconds since the clock was made (simulated seconds when scaled). */
  nowS(): number;
  /** Waits `seconds` of bench time (seconds / timeScale of wall time). */
  sleepS(seconds: number): Promise<void>;
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
    // last millisecond is polled on the event loop instead.
    sleepS: (seconds: number) =>
      new Promise<void>((resolve) => {
        const untilWallS = wallS() + Math.max(0, seconds / timeScale);
        const check = () => {
          const leftMs = (untilWallS - wallS()) * 1000;
          if (leftMs <= 0) resolve();
          else if (leftMs > 1) setTimeout(check, leftMs);
          else setImmediate(check);
        };
        check();
      }),
  };
}

/** Real time: what a real bench runs on. */
export const realClock: BenchClock = scaledClock(1);
