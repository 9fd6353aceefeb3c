/**
 * The runs a service drives: start, pause, stop and resume, one run at a time on
 * this bench. Ownership across processes is the store's (run-ownership.ts): a
 * start creates its run already owned, a resume claims it with its bench checked,
 * a pause or stop of a run nobody drives claims it for the moment of the write.
 * How a run is swept and finished is run-launch.ts's and run-kinds.ts's.
 */
import { UserError, ValidationError } from '../errors';
import type { OwnerCondition, RolloffStore, RunClaimant, StoredRun } from '../store';
import { planSweep, toPlanSummary } from '../sweep/plan';
import { RunStateError } from '../sweep/runner/errors';
import type { BenchIdentity, ConnectRequest, NoisePlanSummary, NoiseRequest, ResumeRequest, RunEvent, RunStatus, RunSummary, ServiceEvents, SweepRequest } from '../contract/contract';
import { SOFTWARE_VERSION } from '../contract/version';
import { benchDescription } from '../contract/bench-text';
import { takeOverEventText, takeOverFrom } from '../contract/bench-take-over';
import type { BenchControl } from './bench-control';
import type { SweepPlanning } from './sweep-planning';
import type { RunHistory } from './history';
import { claimForResumeOrRefuse, claimOrRefuse, createOwnedRunOrRefuse, HEARTBEAT_INTERVAL_MS } from './run-ownership';
import { launchRun, type ActiveRun, type LaunchContext } from './run-launch';
import { finalizeRun } from './run-kinds';
import { planNoiseRunOn, startNoiseRunOn, type NoiseRunBench } from './noise-run';
import type { RolloffServiceOptions } from './service-options';

/** A resumed run and the step its sweep continues at. */
export interface ResumedRun {
  run: RunSummary;
  continuesAtStep: number;
}

export interface RunsContext {
  store: RolloffStore;
  bench: BenchControl;
  planning: SweepPlanning;
  history: Pick<RunHistory, 'listRuns' | 'summary'>;
  options: Pick<RolloffServiceOptions, 'maxRefinementPoints' | 'giveUpAfterS' | 'heartbeatIntervalMs' | 'instrumentSettleS' | 'meterIntegrationS'>;
  /** This bench's name (--bench, ROLLOFF_BENCH or the host name). */
  benchName: string;
  /** This service as a run owner (RunStore.claimRun). */
  claimant: RunClaimant;
  staleAfterMs: number;
  emit<E extends 'progress' | 'point' | 'runEvent'>(event: E, payload: ServiceEvents[E]): void;
}

export class Runs {
  private readonly active = new Map<number, ActiveRun>();
  /** True from a start's or resume's idle-bench check until its run is active or it failed: a second one cannot slip in between. */
  private startingRun = false;
  private readonly launchContext: LaunchContext;

  constructor(private readonly context: RunsContext) {
    this.launchContext = { ...context, logRunEvent: (runId, level, message) => this.logRunEvent(runId, level, message), active: this.active, noiseBench: () => this.noiseBench() };
  }

  /** True while this service drives the run. */
  drives(runId: number): boolean {
    return this.active.has(runId);
  }

  /** The runs this service drives now. */
  get drivenRunIds(): number[] {
    return [...this.active.keys()];
  }

  /** One sweep at a time: the instruments are shared. */
  requireIdleBench(): void {
    const running = [...this.active.keys()];
    if (running.length > 0) {
      throw new UserError(`run ${running[0]} is using the bench`, `Wait for it to finish, or pause/stop it first (rolloff resume continues it later).`);
    }
    if (this.startingRun) throw new UserError('another run is being started on this bench', 'Wait until it runs, then pause or stop it first if you need the bench (rolloff resume continues it later).');
  }

  /** Pauses every run this service drives (resumable) and waits for each to stop. */
  async pauseAll(): Promise<void> {
    for (const [runId, run] of this.active) {
      run.control.requestPause();
      await run.finished.catch(() => undefined);
      this.active.delete(runId);
    }
  }

  /** startRun with the service-only options (schedule id). */
  async startRunWith(request: SweepRequest, extra: { scheduleId?: number } = {}): Promise<RunSummary> {
    return this.holdingBench(async () => {
      await this.enterOwnBench();
      return this.startOnHeldBench(request, this.context.bench.requireMaxStimulus(), extra);
    });
  }

  async planNoiseRun(request: NoiseRequest): Promise<NoisePlanSummary> {
    return planNoiseRunOn(this.noiseBench(), request);
  }

  async startNoiseRun(request: NoiseRequest): Promise<RunSummary> {
    return this.holdingBench(async () => {
      await this.enterOwnBench();
      return startNoiseRunOn(this.noiseBench(), request);
    });
  }

  /** After resuming another bench's run, a new run is this bench's again, under this bench's limit. */
  private async enterOwnBench(): Promise<void> {
    const { bench, benchName } = this.context;
    const current = bench.limits.currentBench;
    if (current && current.name !== benchName) await bench.enterBench({ name: benchName, simulated: current.simulated });
  }

  /** What a noise run borrows from this service (app/service/noise-run.ts). */
  private noiseBench(): NoiseRunBench {
    const { store, bench, claimant, options } = this.context;
    return {
      store,
      clock: bench.clock,
      claimant,
      staleAfterMs: this.context.staleAfterMs,
      heartbeatIntervalMs: options.heartbeatIntervalMs ?? HEARTBEAT_INTERVAL_MS,
      giveUpAfterS: options.giveUpAfterS ?? 120,
      benchName: this.context.benchName,
      instrumentSettleS: options.instrumentSettleS ?? 0.01,
      meterApertureS: options.meterIntegrationS ?? 0.1,
      requireMaxStimulus: () => bench.requireMaxStimulus(),
      sourceImpedanceOhm: () => bench.generatorSourceOhm(),
      matchSimulatedBench: (buildId) => bench.matchSimulatedBench({ buildId }),
      requireInstruments: (request) => bench.requireInstrumentsFor(request),
      instrumentInfos: () => bench.instrumentInfos(),
      currentInstruments: () => bench.currentInstruments(),
      reconnectAll: () => bench.reconnectAll(),
      reopen: (role) => bench.reopen(role),
      track: (runId, run) => this.active.set(runId, run),
      untrack: (runId) => this.active.delete(runId),
      emit: (event, payload) => this.context.emit(event, payload),
      logRunEvent: (runId, level, message) => this.logRunEvent(runId, level, message),
      summaryOf: (runId) => this.context.history.summary(runId),
    };
  }

  async pauseRun(runId: number): Promise<RunSummary> {
    const { store } = this.context;
    const active = this.active.get(runId);
    if (active) {
      active.control.requestPause();
      await active.finished.catch(() => undefined);
    } else if ((await store.getRun(runId)).status === 'running') {
      // Left running by a crash: nothing is measuring it, so it is in effect paused.
      await this.asOwnerOf(runId, 'paused', (asOwner) => store.updateRunStatus(runId, 'paused', undefined, asOwner));
    }
    return this.context.history.summary(runId);
  }

  async stopRun(runId: number): Promise<RunSummary> {
    const { store } = this.context;
    const active = this.active.get(runId);
    if (active) {
      active.control.requestStop();
      await active.finished.catch(() => undefined);
    } else {
      const run = await store.getRun(runId);
      if (run.status === 'running' || run.status === 'paused' || run.status === 'planned') {
        await this.asOwnerOf(runId, 'stopped', async (asOwner) => {
          await store.updateRunStatus(runId, 'stopped', undefined, asOwner);
          await this.logRunEvent(runId, 'info', 'stopped by the user', asOwner);
        });
        await finalizeRun(this.launchContext, runId); // released already: a stopped run has no driver
      }
    }
    return this.context.history.summary(runId);
  }

  /**
   * resumeRun, with instruments at other addresses than the run was measured with (CLI --generator …), and
   * the step the sweep continues at, as the sweep itself took it: read again afterwards, the store may
   * already hold the resumed sweep's first points.
   */
  async resumeRunWith(runId: number, extra: ResumeRequest & { instruments?: ConnectRequest[] } = {}): Promise<ResumedRun> {
    const run = await this.context.store.getRun(runId);
    if (this.active.has(runId)) throw new RunStateError(runId, 'is already running');
    // Another bench's run only with its bench named again: a take-over is never given by accident.
    const fromBench = takeOverFrom(run, this.context.benchName, extra.takeOverFromBench);
    return this.holdingBench(() => this.resumeOnHeldBench(run, extra.instruments ?? [], fromBench));
  }

  /** Resolves when a run started or resumed by this service leaves the running state. */
  async waitForRun(runId: number): Promise<RunStatus> {
    const active = this.active.get(runId);
    if (!active) return (await this.context.store.getRun(runId)).status;
    return active.finished;
  }

  /**
   * Runs left running or paused that nobody drives (no owner, a stale heartbeat,
   * or an owner process gone on this host, killed a moment ago): offered for resume.
   */
  async interruptedRuns(): Promise<RunSummary[]> {
    const left: RunSummary[] = [];
    for (const status of ['running', 'paused'] as const) left.push(...(await this.context.history.listRuns({ status })));
    return left.filter((run) => !run.owner?.live && !this.active.has(run.id)).sort((a, b) => a.id - b.id);
  }

  /**
   * Holds the bench for one start or resume from its idle check until its run is
   * active, so two in this service never both pass the check; across processes
   * the store's createOwnedRun (or claimRunOnFreeBench) decides.
   */
  private async holdingBench<T>(start: () => Promise<T>): Promise<T> {
    this.requireIdleBench();
    this.startingRun = true;
    try {
      return await start();
    } finally {
      this.startingRun = false;
    }
  }

  private async startOnHeldBench(request: SweepRequest, maxStimulusVpp: number, extra: { scheduleId?: number }): Promise<RunSummary> {
    const { bench, planning, store, claimant } = this.context;
    if (request.through && (request.kind !== 'ac' || request.measurement !== 'meter')) {
      throw new ValidationError('through', 'a through-calibration is an AC meter run', 'Use measurement "meter" (rolloff sweep --through sets it).');
    }
    await bench.matchSimulatedBench(request);
    bench.requireInstrumentsFor(request);
    const plan = planSweep(await planning.planInput(request, maxStimulusVpp));
    // One store transaction: the run exists only if no other run holds this bench, and is ours from its first moment.
    const run = await createOwnedRunOrRefuse(store, {
      buildId: request.buildId,
      kind: request.kind,
      request: { ...request, maxStimulusVpp },
      plan: toPlanSummary(plan),
      softwareVersion: SOFTWARE_VERSION,
      bench: bench.instrumentInfos(),
      operator: request.operator,
      notes: request.notes,
      simulated: bench.instrumentInfos().some((i) => i.simulated),
      scheduleId: extra.scheduleId ?? null,
      benchName: this.context.benchName,
    }, claimant, this.context.staleAfterMs);
    try {
      for (const warning of plan.warnings) await this.logRunEvent(run.id, 'warning', `plan: ${warning}`, { asOwner: claimant.ownerId });
      await launchRun(this.launchContext, run.id);
    } catch (error) {
      // Not started after all: give the bench back now rather than when the heartbeat goes stale.
      if (!this.active.has(run.id)) await store.releaseRun(run.id, claimant.ownerId).catch(() => undefined);
      throw error;
    }
    return this.context.history.summary(run.id);
  }

  private async resumeOnHeldBench(run: StoredRun, instruments: ConnectRequest[], takenOverFromBench: string | undefined): Promise<ResumedRun> {
    const { bench, benchName, store, claimant } = this.context;
    const runId = run.id;
    if (run.status === 'done') throw new RunStateError(runId, 'is finished; nothing to resume', 'Start a new run of the same build instead.');
    // One store transaction: of two processes resuming a stale run, one wins, the other is told who; and a run
    // commands its bench's instruments only while no other run of that bench is driven.
    // Runs stored before benches had names were this machine's.
    await claimForResumeOrRefuse(store, run, benchName, claimant, this.context.staleAfterMs);
    try {
      // The limit of the run's own bench, never the one recorded with the run (it may be older than the bench's setting).
      const runBench: BenchIdentity = { name: run.benchName || benchName, simulated: run.simulated };
      await bench.enterBench(runBench);
      const maxStimulusVpp = bench.requireMaxStimulus(`run ${runId} was measured on ${benchDescription(runBench)}, which has no maximum stimulus set`);
      // A fresh simulated bench of the run's build: the one it ran on may be gone with the process that crashed.
      // A real run never continues on the simulated bench: its instruments go, the run's (or the given) ones come.
      if (run.simulated) await bench.simulateBuild(run.buildId, runBench);
      else await bench.connectRealInstruments(instruments, run.bench);
      bench.requireInstrumentsFor(run.request);
      const asOwner = { asOwner: claimant.ownerId };
      if (takenOverFromBench !== undefined) await this.logRunEvent(runId, 'warning', takeOverEventText(takenOverFromBench, benchName), asOwner);
      await this.logRunEvent(runId, 'info', `resumed (maximum stimulus ${maxStimulusVpp} Vpp of ${benchDescription(runBench)})`, asOwner);
      const continuesAtStep = await launchRun(this.launchContext, runId);
      return { run: await this.context.history.summary(runId), continuesAtStep };
    } catch (error) {
      // Not resumed after all (no stimulus limit, an instrument missing): leave the run to whoever tries next.
      if (!this.active.has(runId)) await store.releaseRun(runId, claimant.ownerId).catch(() => undefined);
      throw error;
    }
  }

  /**
   * Changes a run nobody drives as its owner for a moment: claimed (refused,
   * naming the owner, while another process drives it), written only while the
   * claim holds, then given back. A process resuming it at the same moment
   * either wins the claim or finds this change made.
   */
  private async asOwnerOf(runId: number, action: string, write: (asOwner: OwnerCondition) => Promise<unknown>): Promise<void> {
    const { store, claimant } = this.context;
    await claimOrRefuse(store, runId, claimant, this.context.staleAfterMs, action);
    try {
      await write({ asOwner: claimant.ownerId });
    } finally {
      await store.releaseRun(runId, claimant.ownerId).catch(() => undefined);
    }
  }

  /**
   * Stores and announces one line of a run's log. Given `condition`, the line is written only while this
   * process still owns the run (as its points are): a bench that lost the run to a take-over adds nothing.
   * Without it (the analysis after a run, which runs once the run is released), it is written as it is.
   */
  private async logRunEvent(runId: number, level: RunEvent['level'], message: string, condition?: OwnerCondition): Promise<void> {
    const event = await this.context.store.appendEvent(runId, level, message, undefined, condition);
    this.context.emit('runEvent', { runId, ...event });
  }
}
