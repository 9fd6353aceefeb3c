/**
 * A server store (the lab's PostgreSQL) with a local outbox in front of it,
 * behind the same RolloffStore interface, so a bench loses no point when the
 * network drops:
 *
 * - Writes of the runs a sweep drives (points, a noise run's records, events,
 *   status, results, the release) go straight to the server. When the server cannot be reached, the
 *   write is kept in the outbox file (outbox-file.ts, durable) and the call
 *   succeeds: the sweep goes on. While anything of this process waits in the
 *   outbox, later writes queue behind it, so they reach the server in the order
 *   they were made.
 * - The sweep's own reads of its run (next step, points or noise records, the run) are answered
 *   from a mirror of the run (run-mirror.ts) while the server is away.
 * - A sender retries every retryIntervalMs; once the server answers, the kept
 *   writes go in order, each deleted from the outbox only after the server took
 *   it. A point the server already has (its commit's reply was lost) counts as
 *   sent: every step is stored once. Then the run's offline period (from the
 *   first failure to the server's return) is recorded with the run.
 *
 * Ownership while cut off: the server cannot hear the bench's heartbeat, so to
 * other benches the run looks interrupted after the stale time. On this bench,
 * a run whose points wait in the outbox of a live process is never taken over
 * (claimRun refuses, naming that process); those of a process that is gone are
 * adopted and sent before the run is claimed, so a resume continues after them.
 * If another bench took the run over meanwhile, the returning bench sends its
 * points where their steps are still free, not its kept status changes (they
 * carry their owner condition, which the new owner's claim fails), and writes a
 * warning event on the run saying when it was cut off and who took the run: a
 * take-over is never silent.
 */
import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import type { BuildRecord, DesignRecord } from '../../contract/contract';
import { DuplicateStepError, RunTakenOverError, StoreUnreachableError } from '../errors';
import type { RolloffStore } from '../store-interface';
import type { BenchClaimResult, OwnerCondition, RunClaimResult, RunOwnership, StoredRun } from '../types';
import { DelegatingStore } from './delegating-store';
import { OutboxFile, type KeptNoiseRecord, type OutboxEntry, type OutboxWrite, type OutboxWriter } from './outbox-file';
import { RunMirror } from './run-mirror';

export interface OutboxOptions {
  /** The outbox file (outbox-path.ts chooses it from the store's address). */
  path: string;
  /** How often the sender tries the server again (ms). */
  retryIntervalMs?: number;
  /** How long close() waits for kept writes to be sent before leaving them for the next open (ms). */
  flushOnCloseMs?: number;
  /** Plain lines for the person at the bench (cut off, back, kept on close). */
  log?: (line: string) => void;
  now?: () => string;
  /** Whether a process of this machine still exists (tests may replace it). */
  processAlive?: (pid: number) => boolean;
}

type Inner = RolloffStore;

/** The owner condition a kept write was made under, if any. */
function ownerCondition(write: { asOwner?: string }): OwnerCondition | undefined {
  return write.asOwner === undefined ? undefined : { asOwner: write.asOwner };
}

function processExists(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code !== 'ESRCH';
  }
}

const unreachable = (error: unknown): boolean => error instanceof StoreUnreachableError;

export class OutboxStore extends DelegatingStore {
  readonly outboxPath: string;
  private readonly outbox: OutboxFile;
  private readonly writer: OutboxWriter;
  private readonly mirrors = new Map<number, RunMirror>();
  private readonly designs = new Map<number, DesignRecord>();
  private readonly builds = new Map<number, BuildRecord>();
  /** When the server first answered again, per run cut off (the end of its offline period). */
  private readonly backAt = new Map<number, string>();
  private readonly options: Required<Omit<OutboxOptions, 'path'>>;
  private sending: Promise<void> | undefined;
  private retry: NodeJS.Timeout | undefined;
  private cutOffSaid = false;
  private closed = false;

  private constructor(inner: Inner, outbox: OutboxFile, options: OutboxOptions) {
    super(inner);
    this.outbox = outbox;
    this.outboxPath = options.path;
    this.writer = { ownerId: `${hostname()}:${process.pid}:${randomBytes(6).toString('hex')}`, pid: process.pid };
    this.options = {
      retryIntervalMs: options.retryIntervalMs ?? 1000,
      flushOnCloseMs: options.flushOnCloseMs ?? 5000,
      log: options.log ?? ((line) => process.stderr.write(`${line}\n`)),
      now: options.now ?? (() => new Date().toISOString()),
      processAlive: options.processAlive ?? processExists,
    };
  }

  /** Opens the outbox beside the server store; writes left by a process of this bench that is gone are sent from here. */
  static open(inner: Inner, options: OutboxOptions): OutboxStore {
    const store = new OutboxStore(inner, OutboxFile.open(options.path), options);
    for (const owner of store.outbox.ownersOf()) store.adoptIfGone(owner);
    if (store.outbox.pendingOf(store.writer.ownerId) > 0 || store.outbox.offlineRunsOf(store.writer.ownerId).length > 0) {
      store.options.log(`sending what an earlier process of this bench kept in its outbox (${options.path})`);
      store.send();
    }
    return store;
  }

  /** How many of this process's writes wait for the server. */
  pendingWrites(): number {
    return this.outbox.pendingOf(this.writer.ownerId);
  }

  private now(): string {
    return this.options.now();
  }

  private adoptIfGone(owner: OutboxWriter): boolean {
    if (owner.ownerId === this.writer.ownerId) return false;
    if (owner.pid === process.pid || this.options.processAlive(owner.pid)) return false;
    this.outbox.adopt(owner.ownerId, this.writer);
    return true;
  }

  // ── writes of a driven run: straight to the server, else into the outbox ──

  /**
   * `direct` sends the write; `local` gives the caller its answer when the
   * write was kept instead (it may throw when none can be given).
   */
  private async write<T>(runId: number, write: OutboxWrite, direct: () => Promise<T>, local: () => T): Promise<T> {
    if (this.pendingWrites() === 0) {
      try {
        const result = await direct();
        await this.closeOfflinePeriodIfBack(runId);
        return result;
      } catch (error) {
        if (!unreachable(error)) throw error;
        this.cutOff(runId, error as Error);
      }
    }
    const answer = local();
    this.outbox.append(runId, this.writer, write);
    this.scheduleSend();
    return answer;
  }

  /** The server is away: note since when (once per run) and say so once. */
  private cutOff(runId: number, error: Error): void {
    this.outbox.markOffline(runId, this.now(), this.writer);
    this.backAt.delete(runId);
    if (!this.cutOffSaid) {
      this.cutOffSaid = true;
      this.options.log(`${error.message.split('\n')[0]}\nthe sweep goes on: its points are kept in ${this.outboxPath} and sent, in order, when the store is back`);
    }
    this.scheduleSend();
  }

  private mirrorOf(runId: number): RunMirror | undefined {
    return this.mirrors.get(runId);
  }

  /** A change to the run row itself: sent, or applied to the run's mirror while cut off; the mirror then follows what was stored. */
  private async writeRunChange(runId: number, write: OutboxWrite, direct: () => Promise<StoredRun>, applyToMirror: (mirror: RunMirror) => void): Promise<StoredRun> {
    const run = await this.write(runId, write, direct, () => {
      const mirror = this.requireMirror(runId, () => this.offlineError());
      applyToMirror(mirror);
      return mirror.storedRun();
    });
    this.mirrorOf(runId)?.refresh(run);
    return run;
  }

  private requireMirror(runId: number, error: () => Error): RunMirror {
    const mirror = this.mirrorOf(runId);
    if (!mirror) throw error();
    return mirror;
  }

  private offlineError(): StoreUnreachableError {
    return new StoreUnreachableError(this.location, 'the store cannot be reached, and this bench does not drive the run', 'Try again when the store is back.');
  }

  /** A point kept while cut off is sent later where its step is still free, whoever drives the run then (see the file comment). */
  override insertPoint: Inner['insertPoint'] = async (runId, point, condition) => {
    const kept = { ...point, measuredAt: point.measuredAt ?? this.now() };
    await this.write(runId, { kind: 'point', point: kept }, () => this.inner.insertPoint(runId, kept, condition), () => undefined);
    this.mirrorOf(runId)?.addPoint(kept);
  };

  /** A noise record is kept and sent as a point is: later, where its step is still free. */
  override insertNoiseRecord: Inner['insertNoiseRecord'] = async (runId, record, condition) => {
    const { psdV2PerHz, ...rest } = record;
    const kept: KeptNoiseRecord = { ...rest, measuredAt: record.measuredAt ?? this.now(), ...(psdV2PerHz === undefined ? {} : { psdV2PerHz: Array.from(psdV2PerHz) }) };
    await this.write(runId, { kind: 'noiseRecord', record: kept }, () => this.inner.insertNoiseRecord(runId, kept, condition), () => undefined);
    this.mirrorOf(runId)?.addNoiseRecord(kept);
  };

  /** An event kept while cut off keeps its owner condition, as a status does. */
  override appendEvent: Inner['appendEvent'] = async (runId, level, message, at, condition) => {
    const when = at ?? this.now();
    const event = await this.write(
      runId,
      { kind: 'event', level, message, at: when, ...(condition ? { asOwner: condition.asOwner } : {}) },
      () => this.inner.appendEvent(runId, level, message, when, condition),
      () => ({ at: when, level, message }),
    );
    this.mirrorOf(runId)?.addEvent(event);
    return event;
  };

  /** A status kept while cut off keeps its owner condition: sent late, it never overwrites the state of a process that took the run over. */
  override updateRunStatus: Inner['updateRunStatus'] = async (runId, status, at, condition) => {
    const when = at ?? this.now();
    return this.writeRunChange(
      runId,
      { kind: 'status', status, at: when, ...(condition ? { asOwner: condition.asOwner } : {}) },
      () => this.inner.updateRunStatus(runId, status, when, condition),
      (mirror) => mirror.setStatus(status, when),
    );
  };

  override setRunResults: Inner['setRunResults'] = async (runId, figures, verdict) => {
    return this.writeRunChange(runId, { kind: 'results', figures, verdict }, () => this.inner.setRunResults(runId, figures, verdict), (mirror) => mirror.setResults(figures, verdict));
  };

  override releaseRun: Inner['releaseRun'] = async (runId, ownerId) => {
    await this.write(runId, { kind: 'release', ownerId }, () => this.inner.releaseRun(runId, ownerId), () => undefined);
  };

  /** Cut off, the heartbeat cannot be renewed; the run stays this bench's (see the file comment), so true. */
  override renewRunHeartbeat: Inner['renewRunHeartbeat'] = async (runId, ownerId) => {
    try {
      const stillOurs = await this.inner.renewRunHeartbeat(runId, ownerId);
      await this.closeOfflinePeriodIfBack(runId);
      return stillOurs;
    } catch (error) {
      if (!unreachable(error)) throw error;
      this.cutOff(runId, error as Error);
      return true;
    }
  };

  // ── claiming: never over points waiting in this bench's outbox ─────────

  override claimRun: Inner['claimRun'] = (runId, claimant, staleAfterMs) =>
    this.claimUnlessKeptHere(runId, claimant.ownerId, () => this.inner.claimRun(runId, claimant, staleAfterMs));

  override claimRunOnFreeBench: Inner['claimRunOnFreeBench'] = (runId, claimant, staleAfterMs, benchOfUnnamedRun) =>
    this.claimUnlessKeptHere(runId, claimant.ownerId, () => this.inner.claimRunOnFreeBench(runId, claimant, staleAfterMs, benchOfUnnamedRun));

  /** A claim of the server's, refused while a live process of this bench keeps points of the run; mirrored once claimed. */
  private async claimUnlessKeptHere<R extends BenchClaimResult>(runId: number, claimantOwnerId: string, claim: () => Promise<R>): Promise<R | RunClaimResult> {
    for (const owner of this.outbox.ownersOf(runId)) {
      if (owner.ownerId === this.writer.ownerId || this.adoptIfGone(owner)) continue;
      const since = this.outbox.offlineSince(runId) ?? this.now();
      const waiting: RunOwnership = {
        ownerId: owner.ownerId, pid: owner.pid, host: hostname(),
        label: 'a process of this bench whose points of the run wait in its outbox for the store', since, heartbeatAt: this.now(),
      };
      return { claimed: false, ownership: waiting } satisfies RunClaimResult;
    }
    // What a gone process kept goes first, so the claimant continues after it.
    if (this.outbox.pendingOfRun(runId) > 0 || this.outbox.offlineSince(runId) !== undefined) await this.flush();
    const result = await claim();
    if (result.claimed) this.mirrors.set(runId, await this.mirrorFromServer(runId, claimantOwnerId));
    return result;
  }

  /** A run started here is driven from here: mirrored from the start. */
  override createOwnedRun: Inner['createOwnedRun'] = async (input, claimant, staleAfterMs) => {
    const result = await this.inner.createOwnedRun(input, claimant, staleAfterMs);
    if (result.created) this.mirrors.set(result.run.id, new RunMirror(result.run, await this.inner.loadPoints(result.run.id), [], claimant.ownerId));
    return result;
  };

  private async mirrorFromServer(runId: number, claimantOwnerId: string): Promise<RunMirror> {
    const run = await this.inner.getRun(runId);
    const noiseRecords = run.kind === 'noise' ? await this.inner.loadNoiseRecords(runId) : undefined;
    return new RunMirror(run, await this.inner.loadPoints(runId), await this.inner.listEvents(runId), claimantOwnerId, noiseRecords);
  }

  // ── reads: the mirror while the server is away or behind ──────────────

  /** The server's answer, or the mirror's when writes of the run wait or the server is away. */
  private async read<T>(runId: number, fromServer: () => Promise<T>, fromMirror: (mirror: RunMirror) => T): Promise<T> {
    const mirror = this.mirrorOf(runId);
    if (mirror && this.outbox.pendingOfRun(runId) > 0) return fromMirror(mirror);
    try {
      return await fromServer();
    } catch (error) {
      if (mirror && unreachable(error)) return fromMirror(mirror);
      throw error;
    }
  }

  override getRun: Inner['getRun'] = (runId) => this.read(runId, () => this.inner.getRun(runId), (mirror) => mirror.storedRun());
  override loadPoints: Inner['loadPoints'] = (runId) => this.read(runId, () => this.inner.loadPoints(runId), (mirror) => mirror.pointColumns());
  override loadNoiseRecords: Inner['loadNoiseRecords'] = (runId) => this.read(runId, () => this.inner.loadNoiseRecords(runId), (mirror) => mirror.noiseRecordColumns());
  override nextStep: Inner['nextStep'] = (runId) => this.read(runId, () => this.inner.nextStep(runId), (mirror) => mirror.nextStep());
  override listEvents: Inner['listEvents'] = (runId) => this.read(runId, () => this.inner.listEvents(runId), (mirror) => mirror.eventList());

  /** Designs and builds never change once stored: the last answer serves while the server is away. */
  override getDesign: Inner['getDesign'] = (designId) => this.cached(this.designs, designId, () => this.inner.getDesign(designId));
  override getBuild: Inner['getBuild'] = (buildId) => this.cached(this.builds, buildId, () => this.inner.getBuild(buildId));

  private async cached<T>(cache: Map<number, T>, id: number, load: () => Promise<T>): Promise<T> {
    try {
      const value = await load();
      cache.set(id, value);
      return value;
    } catch (error) {
      const known = cache.get(id);
      if (known !== undefined && unreachable(error)) return known;
      throw error;
    }
  }

  // ── sending what was kept ─────────────────────────────────────────────

  private scheduleSend(): void {
    if (this.retry || this.closed) return;
    this.retry = setTimeout(() => {
      this.retry = undefined;
      this.send();
    }, this.options.retryIntervalMs);
    this.retry.unref();
  }

  /** One sender at a time; if the server is still away it tries again later. */
  private send(): Promise<void> {
    this.sending ??= this.sendKept()
      .then((done) => {
        if (!done) this.scheduleSend();
      })
      .finally(() => {
        this.sending = undefined;
      });
    return this.sending;
  }

  /** Sends until nothing is kept (or throws the server's unreachability): before a claim, and at close. */
  private async flush(): Promise<void> {
    await this.sending;
    if (!(await this.sendKept())) throw new StoreUnreachableError(this.location, 'the store cannot be reached', 'Try again when the store is back; the kept points stay in the outbox until then.');
  }

  /** true when everything kept was sent and every offline period recorded; false when the server is still away. */
  private async sendKept(): Promise<boolean> {
    let sent = 0;
    // Writes made while these are sent queue behind them: go on until none is left.
    for (let entries = this.outbox.entriesOf(this.writer.ownerId); entries.length > 0; entries = this.outbox.entriesOf(this.writer.ownerId)) {
      for (const entry of entries) {
        try {
          await this.deliver(entry);
        } catch (error) {
          if (unreachable(error)) return false;
          // Not the network: the entry stays (nothing is lost) and the person is told what to look at.
          this.options.log(`the store refused a kept write of run ${entry.runId} (${(error as Error).message}); it stays in ${this.outboxPath}`);
          return false;
        }
        if (!this.backAt.has(entry.runId)) this.backAt.set(entry.runId, this.now());
        this.outbox.remove(entry.seq);
        sent++;
      }
    }
    if (sent > 0) this.options.log(`the store is back: ${sent} kept write(s) sent in order`);
    for (const { runId } of this.outbox.offlineRunsOf(this.writer.ownerId)) {
      try {
        await this.closeOfflinePeriodIfBack(runId);
      } catch (error) {
        if (unreachable(error)) return false;
        throw error;
      }
    }
    this.cutOffSaid = false;
    return true;
  }

  private async deliver(entry: OutboxEntry): Promise<void> {
    const { runId, write } = entry;
    switch (write.kind) {
      case 'point':
        try {
          await this.inner.insertPoint(runId, write.point);
        } catch (error) {
          // Stored already: its commit's reply was lost, or whoever took the run over measured the step. Once either way.
          if (!(error instanceof DuplicateStepError)) throw error;
        }
        return;
      case 'noiseRecord':
        try {
          await this.inner.insertNoiseRecord(runId, write.record);
        } catch (error) {
          if (!(error instanceof DuplicateStepError)) throw error; // as a point: stored once either way
        }
        return;
      case 'event':
        await this.sendUnlessTakenOver(runId, `line "${write.message}"`, () => this.inner.appendEvent(runId, write.level, write.message, write.at, ownerCondition(write)));
        return;
      case 'status':
        await this.sendUnlessTakenOver(runId, `change to "${write.status}"`, () => this.inner.updateRunStatus(runId, write.status, write.at, ownerCondition(write)));
        return;
      case 'results':
        await this.inner.setRunResults(runId, write.figures, write.verdict);
        return;
      case 'release':
        await this.inner.releaseRun(runId, write.ownerId);
        return;
    }
  }

  /** Sends a kept owner's write; taken over while this bench was cut off, the new owner's state stands (the warning event says so). */
  private async sendUnlessTakenOver(runId: number, what: string, send: () => Promise<unknown>): Promise<void> {
    try {
      await send();
    } catch (error) {
      if (!(error instanceof RunTakenOverError)) throw error;
      this.options.log(`run ${runId} was taken over while this bench was cut off: its kept ${what} is not sent`);
    }
  }

  /** Once nothing of the run waits and the server answers: its offline period, and a warning if the run was taken over meanwhile. */
  private async closeOfflinePeriodIfBack(runId: number): Promise<void> {
    const since = this.outbox.offlineSince(runId);
    if (since === undefined || this.outbox.pendingOfRun(runId) > 0) return;
    const to = this.backAt.get(runId) ?? this.now();
    const period = { from: since, to: to < since ? since : to };
    await this.inner.recordOfflinePeriod(runId, period);
    const claimant = this.mirrorOf(runId)?.claimantOwnerId;
    const owner = claimant === undefined ? undefined : await this.inner.getRunOwnership(runId);
    if (owner && owner.ownerId !== claimant) {
      await this.inner.appendEvent(runId, 'warning',
        `the bench ${hostname()} was cut off from the store from ${period.from} to ${period.to}; meanwhile the run was taken over by ${owner.label} ` +
          `(process ${owner.pid} on ${owner.host}). The points it measured while cut off were stored where their steps were still free.`);
    }
    this.outbox.endOffline(runId);
    this.backAt.delete(runId);
  }

  override close: Inner['close'] = async () => {
    if (this.closed) return;
    this.closed = true;
    clearTimeout(this.retry);
    this.retry = undefined;
    const deadline = Date.now() + this.options.flushOnCloseMs;
    while (Date.now() < deadline) {
      await this.sending;
      if (await this.sendKept()) break;
      await new Promise((resolve) => setTimeout(resolve, Math.min(this.options.retryIntervalMs, Math.max(0, deadline - Date.now()))));
    }
    const left = this.pendingWrites();
    if (left > 0) this.options.log(`${left} write(s) still wait in ${this.outboxPath}; any rolloff command on this bench with the same --db sends them when the store is back`);
    this.outbox.close();
    await this.inner.close();
  };
}
