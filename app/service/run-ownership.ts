/**
 * Which process drives a run. A service claims a run in the store before it
 * measures anything, renews the heartbeat while the sweep goes on, and releases
 * the run when the sweep leaves the running state. Another process sees a live
 * owner and keeps its hands off; only a stale heartbeat (or, on the same host, an
 * owner process that no longer exists) lets it take the run over, and the
 * take-over is the store's one conditional update (RunStore.claimRun). Every
 * status, point and event line an owner writes is conditional on still owning the run
 * (OwnerCondition, checked in the write's own statement), so an owner that lost
 * the run to another process writes nothing more to it.
 */
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import { UserError } from '../errors';
import { RunTakenOverError, type NewRun, type RolloffStore, type RunClaimant, type RunOwnership, type StoredRun } from '../store';
import type { RunOwner, RunStatus } from '../contract/contract';
import { RunControl } from '../sweep/runner/control';
import { ownerWithTimes } from '../contract/run-owner-text';

/** How often an owner renews its heartbeat (ms): "every few seconds". */
export const HEARTBEAT_INTERVAL_MS = 2_000;
/** A heartbeat older than this (ms) means the owner is gone: five missed renewals (common practice, no source). */
export const STALE_AFTER_MS = 5 * HEARTBEAT_INTERVAL_MS;

/** The run is driven by another live process. */
export class RunOwnedElsewhereError extends UserError {
  readonly ownership: RunOwnership;
  constructor(runId: number, ownership: RunOwnership, action: string) {
    super(`run ${runId} is being driven by ${describeOwner(ownership)}; it cannot be ${action} from here`, howToStopThere(ownership));
    this.ownership = ownership;
  }
}

/** Another run drives the bench: a bench's instruments serve one run at a time. */
export class BenchInUseError extends UserError {
  readonly runId: number;
  readonly ownership: RunOwnership;
  constructor(benchName: string, runId: number, ownership: RunOwnership) {
    super(
      `bench "${benchName}" is in use: run ${runId} is being driven by ${describeOwner(ownership)}`,
      `Wait for run ${runId} to finish, or pause or stop it where it runs. To sweep on another bench at the same time, give that bench its own name (--bench NAME, or ROLLOFF_BENCH).`,
    );
    this.runId = runId;
    this.ownership = ownership;
  }
}

/** "rolloff serve pid 1234 on lab-pc (since 2026-03-04 10:02:03 UTC, heartbeat 1 s ago)". */
export function describeOwner(ownership: RunOwnership, nowMs = Date.now()): string {
  return ownerWithTimes(runOwnerOf(ownership, Infinity, nowMs));
}

/**
 * The owner as the contract shows it: its heartbeat's age by this process's
 * clock, and live unless that age is above staleAfterMs or, on this host, its
 * process is gone.
 */
export function runOwnerOf(ownership: RunOwnership, staleAfterMs: number, nowMs = Date.now()): RunOwner {
  const ageMs = Math.max(0, nowMs - Date.parse(ownership.heartbeatAt));
  const { ownerId: _ownerId, ...owner } = ownership;
  return { ...owner, heartbeatAgeS: Math.round(ageMs / 1000), live: ageMs <= staleAfterMs && !ownerProcessIsGone(ownership) };
}

function howToStopThere(ownership: RunOwnership): string {
  return `Pause or stop it where it runs (Ctrl+C in that terminal pauses a CLI sweep; the window has Pause and Stop), or end process ${ownership.pid} on ${ownership.host}. Once its heartbeat is ${STALE_AFTER_MS / 1000} s old, rolloff resume takes it over here.`;
}

/** This process as a claimant; one id per service, so two services in one process are told apart. */
export function thisProcessClaimant(label: string): RunClaimant {
  const host = hostname();
  return { ownerId: `${host}:${process.pid}:${randomBytes(6).toString('hex')}`, pid: process.pid, host, label };
}

/** True when the owner is on this host and its process no longer exists. */
export function ownerProcessIsGone(ownership: RunOwnership): boolean {
  if (ownership.host !== hostname()) return false;
  try {
    process.kill(ownership.pid, 0);
    return false;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'ESRCH';
  }
}

/**
 * Claims the run for me, or throws RunOwnedElsewhereError naming the owner. An
 * owner whose process is gone on this host is taken over at once (staleness of
 * 1 ms: still the store's conditional update, so a racing claimant cannot also win).
 */
export async function claimOrRefuse(store: RolloffStore, runId: number, me: RunClaimant, staleAfterMs: number, action: string): Promise<void> {
  const current = await store.getRunOwnership(runId);
  const gone = current !== undefined && current.ownerId !== me.ownerId && ownerProcessIsGone(current);
  const result = await store.claimRun(runId, me, gone ? 1 : staleAfterMs);
  if (!result.claimed) throw new RunOwnedElsewhereError(runId, result.ownership, action);
}

/**
 * Claims a run for a resume, which commands its bench's instruments again: refused
 * with RunOwnedElsewhereError while the run has a live owner, and with
 * BenchInUseError naming the run that holds its bench while another run of that
 * bench has one (RunStore.claimRunOnFreeBench: the check and the claim are one
 * transaction). A holder or owner whose process is gone on this host is released
 * and the claim tried again. `benchOfUnnamedRun`: the bench a run stored before benches had names is resumed on.
 */
export async function claimForResumeOrRefuse(store: RolloffStore, run: Pick<StoredRun, 'id' | 'benchName'>, benchOfUnnamedRun: string, me: RunClaimant, staleAfterMs: number): Promise<void> {
  const claim = () => store.claimRunOnFreeBench(run.id, me, staleAfterMs, benchOfUnnamedRun);
  let result = await claim();
  // The bench first, then the run's own owner: a refused resume leaves even a dead owner's run as it was.
  if ('benchHeldBy' in result && (await releaseIfGone(store, result.benchHeldBy.runId, result.benchHeldBy.ownership, me))) result = await claim();
  if (!('benchHeldBy' in result) && !result.claimed && (await releaseIfGone(store, run.id, result.ownership, me))) result = await claim();
  if ('benchHeldBy' in result) throw new BenchInUseError(run.benchName || benchOfUnnamedRun, result.benchHeldBy.runId, result.benchHeldBy.ownership);
  if (!result.claimed) throw new RunOwnedElsewhereError(run.id, result.ownership, 'resumed');
}

/** Releases a run whose owner's process is gone on this host (killed a moment ago); true when it did. */
async function releaseIfGone(store: RolloffStore, runId: number, ownership: RunOwnership, me: RunClaimant): Promise<boolean> {
  if (ownership.ownerId === me.ownerId || !ownerProcessIsGone(ownership)) return false;
  await store.releaseRun(runId, ownership.ownerId);
  return true;
}

/**
 * Creates the run owned by me, or throws BenchInUseError naming the run that
 * holds the bench (RunStore.createOwnedRun: the check and the creation are one
 * transaction). A holder whose process is gone on this host is released first,
 * so a sweep killed a moment ago does not keep the bench for its heartbeat's
 * life; its run is then interrupted, offered for resume.
 */
export async function createOwnedRunOrRefuse(store: RolloffStore, input: NewRun & { benchName: string }, me: RunClaimant, staleAfterMs: number): Promise<StoredRun> {
  let result = await store.createOwnedRun(input, me, staleAfterMs);
  if (!result.created && (await releaseIfGone(store, result.benchHeldBy.runId, result.benchHeldBy.ownership, me))) {
    result = await store.createOwnedRun(input, me, staleAfterMs);
  }
  if (!result.created) throw new BenchInUseError(input.benchName, result.benchHeldBy.runId, result.benchHeldBy.ownership);
  return result.run;
}

/** A run being driven by this process: how to pause or stop it, and its end. */
export interface DrivenRun {
  control: RunControl;
  finished: Promise<RunStatus>;
}

/**
 * Drives a run this process has claimed: `drive` runs it (sweep or noise run)
 * under RunControl while the owner's heartbeat is renewed every `intervalMs`.
 * A refused renewal (our heartbeat went stale and another process claimed the
 * run) gives the run up at once (RunControl.claimLost: the RunTakenOverError
 * names the new owner). When the run ends, `wrapUp.ended` runs, the run is
 * released (a paused one only after `wrapUp.finish`: figures, instrument setup),
 * and `wrapUp.finish` runs — unless it was taken over: then the run, its
 * figures and the instruments are the new owner's, and nothing more is done.
 */
export function driveOwnedRun(
  store: RolloffStore,
  runId: number,
  ownerId: string,
  intervalMs: number,
  drive: (control: RunControl) => Promise<RunStatus>,
  wrapUp: { ended(): void; finish(): Promise<void> },
): DrivenRun {
  const control = new RunControl();
  const timer = setInterval(() => {
    store.renewRunHeartbeat(runId, ownerId).then(
      async (stillOurs) => {
        if (!stillOurs) control.claimLost(new RunTakenOverError(runId, await store.getRunOwnership(runId).catch(() => undefined)));
      },
      () => undefined,
    );
  }, intervalMs);
  timer.unref();
  let takenOver = false;
  let ended: RunStatus = 'failed';
  const release = () => store.releaseRun(runId, ownerId).catch(() => undefined);
  const finished = drive(control)
    .then(
      (status) => (ended = status),
      (error: unknown) => {
        takenOver = error instanceof RunTakenOverError;
        throw error;
      },
    )
    .finally(async () => {
      clearInterval(timer);
      wrapUp.ended();
      if (takenOver) return;
      // A finished run (done, stopped, failed) is nobody's from the moment it ends, so it is never listed as
      // driven while its analysis runs; a paused one stays this process's until its figures are stored.
      if (ended !== 'paused') await release();
      await wrapUp.finish();
      if (ended === 'paused') await release();
    });
  // The caller learns the outcome through waitForRun/events; an unobserved rejection must not crash the process.
  finished.catch(() => undefined);
  return { control, finished };
}

/** The instruments for a run's loop: those connected now the first time, a fresh connection after a drop. */
export function firstThenReconnect<I>(current: () => I, reconnect: () => Promise<I>): () => Promise<I> {
  let first = true;
  return async () => {
    if (!first) return reconnect();
    first = false;
    return current();
  };
}
