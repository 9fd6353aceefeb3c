/**
 * The one service: implements RolloffApi for the window hosts and the CLI.
 * It owns the store, the connected instruments, the simulated bench and the
 * running sweeps, and pushes ServiceEvents to whoever listens.
 */
import { UserError, ValidationError } from '../errors';
import { identityKey, RunTakenOverError, type OwnerCondition, type RolloffStore, type RunOwnership, type StoredRun } from '../store';
import { openInstrument, builtInProfiles, checkProfile, loadProfiles, realClock, DEFAULT_PROFILE_ID, resolveBenchName, sameBench, type BenchClock, type OpenedInstrument, type ProfileFor } from '../bench';
import { TrafficLog } from '../scpi/traffic-log';
import { listPorts } from '../scpi/ports';
import { type Design, parseDesign, solveAc, TEMPLATES, makeDesignFromTemplate, withActualValues, throughDesign } from '../circuit';
import { planSweep, planStepsAt, refinementFrequencies, toPlanSummary, type PlanInput, type PlanInstruments } from '../sweep/plan';
import { RunControl } from '../sweep/runner/control';
import { runSweep } from '../sweep/runner/run-sweep';
import { scopeMeasurer } from '../sweep/runner/measure-scope';
import { meterMeasurer } from '../sweep/runner/measure-meter';
import { dcMeasurer } from '../sweep/runner/measure-dc';
import { RunStateError } from '../sweep/runner/errors';
import type { StepMeasurer, StepSetting, SweepInstruments } from '../sweep/runner/types';
import { driftSummary, type DriftRow } from '../analysis';
import { INSTRUMENT_ROLES as ROLES, PointFlag } from '../contract/contract';
import type {
  RunFigures, BenchIdentity, BenchStatus, BuildRecord, Comparison, ConnectRequest, ProfileCheckReport, ProfileCheckRequest, DesignRecord, ExportedRecord, InstrumentInfo, InstrumentRole,
  PointColumns, PortListing, ProfileSummary, RecordFormat, ResumeRequest, RolloffApi, RolloffClient, RunFilter, RunStatus, RunSummary, ServiceEventName,
  ServiceEvents, SweepPlanSummary, SweepRequest, TemplateInfo,
} from '../contract/contract';
import { ServiceEventBus } from '../contract/event-bus';
import type { StoreChangeFeed } from '../store/types';
import { followLabChanges } from './lab-changes';
import { planTheoryFor } from './plan-theory';
import { buildDesign, designOf } from '../read-model/stored-design';
import { analyzeRun, designForBuild, designForRun, diodeOfRun, runDetail, summaryOf } from '../read-model/run-detail';
import { compareDetails } from '../read-model/compare';
import { SOFTWARE_VERSION } from '../contract/version';
import { startSimulatedBenchFor, type SimulatedBenchHandle, type SimulatedBenchSettings } from './simulated-bench';
import { exportRecordFor } from './export';
import { StimulusLimits } from './stimulus-limits';
import { benchDescription } from '../contract/bench-text';
import { takeOverEventText, takeOverFrom } from '../contract/bench-take-over';
import { claimForResumeOrRefuse, claimOrRefuse, createOwnedRunOrRefuse, HEARTBEAT_INTERVAL_MS, runOwnerOf, STALE_AFTER_MS, thisProcessClaimant } from './run-ownership';

export interface RolloffServiceOptions {
  /**
   * The user's ceiling on generator output (--max-amplitude): saved as the
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

/** What a schedule produced: its runs and how their figures drifted. */
export interface ScheduleReport {
  scheduleId: number;
  runs: Array<{ runId: number; status: RunStatus; startedAt: string | null; figures: RunFigures | null }>;
  drift: DriftRow[];
}

interface ConnectedInstrument {
  opened: OpenedInstrument;
  request: ConnectRequest;
  simulated: boolean;
}

interface ActiveRun {
  control: RunControl;
  finished: Promise<RunStatus>;
}

/** Fixed default when no generator is connected yet (planning preview): the generic profile's limits. */
function genericGeneratorLimits(): PlanInstruments['generator'] {
  const profile = builtInProfiles().find((p) => p.role === 'generator');
  if (profile?.role === 'generator') return profile.generator.limits;
  return { minFrequencyHz: 1e-3, maxFrequencyHz: 1e7, maxAmplitudeVpp: 20, minAmplitudeVpp: 0 };
}


export class RolloffService implements RolloffApi {
  readonly store: RolloffStore;
  readonly events = new ServiceEventBus();
  private readonly options: RolloffServiceOptions;
  private readonly instruments = new Map<InstrumentRole, ConnectedInstrument>();
  /** What each role should be connected to, kept while a link is down so reconnecting knows where. */
  private readonly wanted = new Map<InstrumentRole, { request: ConnectRequest; simulated: boolean }>();
  private readonly active = new Map<number, ActiveRun>();
  /** True from a start's or resume's idle-bench check until its run is active or it failed: a second one cannot slip in between. */
  private startingRun = false;
  private simulatedBenchHandle: (SimulatedBenchHandle & { designName: string; key: string }) | undefined;
  /** The maximum stimulus of the bench in force (per bench, in the store). */
  private readonly limits: StimulusLimits;
  /** This bench's name (--bench, ROLLOFF_BENCH or the host name). */
  readonly benchName: string;
  /** This service as a run owner (RunStore.claimRun). */
  private readonly claimant;
  private readonly staleAfterMs: number;
  /** A recorded owner as the contract shows it: live unless its heartbeat is older than staleAfterMs or its process is gone here. */
  private readonly judgeOwner = (ownership: RunOwnership) => runOwnerOf(ownership, this.staleAfterMs);

  private labFeed: StoreChangeFeed | undefined;

  private constructor(store: RolloffStore, options: RolloffServiceOptions) {
    this.store = store;
    this.options = options;
    this.claimant = thisProcessClaimant(options.ownerLabel ?? 'rolloff');
    this.staleAfterMs = options.staleAfterMs ?? STALE_AFTER_MS;
    this.benchName = options.benchName ?? resolveBenchName(undefined);
    this.limits = new StimulusLimits(store, options.maxStimulusVpp);
  }

  /** The service over an open store, which it owns from now on (close() closes it). */
  static async open(store: RolloffStore, options: RolloffServiceOptions = {}): Promise<RolloffService> {
    const service = new RolloffService(store, options);
    if (options.startOn) await service.limits.enter({ name: service.benchName, simulated: options.startOn === 'simulated bench' });
    if (options.followLab) {
      const feedOptions = options.followLab === true ? {} : options.followLab;
      service.labFeed = await followLabChanges({ store, drivesRun: (runId) => service.active.has(runId), emit: (event, payload) => service.events.emit(event, payload), ...feedOptions });
    }
    return service;
  }

  /** How sweeps of other processes reach this service: pushed by the server, polled, or not at all (a store of one process). */
  get labChanges(): 'listen' | 'poll' | 'off' {
    return this.labFeed?.mode ?? 'off';
  }

  /** Subscribe to one event; returns the unsubscribe function (RolloffClient.on). */
  on<E extends ServiceEventName>(event: E, listener: (payload: ServiceEvents[E]) => void): () => void {
    return this.events.on(event, listener);
  }

  /** The service as a client object (the CLI and in-process hosts). */
  asClient(): RolloffClient {
    return this as unknown as RolloffClient;
  }

  /** The bench clock: scaled for a simulated bench so settling and integration run faster, real otherwise. */
  get clock(): BenchClock {
    return this.simulatedBenchHandle?.clock ?? this.options.clock ?? realClock;
  }

  /** The maximum stimulus in force (Vpp), or undefined while none is set for the bench. */
  get maxStimulus(): number | undefined {
    return this.limits.maxStimulusVpp;
  }

  /** The limit in force with its bench and when it was set (reused or set now); undefined while none is saved. */
  get stimulusLimit() {
    return this.limits.current;
  }

  /** The bench whose settings are in force, once known. */
  get bench(): BenchIdentity | undefined {
    return this.limits.currentBench;
  }

  /** Stops sweeps (paused, resumable), closes instruments, the simulated bench and the store. */
  async close(): Promise<void> {
    for (const [runId, run] of this.active) {
      run.control.requestPause();
      await run.finished.catch(() => undefined);
      this.active.delete(runId);
    }
    for (const role of ROLES) await this.disconnect(role);
    await this.simulatedBenchHandle?.stop();
    this.simulatedBenchHandle = undefined;
    await this.labFeed?.stop();
    await this.store.close();
  }

  // ── Bench ──────────────────────────────────────────────────────────────

  async listPorts(): Promise<PortListing> {
    return listPorts();
  }

  async listProfiles(): Promise<ProfileSummary[]> {
    const builtIn = new Set(builtInProfiles().map((p) => p.id));
    return loadProfiles(this.options.profileFolder).map((p) => ({ id: p.id, role: p.role, description: p.description, builtIn: builtIn.has(p.id) }));
  }

  async benchStatus(): Promise<BenchStatus> {
    return {
      instruments: this.instrumentInfos(),
      maxStimulusVpp: this.limits.maxStimulusVpp ?? 0,
      ...(this.limits.currentBench ? { bench: this.limits.currentBench } : {}),
      ...(this.limits.current ? { maxStimulusLimit: this.limits.current } : {}),
      simulatedBench: this.simulatedBenchHandle ? { addresses: this.simulatedBenchHandle.addresses, designName: this.simulatedBenchHandle.designName } : undefined,
    };
  }

  async connect(request: ConnectRequest): Promise<InstrumentInfo> {
    this.requireIdleBench();
    // An instrument at an address is a real one, whatever it answers to *IDN?: this bench's real-instrument limit applies.
    await this.enterBench({ name: this.benchName, simulated: false });
    const info = await this.connectRole(request, false);
    this.events.emit('bench', await this.benchStatus());
    return info;
  }

  async checkProfile(request: ProfileCheckRequest): Promise<ProfileCheckReport> {
    this.requireIdleBench();
    const profile = loadProfiles(this.options.profileFolder).find((p) => p.id === request.profileId);
    if (!profile) throw new ValidationError('profileId', `no profile "${request.profileId}"`, 'Pick one of the profiles listed for the role.');
    const busy = [...this.instruments.values()].find((c) => c.opened.address === request.address);
    if (busy) throw new ValidationError('address', `${request.address} is connected now`, 'Disconnect it first: the check opens its own link and switches a generator\'s output off.');
    return checkProfile(request.address, profile, { maxStimulusVpp: this.limits.maxStimulusVpp });
  }

  async disconnect(role: InstrumentRole): Promise<void> {
    if (this.instruments.has(role)) this.requireIdleBench();
    if (await this.disconnectRole(role)) this.events.emit('bench', await this.benchStatus());
  }

  async startSimulatedBench(designId: number): Promise<BenchStatus> {
    const record = await this.store.getDesign(designId);
    await this.startSimulatedBenchForDesign(designOf(record), record.name, `design:${designId}`);
    return this.benchStatus();
  }

  /** A simulated bench simulating one build's actual circuit (its measured part values), connected in all three roles. */
  async startSimulatedBenchForBuild(buildId: number): Promise<BenchStatus> {
    await this.simulateBuild(buildId);
    return this.benchStatus();
  }

  /**
   * `forStart`: asked by the start or resume that holds the bench (startingRun), which checked it was idle.
   * `bench`: whose limit applies (a resumed run's bench); else this bench's simulated one.
   */
  private async simulateBuild(buildId: number, forStart = false, bench?: BenchIdentity): Promise<void> {
    const build = await this.store.getBuild(buildId);
    const designRecord = await this.store.getDesign(build.designId);
    await this.startSimulatedBenchForDesign(buildDesign(designRecord, build), `${designRecord.name} — build ${build.label}`, `build:${buildId}`, forStart, bench);
  }

  /** Fault injection on the running simulated bench (tests, demos). */
  get simulatedBench(): SimulatedBenchHandle | undefined {
    return this.simulatedBenchHandle;
  }

  /** Saves the limit as the setting of the bench in force (before any bench is known: of the first one used). */
  async setMaxStimulus(maxStimulusVpp: number): Promise<BenchStatus> {
    this.requireIdleBench();
    await this.limits.set(maxStimulusVpp);
    await this.applyLimitToGenerator();
    const status = await this.benchStatus();
    this.events.emit('bench', status);
    return status;
  }

  // ── Designs and builds ─────────────────────────────────────────────────

  async listTemplates(): Promise<TemplateInfo[]> {
    return TEMPLATES;
  }

  async makeTemplate(templateId: string, parameters: Record<string, number>): Promise<unknown> {
    return makeDesignFromTemplate(templateId, parameters);
  }

  async saveDesign(design: unknown): Promise<DesignRecord> {
    const parsed = parseDesign(design, 'design');
    return this.store.saveDesign({ name: parsed.name, design });
  }

  async listDesigns(): Promise<DesignRecord[]> {
    return this.store.listDesigns();
  }

  async createBuild(build: { designId: number; label: string; notes: string; actualValues: Record<string, number> }): Promise<BuildRecord> {
    const design = await this.store.getDesign(build.designId);
    // Refuses unknown part ids or bad values before anything is stored.
    withActualValues(designOf(design), build.actualValues);
    return this.store.createBuild(build);
  }

  async listBuilds(designId?: number): Promise<BuildRecord[]> {
    return this.store.listBuilds(designId);
  }

  async getBuild(buildId: number): Promise<BuildRecord> {
    return this.store.getBuild(buildId);
  }

  /** Where the runs are stored (the --db value: a file path or a database URL). */
  get databaseLocation(): string {
    return this.store.location;
  }

  // ── Sweeps ─────────────────────────────────────────────────────────────

  async planSweep(request: SweepRequest): Promise<SweepPlanSummary> {
    return toPlanSummary(planSweep(await this.planInput(request, this.requireMaxStimulus())));
  }

  /**
   * The plan for a design file and measured values that are not stored yet:
   * lets a caller refuse a bad request before storing anything.
   */
  planForUnsavedBuild(request: SweepRequest, design: unknown, actualValues: Record<string, number>): SweepPlanSummary {
    const built = withActualValues(designOf({ id: 0, name: '', design, createdAt: '' }), actualValues);
    return toPlanSummary(planSweep(this.planInputFor(request, this.requireMaxStimulus(), request.through ? throughDesign(built) : built)));
  }

  async startRun(request: SweepRequest): Promise<RunSummary> {
    return this.startRunWith(request);
  }

  /** startRun with the service-only options (schedule id). */
  async startRunWith(request: SweepRequest, extra: { scheduleId?: number } = {}): Promise<RunSummary> {
    return this.holdingBench(async () => {
      // After resuming another bench's run, a new run is this bench's again, under this bench's limit.
      const bench = this.limits.currentBench;
      if (bench && bench.name !== this.benchName) await this.enterBench({ name: this.benchName, simulated: bench.simulated });
      return this.startOnHeldBench(request, this.requireMaxStimulus(), extra);
    });
  }

  /**
   * Holds the bench for one start or resume from its idle check until its run is
   * active, so two in this service never both pass the check; across processes
   * the store's createOwnedRun (or claimRun) decides.
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
    if (request.through && (request.kind !== 'ac' || request.measurement !== 'meter')) {
      throw new ValidationError('through', 'a through-calibration is an AC meter run', 'Use measurement "meter" (rolloff sweep --through sets it).');
    }
    await this.matchSimulatedBench(request);
    this.requireInstrumentsFor(request);
    const plan = planSweep(await this.planInput(request, maxStimulusVpp));
    // One store transaction: the run exists only if no other run holds this bench, and is ours from its first moment.
    const run = await createOwnedRunOrRefuse(this.store, {
      buildId: request.buildId,
      kind: request.kind,
      request: { ...request, maxStimulusVpp },
      plan: toPlanSummary(plan),
      softwareVersion: SOFTWARE_VERSION,
      bench: this.instrumentInfos(),
      operator: request.operator,
      notes: request.notes,
      simulated: this.instrumentInfos().some((i) => i.simulated),
      scheduleId: extra.scheduleId ?? null,
      benchName: this.benchName,
    }, this.claimant, this.staleAfterMs);
    try {
      for (const warning of plan.warnings) await this.logRunEvent(run.id, 'warning', `plan: ${warning}`);
      await this.launch(run.id);
    } catch (error) {
      // Not started after all: give the bench back now rather than when the heartbeat goes stale.
      if (!this.active.has(run.id)) await this.store.releaseRun(run.id, this.claimant.ownerId).catch(() => undefined);
      throw error;
    }
    return this.summaryOf(run.id);
  }

  async pauseRun(runId: number): Promise<RunSummary> {
    const active = this.active.get(runId);
    if (active) {
      active.control.requestPause();
      await active.finished.catch(() => undefined);
    } else if ((await this.store.getRun(runId)).status === 'running') {
      // Left running by a crash: nothing is measuring it, so it is in effect paused.
      await this.asOwnerOf(runId, 'paused', (asOwner) => this.store.updateRunStatus(runId, 'paused', undefined, asOwner));
    }
    return this.summaryOf(runId);
  }

  async stopRun(runId: number): Promise<RunSummary> {
    const active = this.active.get(runId);
    if (active) {
      active.control.requestStop();
      await active.finished.catch(() => undefined);
    } else {
      const run = await this.store.getRun(runId);
      if (run.status === 'running' || run.status === 'paused' || run.status === 'planned') {
        await this.asOwnerOf(runId, 'stopped', async (asOwner) => {
          await this.store.updateRunStatus(runId, 'stopped', undefined, asOwner);
          await this.logRunEvent(runId, 'info', 'stopped by the user');
        });
        await this.finalize(runId); // released already: a stopped run has no driver
      }
    }
    return this.summaryOf(runId);
  }

  /**
   * Continues a run at its next step. A simulated run gets a fresh simulated
   * bench of its build; a real one reconnects to the addresses it was measured
   * with unless instruments are already connected.
   */
  async resumeRun(runId: number, request: ResumeRequest = {}): Promise<RunSummary> {
    return this.resumeRunWith(runId, request);
  }

  /** resumeRun, with instruments at other addresses than the run was measured with (CLI --generator …). */
  async resumeRunWith(runId: number, extra: ResumeRequest & { instruments?: ConnectRequest[] } = {}): Promise<RunSummary> {
    const run = await this.store.getRun(runId);
    if (this.active.has(runId)) throw new RunStateError(runId, 'is already running');
    // Another bench's run only with its bench named again: a take-over is never given by accident.
    const fromBench = takeOverFrom(run, this.benchName, extra.takeOverFromBench);
    return this.holdingBench(() => this.resumeOnHeldBench(run, extra.instruments ?? [], fromBench));
  }

  private async resumeOnHeldBench(run: StoredRun, instruments: ConnectRequest[], takenOverFromBench: string | undefined): Promise<RunSummary> {
    const runId = run.id;
    if (run.status === 'done') throw new RunStateError(runId, 'is finished; nothing to resume', 'Start a new run of the same build instead.');
    // One store transaction: of two processes resuming a stale run, one wins, the other is told who; and a run
    // commands its bench's instruments only while no other run of that bench is driven.
    // Runs stored before benches had names were this machine's.
    await claimForResumeOrRefuse(this.store, run, this.benchName, this.claimant, this.staleAfterMs);
    try {
      // The limit of the run's own bench, never the one recorded with the run (it may be older than the bench's setting).
      const runBench: BenchIdentity = { name: run.benchName || this.benchName, simulated: run.simulated };
      await this.enterBench(runBench);
      const maxStimulusVpp = this.requireMaxStimulus(`run ${runId} was measured on ${benchDescription(runBench)}, which has no maximum stimulus set`);
      if (run.simulated) {
        // A fresh simulated bench of the run's build: the one it ran on may be gone with the process that crashed.
        await this.simulateBuild(run.buildId, true, runBench);
      } else {
        // A real run never continues on the simulated bench: its instruments go, the run's (or the given) ones come.
        for (const role of ROLES) if (this.wanted.get(role)?.simulated) await this.disconnectRole(role);
        for (const request of instruments) await this.connectRole(request, false);
        for (const instrument of run.bench) {
          if (!this.instruments.has(instrument.role)) await this.connectRole({ role: instrument.role, address: instrument.address, profileId: instrument.profileId }, false);
        }
      }
      this.requireInstrumentsFor(run.request);
      if (takenOverFromBench !== undefined) await this.logRunEvent(runId, 'warning', takeOverEventText(takenOverFromBench, this.benchName));
      await this.logRunEvent(runId, 'info', `resumed (maximum stimulus ${maxStimulusVpp} Vpp of ${benchDescription(runBench)})`);
      await this.launch(runId);
    } catch (error) {
      // Not resumed after all (no stimulus limit, an instrument missing): leave the run to whoever tries next.
      if (!this.active.has(runId)) await this.store.releaseRun(runId, this.claimant.ownerId).catch(() => undefined);
      throw error;
    }
    return this.summaryOf(runId);
  }

  /** Resolves when a run started or resumed by this service leaves the running state. */
  async waitForRun(runId: number): Promise<RunStatus> {
    const active = this.active.get(runId);
    if (!active) return (await this.store.getRun(runId)).status;
    return active.finished;
  }

  /**
   * Runs left running or paused that nobody drives (no owner, a stale heartbeat,
   * or an owner process gone on this host, killed a moment ago): offered for resume.
   */
  async interruptedRuns(): Promise<RunSummary[]> {
    const left: RunSummary[] = [];
    for (const status of ['running', 'paused'] as const) left.push(...(await this.listRuns({ status })));
    return left.filter((run) => !run.owner?.live && !this.active.has(run.id)).sort((a, b) => a.id - b.id);
  }

  /**
   * Changes a run nobody drives as its owner for a moment: claimed (refused,
   * naming the owner, while another process drives it), written only while the
   * claim holds, then given back. A process resuming it at the same moment
   * either wins the claim or finds this change made.
   */
  private async asOwnerOf(runId: number, action: string, write: (asOwner: OwnerCondition) => Promise<unknown>): Promise<void> {
    await claimOrRefuse(this.store, runId, this.claimant, this.staleAfterMs, action);
    try {
      await write({ asOwner: this.claimant.ownerId });
    } finally {
      await this.store.releaseRun(runId, this.claimant.ownerId).catch(() => undefined);
    }
  }

  // ── History, Compare, Record ───────────────────────────────────────────

  /** Newest first, each with who drives it (RunSummary.owner: live or not, heartbeat age). */
  async listRuns(filter?: RunFilter): Promise<RunSummary[]> {
    return (await this.store.listRuns(filter ?? {})).map((run) => summaryOf(run, this.judgeOwner));
  }

  async getRun(runId: number) {
    return runDetail(this.store, runId, this.judgeOwner);
  }

  /** A run's summary, without the analysis getRun does. */
  async getRunSummary(runId: number): Promise<RunSummary> {
    return this.summaryOf(runId);
  }

  /** The step a resumed run continues at. */
  async nextStep(runId: number): Promise<number> {
    return this.store.nextStep(runId);
  }

  /** The build's diode model (log stage), for comparing a DC fit with theory. */
  async diodeOfRun(runId: number): Promise<{ n: number; isA: number; rsOhm: number } | undefined> {
    return diodeOfRun(this.store, runId);
  }

  async compareRuns(runIds: number[], reference: number | 'theory'): Promise<Comparison> {
    if (runIds.length === 0) throw new ValidationError('runIds', 'is empty', 'Give at least one run.');
    return compareDetails(await Promise.all(runIds.map((id) => runDetail(this.store, id, this.judgeOwner))), reference);
  }

  async exportRecord(runIds: number[], format: RecordFormat, reference: number | 'theory' = 'theory'): Promise<ExportedRecord> {
    if (runIds.length === 0) throw new ValidationError('runIds', 'is empty', 'Give at least one run.');
    return exportRecordFor(this, runIds, format, reference);
  }

  // ── Schedules (CLI; each repetition is an ordinary run of the same build) ──

  /**
   * Repeats a sweep every `everyMinutes` (bench time: scaled on a simulated bench),
   * `count` times or until the wall-clock time `until`, whichever comes first.
   * Resolves with every run and the drift of the figures across them.
   */
  async runSchedule(
    input: { request: SweepRequest; everyMinutes: number; count?: number; until?: string },
    /** Called as each repetition starts, with the bench time (s) its slot began. */
    onRun?: (summary: RunSummary, index: number, slotS: number) => void,
  ): Promise<ScheduleReport> {
    const { request, everyMinutes } = input;
    if (!(Number.isFinite(everyMinutes) && everyMinutes > 0)) throw new ValidationError('every', `${everyMinutes} min is not a positive interval`);
    if (input.count === undefined && input.until === undefined) throw new ValidationError('count/until', 'give a number of runs or an end time', 'e.g. --count 12, or --until 07:30.');
    if (input.count !== undefined && !(Number.isInteger(input.count) && input.count >= 1)) throw new ValidationError('count', `${input.count} is not a whole number ≥ 1`);
    const untilMs = input.until === undefined ? Infinity : Date.parse(input.until);
    if (Number.isNaN(untilMs)) throw new ValidationError('until', `"${input.until}" is not a time`, 'Give an ISO 8601 time, e.g. 2026-12-02T07:30.');
    if (untilMs <= Date.now()) throw new ValidationError('until', `${input.until} is already past`);
    const schedule = await this.store.createSchedule({ buildId: request.buildId, request, everyMinutes, count: input.count ?? null, until: input.until === undefined ? null : new Date(untilMs).toISOString() });
    const runIds: number[] = [];
    const clock = this.clock;
    for (let index = 0; ; index++) {
      const slotS = clock.nowS();
      const run = await this.startRunWith(request, { scheduleId: schedule.id });
      runIds.push(run.id);
      onRun?.(run, index, slotS);
      const status = await this.waitForRun(run.id).catch(() => 'failed' as const);
      if (status === 'paused' || status === 'stopped') break; // the user intervened: end the schedule too
      if (input.count !== undefined && runIds.length >= input.count) break;
      const nextSlotS = slotS + everyMinutes * 60;
      if (Date.now() + ((nextSlotS - clock.nowS()) / clock.timeScale) * 1000 > untilMs) break;
      await clock.sleepS(Math.max(0, nextSlotS - clock.nowS()));
    }
    const runs = await Promise.all(runIds.map((id) => this.store.getRun(id)));
    return {
      scheduleId: schedule.id,
      runs: runs.map((r) => ({ runId: r.id, status: r.status, startedAt: r.startedAt, figures: r.figures })),
      drift: driftSummary(runs.map((r) => r.figures ?? { minus3dbHz: [] })),
    };
  }

  // ── internals ──────────────────────────────────────────────────────────

  private async summaryOf(runId: number): Promise<RunSummary> {
    return summaryOf(await this.store.getRun(runId), this.judgeOwner);
  }

  /** One sweep at a time: the instruments are shared. */
  private requireIdleBench(): void {
    const running = [...this.active.keys()];
    if (running.length > 0) {
      throw new UserError(`run ${running[0]} is using the bench`, `Wait for it to finish, or pause/stop it first (rolloff resume continues it later).`);
    }
    if (this.startingRun) throw new UserError('another run is being started on this bench', 'Wait until it runs, then pause or stop it first if you need the bench (rolloff resume continues it later).');
  }

  private requireMaxStimulus(why?: string): number {
    const maxStimulusVpp = this.limits.maxStimulusVpp;
    if (maxStimulusVpp === undefined) {
      const bench = this.limits.currentBench;
      throw new ValidationError(
        'maximum stimulus',
        why ?? (bench ? `is not set for ${benchDescription(bench)}` : 'is not set'),
        'Set the largest peak-to-peak voltage the circuit may see: --max-amplitude VPP, or on the Bench view; it is saved for that bench.',
      );
    }
    return maxStimulusVpp;
  }

  /**
   * Makes `bench` the one whose settings are in force: its own stored limit (or
   * one given before any bench was known, saved for it now), or none. A connected
   * generator holds its ceiling from the moment it is opened, so it follows.
   */
  private async enterBench(bench: BenchIdentity): Promise<void> {
    if (sameBench(this.limits.currentBench, bench)) return;
    const before = this.limits.maxStimulusVpp;
    await this.limits.enter(bench);
    if (this.limits.maxStimulusVpp !== before) await this.applyLimitToGenerator();
  }

  /** Reopens a connected generator with the ceiling in force, or closes it when the bench has none. */
  private async applyLimitToGenerator(): Promise<void> {
    const generator = this.instruments.get('generator');
    const wanted = this.wanted.get('generator');
    if (!generator || !wanted) return;
    if (this.limits.maxStimulusVpp !== undefined) await this.connectRole(wanted.request, wanted.simulated);
    else await this.disconnectRole('generator');
  }

  /** Closes a role's instrument and forgets where it was; true when one was connected. */
  private async disconnectRole(role: InstrumentRole): Promise<boolean> {
    this.wanted.delete(role);
    const connected = this.instruments.get(role);
    if (!connected) return false;
    this.instruments.delete(role);
    await connected.opened.close().catch(() => undefined);
    return true;
  }

  private requireInstrumentsFor(request: SweepRequest): void {
    const needed: InstrumentRole[] = ['generator', request.kind === 'ac' && request.measurement === 'scope' ? 'scope' : 'meter'];
    const missing = needed.filter((role) => !this.instruments.has(role));
    if (missing.length > 0) {
      throw new UserError(
        `no ${missing.join(' or ')} connected for this ${request.kind === 'dc' ? 'DC transfer' : request.measurement} sweep`,
        'Connect it on the Bench view (or give its address, e.g. --generator tcp://127.0.0.1:5025), or use the simulated bench (--simulated).',
      );
    }
  }

  private instrumentInfos(): InstrumentInfo[] {
    return ROLES.filter((r) => this.instruments.has(r)).map((role) => {
      const c = this.instruments.get(role)!;
      return { role, address: c.opened.address, profileId: c.opened.profileId, identity: c.opened.identity, simulated: c.simulated };
    });
  }

  private async connectRole(request: ConnectRequest, simulated: boolean): Promise<InstrumentInfo> {
    const previous = this.instruments.get(request.role);
    if (previous) {
      this.instruments.delete(request.role);
      await previous.opened.close().catch(() => undefined);
    }
    if (request.role === 'generator') this.requireMaxStimulus();
    this.wanted.set(request.role, { request, simulated });
    // One traffic log per role, so every line (the *IDN? at open included) reaches the window with its role.
    const traffic = new TrafficLog();
    traffic.subscribe((entry) => this.events.emit('traffic', { at: entry.at, role: request.role, direction: entry.direction, text: entry.text }));
    // Simulated instruments answer the shipped generic profiles: a user's profile folder (which may fail to load) plays no part.
    const shipped = simulated ? builtInProfiles().find((p) => p.id === request.profileId && p.role === request.role) : undefined;
    const opened = await openInstrument(request.address, request.role, (shipped as ProfileFor<typeof request.role> | undefined) ?? request.profileId, {
      maxStimulusVpp: this.limits.maxStimulusVpp,
      traffic,
      profileFolder: this.options.profileFolder,
    });
    const isSimulated = simulated || /\(simulated\)/i.test(opened.identity.manufacturer);
    this.instruments.set(request.role, { opened: opened as OpenedInstrument, request, simulated: isSimulated });
    await this.store.recordInstrument({ role: request.role, identity: opened.identity, address: opened.address });
    return { role: request.role, address: opened.address, profileId: opened.profileId, identity: opened.identity, simulated: isSimulated };
  }

  private async startSimulatedBenchForDesign(design: Design, name: string, key: string, forStart = false, bench: BenchIdentity = { name: this.benchName, simulated: true }): Promise<void> {
    if (!forStart) this.requireIdleBench();
    // The simulated bench has its own limit: never the real instruments' (nor the other way round).
    await this.enterBench(bench);
    this.requireMaxStimulus();
    for (const role of ROLES) await this.disconnectRole(role);
    await this.simulatedBenchHandle?.stop();
    this.simulatedBenchHandle = undefined;
    const handle = await startSimulatedBenchFor(design, this.options.simulatedBench ?? {});
    this.simulatedBenchHandle = { ...handle, designName: name, key };
    for (const role of ROLES) await this.connectRole({ role, address: handle.addresses[role], profileId: DEFAULT_PROFILE_ID[role] }, true);
    this.events.emit('bench', await this.benchStatus());
  }

  /**
   * On an all-simulated bench the simulated circuit follows the run: the build
   * being swept (its actual part values), or for a through-calibration the same
   * build with the meter moved to the stage input (app/circuit/through.ts).
   */
  private async matchSimulatedBench(request: SweepRequest): Promise<void> {
    if (!this.simulatedBenchHandle || ![...this.instruments.values()].every((i) => i.simulated)) return;
    const key = request.through ? `through:${request.buildId}` : `build:${request.buildId}`;
    if (this.simulatedBenchHandle.key === key) return;
    if (!request.through) {
      await this.simulateBuild(request.buildId, true);
      return;
    }
    const build = await this.store.getBuild(request.buildId);
    const designRecord = await this.store.getDesign(build.designId);
    await this.startSimulatedBenchForDesign(throughDesign(buildDesign(designRecord, build)), `${designRecord.name} — through connection`, key, true);
  }

  private async planInput(request: SweepRequest, maxStimulusVpp: number): Promise<PlanInput> {
    // A through run measures the stage input: plan its amplitude for that node, not the stage output.
    return this.planInputFor(request, maxStimulusVpp, await designForBuild(this.store, request.buildId, request.through));
  }

  private planInputFor(request: SweepRequest, maxStimulusVpp: number, design: Design): PlanInput {
    const generator = this.instruments.get('generator')?.opened.control as SweepInstruments['generator'] | undefined;
    const usesMeter = request.kind === 'dc' || request.measurement === 'meter';
    return {
      request,
      maxStimulusVpp,
      instruments: {
        generator: generator ? generator.limits : genericGeneratorLimits(),
        instrumentSettleS: this.options.instrumentSettleS ?? 0.01,
        minIntegrationS: usesMeter ? (this.options.meterIntegrationS ?? 0.1) : 0,
      },
      theory: planTheoryFor(design),
    };
  }

  private currentInstruments(): SweepInstruments {
    return {
      generator: this.instruments.get('generator')!.opened.control as SweepInstruments['generator'],
      scope: this.instruments.get('scope')?.opened.control as SweepInstruments['scope'],
      meter: this.instruments.get('meter')?.opened.control as SweepInstruments['meter'],
    };
  }

  /** Re-opens every connected role at its address (after a timeout or a pulled link). */
  private async reconnectAll(): Promise<SweepInstruments> {
    for (const role of ROLES) {
      const wanted = this.wanted.get(role);
      if (wanted) await this.connectRole(wanted.request, wanted.simulated);
    }
    return this.currentInstruments();
  }

  private async launch(runId: number): Promise<void> {
    const run = await this.store.getRun(runId);
    const design = await designForRun(this.store, run);
    const request = run.request;
    const maxStimulusVpp = this.requireMaxStimulus();
    const clock = this.clock;
    const averages = request.averages;
    const plannedSteps: StepSetting[] = run.plan.steps.map((s) => ({ step: s.index, stimulus: s.stimulus, amplitudeVpp: s.amplitudeVpp, settleS: s.settleS, integrateS: s.integrateS, averages, refinement: false }));
    const planInput = this.planInputFor(request, maxStimulusVpp, design);
    const maxRefinement = this.options.maxRefinementPoints ?? 8;
    const ideal = request.kind === 'ac' ? planInput.theory : undefined;

    const nextExtraSteps = request.kind === 'ac' && request.refine
      ? (points: PointColumns, firstStep: number): StepSetting[] => {
          const refinedSoFar = points.flags.filter((f) => (f & PointFlag.refinement) !== 0).length;
          const room = maxRefinement - refinedSoFar;
          if (room <= 0) return [];
          const usable = points.stimulus.map((_, i) => i).filter((i) => Number.isFinite(points.gainDb[i]) && (points.flags[i] & (PointFlag.overrange | PointFlag.notANumber)) === 0);
          const frequencyHz = usable.map((i) => points.stimulus[i]);
          const gainDb = usable.map((i) => points.gainDb[i]);
          const ideal = idealAt(design, frequencyHz);
          const phaseDeg = usable.map((i) => points.phaseDeg[i]);
          const wanted = refinementFrequencies({ frequencyHz, gainDb, idealGainDb: ideal.gainDb, phaseDeg, idealPhaseDeg: ideal.phaseDeg }).slice(0, room);
          if (wanted.length === 0) return [];
          const extra = planStepsAt(Float64Array.from(wanted), planInput).columns;
          return wanted.map((stimulus, k) => ({ step: firstStep + k, stimulus, amplitudeVpp: extra.amplitudeVpp[k], settleS: extra.settleS[k], integrateS: extra.integrateS[k], averages, refinement: true }));
        }
      : undefined;

    const measurer = await this.measurerFor(run, clock, ideal?.gainRatioAt);
    const control = new RunControl();
    // Tell other processes we are alive; if the run was taken from us (our heartbeat went stale), stop driving it
    // at once and write nothing more: its status is the new owner's now.
    const heartbeat = setInterval(() => {
      this.store.renewRunHeartbeat(runId, this.claimant.ownerId).then(
        async (stillOurs) => {
          if (!stillOurs) control.claimLost(new RunTakenOverError(runId, await this.store.getRunOwnership(runId).catch(() => undefined)));
        },
        () => undefined,
      );
    }, this.options.heartbeatIntervalMs ?? HEARTBEAT_INTERVAL_MS);
    heartbeat.unref();
    let first = true;
    let takenOver = false;
    let ended: RunStatus = 'failed';
    const release = () => this.store.releaseRun(runId, this.claimant.ownerId).catch(() => undefined);
    const finished = runSweep({
      store: this.store,
      runId,
      ownerId: this.claimant.ownerId,
      clock,
      control,
      measurer,
      plannedSteps,
      nextExtraSteps,
      giveUpAfterS: this.options.giveUpAfterS ?? 120,
      emit: (event, payload) => this.events.emit(event, payload),
      connectInstruments: async () => {
        if (first) {
          first = false;
          return this.currentInstruments();
        }
        return this.reconnectAll();
      },
    })
      .then(
        (status) => (ended = status),
        (error: unknown) => {
          takenOver = error instanceof RunTakenOverError;
          throw error;
        },
      )
      .finally(async () => {
        clearInterval(heartbeat);
        this.active.delete(runId);
        if (takenOver) return; // the figures are the new owner's to store
        // A finished run (done, stopped, failed) is nobody's from the moment it ends, so it is never listed as
        // driven while its analysis runs; a paused one stays this process's until its figures are stored.
        if (ended !== 'paused') await release();
        await this.finalize(runId);
        if (ended === 'paused') await release();
      });
    // The caller learns the outcome through waitForRun/events; an unobserved rejection must not crash the process.
    finished.catch(() => undefined);
    this.active.set(runId, { control, finished });
  }

  private async measurerFor(run: StoredRun, clock: BenchClock, gainRatioAt: ((f: number) => number) | undefined): Promise<StepMeasurer> {
    if (run.kind === 'dc') return dcMeasurer({ clock });
    if (run.request.measurement === 'meter') {
      const calibration = run.request.through ? undefined : await this.store.latestCalibration(this.instrumentPairKey());
      if (calibration) await this.logRunEvent(run.id, 'info', `through-calibration ${calibration.id} of ${calibration.createdAt} applied`);
      else if (!run.request.through) await this.logRunEvent(run.id, 'warning', 'no through-calibration for this bench: gains include the generator\'s and meter\'s own response');
      return meterMeasurer({ clock, calibration });
    }
    return scopeMeasurer({ clock, expectedGainRatioAt: gainRatioAt ?? (() => 1) });
  }

  /**
   * Stable key of the generator + meter pair a through-calibration belongs to
   * (their identities). Not the bench key of the settings (app/bench/bench-key.ts):
   * a calibration describes one pair of instruments, whichever bench they sit on.
   */
  private instrumentPairKey(): string {
    return (['generator', 'meter'] as const).map((role) => {
      const c = this.instruments.get(role);
      return c ? `${role}=${identityKey(c.opened.identity)}` : `${role}=none`;
    }).join(';');
  }

  /** Figures and verdict stored with the run; a through-calibration run becomes the bench's calibration. */
  private async finalize(runId: number): Promise<void> {
    try {
      const run = await this.store.getRun(runId);
      const points = await this.store.loadPoints(runId);
      if (points.step.length === 0) return;
      const analysis = await analyzeRun(this.store, run, points);
      await this.store.setRunResults(runId, analysis.figures, analysis.verdict);
      if (run.request.through && run.status === 'done') {
        const calibration = await this.store.saveCalibration({
          instrumentPairKey: this.instrumentPairKey(), bench: run.bench, frequencyHz: points.stimulus, gainDb: points.gainDb,
          phaseDeg: points.phaseDeg.map((p) => (Number.isFinite(p) ? p : 0)), notes: `through-calibration from run ${runId}`,
        });
        await this.logRunEvent(runId, 'info', `stored as through-calibration ${calibration.id} for this bench`);
      }
    } catch (error) {
      await this.logRunEvent(runId, 'error', `analysis failed: ${(error as Error).message}`);
    }
  }

  private async logRunEvent(runId: number, level: 'info' | 'warning' | 'error', message: string): Promise<void> {
    const event = await this.store.appendEvent(runId, level, message);
    this.events.emit('runEvent', { runId, ...event });
  }
}

/** Ideal-op-amp response of the build at the measured frequencies (refinement targets). */
function idealAt(design: Design, frequencyHz: number[]): { gainDb: number[]; phaseDeg: number[] } {
  if (frequencyHz.length === 0) return { gainDb: [], phaseDeg: [] };
  const response = solveAc(design, Float64Array.from(frequencyHz));
  return { gainDb: Array.from(response.idealGainDb), phaseDeg: Array.from(response.idealPhaseDeg) };
}
