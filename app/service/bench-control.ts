/**
 * The bench a service drives: the connected instruments (and where each role
 * should be connected, so a pulled link reconnects to the same place), the
 * maximum stimulus of the bench in force (stimulus-limits.ts), and the simulated
 * bench's lifecycle (simulated-bench.ts). Whether the bench is idle is the runs'
 * business (runs.ts): the facade checks it before calling what changes the bench.
 */
import { ValidationError, UserError } from '../errors';
import { identityKey, type RolloffStore } from '../store';
import { openInstrument, builtInProfiles, checkProfile, loadProfiles, realClock, DEFAULT_PROFILE_ID, sameBench, type BenchClock, type OpenedInstrument, type ProfileFor } from '../bench';
import { TrafficLog } from '../scpi/traffic-log';
import { type Design, throughDesign } from '../circuit';
import type { PlanInstruments } from '../sweep/plan';
import type { SweepInstruments } from '../sweep/runner/types';
import { INSTRUMENT_ROLES as ROLES } from '../contract/contract';
import { genericGeneratorSourceOhm } from './noise-run';
import type { BenchIdentity, BenchStatus, ConnectRequest, InstrumentInfo, InstrumentRole, NoiseRequest, ProfileCheckReport, ProfileCheckRequest, ProfileSummary, ServiceEvents, SweepRequest } from '../contract/contract';
import { buildDesign, designOf } from '../read-model/stored-design';
import { benchDescription } from '../contract/bench-text';
import { startSimulatedBenchFor, type SimulatedBenchHandle } from './simulated-bench';
import { StimulusLimits } from './stimulus-limits';
import type { RolloffServiceOptions } from './service-options';

interface ConnectedInstrument {
  opened: OpenedInstrument;
  request: ConnectRequest;
  simulated: boolean;
}

/** What the bench tells the service's listeners: each SCPI line, and the bench's new state. */
export type BenchEmit = <E extends 'traffic' | 'bench'>(event: E, payload: ServiceEvents[E]) => void;

/** Fixed default when no generator is connected yet (planning preview): the generic profile's limits. */
function genericGeneratorLimits(): PlanInstruments['generator'] {
  const profile = builtInProfiles().find((p) => p.role === 'generator');
  if (profile?.role === 'generator') return profile.generator.limits;
  return { minFrequencyHz: 1e-3, maxFrequencyHz: 1e7, maxAmplitudeVpp: 20, minAmplitudeVpp: 0 };
}

export class BenchControl {
  private readonly instruments = new Map<InstrumentRole, ConnectedInstrument>();
  /** What each role should be connected to, kept while a link is down so reconnecting knows where. */
  private readonly wanted = new Map<InstrumentRole, { request: ConnectRequest; simulated: boolean }>();
  private simulatedBenchHandle: (SimulatedBenchHandle & { designName: string; key: string }) | undefined;
  /** The maximum stimulus of the bench in force (per bench, in the store). */
  readonly limits: StimulusLimits;

  constructor(
    private readonly store: RolloffStore,
    private readonly options: Pick<RolloffServiceOptions, 'maxStimulusVpp' | 'profileFolder' | 'simulatedBench' | 'clock'>,
    /** This bench's name (--bench, ROLLOFF_BENCH or the host name). */
    private readonly benchName: string,
    private readonly emit: BenchEmit,
  ) {
    this.limits = new StimulusLimits(store, options.maxStimulusVpp);
  }

  /** The bench clock: scaled for a simulated bench so settling and integration run faster, real otherwise. */
  get clock(): BenchClock {
    return this.simulatedBenchHandle?.clock ?? this.options.clock ?? realClock;
  }

  /** Fault injection on the running simulated bench (tests, demos). */
  get simulatedBench(): SimulatedBenchHandle | undefined {
    return this.simulatedBenchHandle;
  }

  isConnected(role: InstrumentRole): boolean {
    return this.instruments.has(role);
  }

  /** Closes instruments and the simulated bench. */
  async close(): Promise<void> {
    for (const role of ROLES) await this.disconnect(role);
    await this.simulatedBenchHandle?.stop();
    this.simulatedBenchHandle = undefined;
  }

  listProfiles(): ProfileSummary[] {
    const builtIn = new Set(builtInProfiles().map((p) => p.id));
    return loadProfiles(this.options.profileFolder).map((p) => ({ id: p.id, role: p.role, description: p.description, builtIn: builtIn.has(p.id) }));
  }

  async status(): Promise<BenchStatus> {
    return {
      instruments: this.instrumentInfos(),
      maxStimulusVpp: this.limits.maxStimulusVpp ?? 0,
      ...(this.limits.currentBench ? { bench: this.limits.currentBench } : {}),
      ...(this.limits.current ? { maxStimulusLimit: this.limits.current } : {}),
      simulatedBench: this.simulatedBenchHandle ? { addresses: this.simulatedBenchHandle.addresses, designName: this.simulatedBenchHandle.designName } : undefined,
    };
  }

  /** Saves the limit as the setting of the bench in force (before any bench is known: of the first one used). */
  async setMaxStimulus(maxStimulusVpp: number): Promise<BenchStatus> {
    await this.limits.set(maxStimulusVpp);
    await this.applyLimitToGenerator();
    return this.announce();
  }

  async connect(request: ConnectRequest): Promise<InstrumentInfo> {
    // An instrument at an address is a real one, whatever it answers to *IDN?: this bench's real-instrument limit applies.
    await this.enterBench({ name: this.benchName, simulated: false });
    const info = await this.connectRole(request, false);
    await this.announce();
    return info;
  }

  async checkProfile(request: ProfileCheckRequest): Promise<ProfileCheckReport> {
    const profile = loadProfiles(this.options.profileFolder).find((p) => p.id === request.profileId);
    if (!profile) throw new ValidationError('profileId', `no profile "${request.profileId}"`, 'Pick one of the profiles listed for the role.');
    const busy = [...this.instruments.values()].find((c) => c.opened.address === request.address);
    if (busy) throw new ValidationError('address', `${request.address} is connected now`, 'Disconnect it first: the check opens its own link and switches a generator\'s output off.');
    return checkProfile(request.address, profile, { maxStimulusVpp: this.limits.maxStimulusVpp });
  }

  async disconnect(role: InstrumentRole): Promise<void> {
    if (await this.disconnectRole(role)) await this.announce();
  }

  /** A simulated bench simulating one design as drawn, connected in all three roles. */
  async simulateDesign(designId: number): Promise<void> {
    const record = await this.store.getDesign(designId);
    await this.startSimulatedBenchForDesign(designOf(record), record.name, `design:${designId}`);
  }

  /**
   * A simulated bench simulating one build's actual circuit (its measured part values).
   * `bench`: whose limit applies (a resumed run's bench); else this bench's simulated one.
   */
  async simulateBuild(buildId: number, bench?: BenchIdentity): Promise<void> {
    const build = await this.store.getBuild(buildId);
    const designRecord = await this.store.getDesign(build.designId);
    await this.startSimulatedBenchForDesign(buildDesign(designRecord, build), `${designRecord.name} — build ${build.label}`, `build:${buildId}`, bench);
  }

  /**
   * On an all-simulated bench the simulated circuit follows the run: the build
   * being swept (its actual part values), or for a through-calibration the same
   * build with the meter moved to the stage input (app/circuit/through.ts).
   */
  async matchSimulatedBench(request: Pick<SweepRequest, 'buildId' | 'through'>): Promise<void> {
    if (!this.simulatedBenchHandle || ![...this.instruments.values()].every((i) => i.simulated)) return;
    const key = request.through ? `through:${request.buildId}` : `build:${request.buildId}`;
    if (this.simulatedBenchHandle.key === key) return;
    if (!request.through) {
      await this.simulateBuild(request.buildId);
      return;
    }
    const build = await this.store.getBuild(request.buildId);
    const designRecord = await this.store.getDesign(build.designId);
    await this.startSimulatedBenchForDesign(throughDesign(buildDesign(designRecord, build)), `${designRecord.name} — through connection`, key);
  }

  /**
   * Puts a resumed real run's instruments in place: never the simulated bench's;
   * the given addresses first, then those the run was measured with for any role still missing.
   */
  async connectRealInstruments(given: ConnectRequest[], measuredWith: InstrumentInfo[]): Promise<void> {
    for (const role of ROLES) if (this.wanted.get(role)?.simulated) await this.disconnectRole(role);
    for (const request of given) await this.connectRole(request, false);
    for (const instrument of measuredWith) {
      if (!this.instruments.has(instrument.role)) await this.connectRole({ role: instrument.role, address: instrument.address, profileId: instrument.profileId }, false);
    }
  }

  requireMaxStimulus(why?: string): number {
    const maxStimulusVpp = this.limits.maxStimulusVpp;
    if (maxStimulusVpp === undefined) {
      const bench = this.limits.currentBench;
      throw new ValidationError(
        'maximum stimulus',
        why ?? (bench ? `is not set for ${benchDescription(bench)}` : 'is not set'),
        'Set the largest peak-to-peak voltage the circuit may see: --max-stimulus VPP, or on the Bench view; it is saved for that bench.',
      );
    }
    return maxStimulusVpp;
  }

  /**
   * Makes `bench` the one whose settings are in force: its own stored limit (or
   * one given before any bench was known, saved for it now), or none. A connected
   * generator holds its ceiling from the moment it is opened, so it follows.
   */
  async enterBench(bench: BenchIdentity): Promise<void> {
    if (sameBench(this.limits.currentBench, bench)) return;
    const before = this.limits.maxStimulusVpp;
    await this.limits.enter(bench);
    if (this.limits.maxStimulusVpp !== before) await this.applyLimitToGenerator();
  }

  requireInstrumentsFor(request: SweepRequest | NoiseRequest): void {
    // A noise run needs the generator too: it is held off, and checked off, through its control.
    const needed: InstrumentRole[] = ['generator', request.kind !== 'dc' && request.measurement === 'scope' ? 'scope' : 'meter'];
    const missing = needed.filter((role) => !this.instruments.has(role));
    if (missing.length > 0) {
      throw new UserError(
        `no ${missing.join(' or ')} connected for this ${request.kind === 'dc' ? 'DC transfer sweep' : request.kind === 'noise' ? `${request.measurement} noise run` : `${request.measurement} sweep`}`,
        'Connect it on the Bench view (or give its address, e.g. --generator tcp://127.0.0.1:5025), or use the simulated bench (--simulated).',
      );
    }
  }

  instrumentInfos(): InstrumentInfo[] {
    return ROLES.filter((r) => this.instruments.has(r)).map((role) => {
      const c = this.instruments.get(role)!;
      return { role, address: c.opened.address, profileId: c.opened.profileId, identity: c.opened.identity, simulated: c.simulated };
    });
  }

  /** The connected generator's limits, or the generic profile's while none is connected (a planning preview). */
  generatorLimits(): PlanInstruments['generator'] {
    const generator = this.instruments.get('generator')?.opened.control as SweepInstruments['generator'] | undefined;
    return generator ? generator.limits : genericGeneratorLimits();
  }

  currentInstruments(): SweepInstruments {
    return {
      generator: this.instruments.get('generator')!.opened.control as SweepInstruments['generator'],
      scope: this.instruments.get('scope')?.opened.control as SweepInstruments['scope'],
      meter: this.instruments.get('meter')?.opened.control as SweepInstruments['meter'],
    };
  }

  /** The connected generator's source resistance (its profile's), or the generic profile's while none is connected (a planning preview). */
  generatorSourceOhm(): number {
    const generator = this.instruments.get('generator')?.opened.control as SweepInstruments['generator'] | undefined;
    return generator ? generator.sourceImpedanceOhm : genericGeneratorSourceOhm();
  }

  /** Re-opens one role at its address, so its profile's setup applies again (the scope's record length after a noise run). */
  async reopen(role: InstrumentRole): Promise<void> {
    const wanted = this.wanted.get(role);
    if (wanted) await this.connectRole(wanted.request, wanted.simulated);
  }

  /** Re-opens every connected role at its address (after a timeout or a pulled link). */
  async reconnectAll(): Promise<SweepInstruments> {
    for (const role of ROLES) {
      const wanted = this.wanted.get(role);
      if (wanted) await this.connectRole(wanted.request, wanted.simulated);
    }
    return this.currentInstruments();
  }

  /**
   * Stable key of the generator + meter pair a through-calibration belongs to
   * (their identities). Not the bench key of the settings (app/bench/bench-key.ts):
   * a calibration describes one pair of instruments, whichever bench they sit on.
   */
  instrumentPairKey(): string {
    return (['generator', 'meter'] as const).map((role) => {
      const c = this.instruments.get(role);
      return c ? `${role}=${identityKey(c.opened.identity)}` : `${role}=none`;
    }).join(';');
  }

  /** Tells the listeners the bench's new state, and returns it. */
  private async announce(): Promise<BenchStatus> {
    const status = await this.status();
    this.emit('bench', status);
    return status;
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
    traffic.subscribe((entry) => this.emit('traffic', { at: entry.at, role: request.role, direction: entry.direction, text: entry.text }));
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

  private async startSimulatedBenchForDesign(design: Design, name: string, key: string, bench: BenchIdentity = { name: this.benchName, simulated: true }): Promise<void> {
    // The simulated bench has its own limit: never the real instruments' (nor the other way round).
    await this.enterBench(bench);
    this.requireMaxStimulus();
    for (const role of ROLES) await this.disconnectRole(role);
    await this.simulatedBenchHandle?.stop();
    this.simulatedBenchHandle = undefined;
    const handle = await startSimulatedBenchFor(design, this.options.simulatedBench ?? {});
    this.simulatedBenchHandle = { ...handle, designName: name, key };
    for (const role of ROLES) await this.connectRole({ role, address: handle.addresses[role], profileId: DEFAULT_PROFILE_ID[role] }, true);
    this.emit('bench', await this.status());
  }
}
