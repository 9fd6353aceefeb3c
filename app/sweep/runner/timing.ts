/** Waiting for settling without paying for link time twice. */
import type { BenchClock } from '../../bench/clock';

/**
 * Waits until `settleS` after the stimulus changed. Commands sent after the
 * change (time base, scales) overlap the wait instead of adding to it, which
 * is what keeps a sweep close to its physical minimum.
 */
export async function waitUntilSettled(clock: BenchClock, changedAtS: number, settleS: number): Promise<void> {
  const remainingS = changedAtS + settleS - clock.nowS();
  if (remainingS > 0) await clock.sleepS(remainingS);
}
