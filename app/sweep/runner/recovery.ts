/**
 * Retry with back-off around one sweep step. Timeouts and a closed link are
 * worth another try after reconnecting; anything else (an instrument error, the
 * stimulus limit) stops the run at once, because retrying cannot fix it.
 */
import { ScpiDisconnectedError, ScpiTimeoutError } from '../../scpi/errors';
import type { BenchClock } from '../../bench/clock';
import { SweepGaveUpError } from './errors';

export interface RecoveryOptions {
  runId: number;
  clock: BenchClock;
  /** Give up (run failed) when the link has not recovered within this many seconds. */
  giveUpAfterS: number;
  /** First back-off; doubles after each failure up to maxBackoffS (common practice, no source). */
  firstBackoffS?: number;
  maxBackoffS?: number;
  reconnect(): Promise<void>;
  /** Stores and announces a run event; awaited so events keep their order. */
  log(level: 'info' | 'warning' | 'error', message: string): void | Promise<void>;
}

export function isRecoverable(error: unknown): boolean {
  return error instanceof ScpiTimeoutError || error instanceof ScpiDisconnectedError;
}

/** Runs `attempt` until it succeeds; returns its result and whether a retry was needed. */
export async function withRecovery<T>(attempt: () => Promise<T>, options: RecoveryOptions): Promise<{ value: T; retried: boolean }> {
  let backoffS = options.firstBackoffS ?? 0.2;
  const maxBackoffS = options.maxBackoffS ?? 5;
  let firstFailureS: number | undefined;
  for (;;) {
    try {
      return { value: await attempt(), retried: firstFailureS !== undefined };
    } catch (error) {
      if (!isRecoverable(error)) throw error;
      const nowS = options.clock.nowS();
      firstFailureS ??= nowS;
      const problem = (error as Error).message;
      if (nowS - firstFailureS >= options.giveUpAfterS) throw new SweepGaveUpError(options.runId, options.giveUpAfterS, problem);
      await options.log('warning', `${problem}; reconnecting in ${backoffS.toFixed(1)} s`);
      await options.clock.sleepS(backoffS);
      backoffS = Math.min(maxBackoffS, backoffS * 2);
      try {
        await options.reconnect();
        await options.log('info', 'reconnected; repeating the step');
      } catch (reconnectError) {
        if (!isRecoverable(reconnectError) && !isConnectFailure(reconnectError)) throw reconnectError;
        await options.log('warning', `reconnect failed: ${(reconnectError as Error).message}`);
      }
    }
  }
}

/** A refused or missing link while reconnecting is expected during an outage; keep trying. */
function isConnectFailure(error: unknown): boolean {
  return error instanceof Error && error.name === 'ConnectError';
}
