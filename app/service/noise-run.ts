/**
 * Noise runs on the service's bench: planned from the build's circuit as the
 * input sees it with the generator off (its source resistance, from the
 * generator's profile: app/circuit withSourceResistance), started and resumed
 * under the same run ownership as sweeps (claim, heartbeat, release), driven
 * by the run loop with the noise measurer (app/sweep/runner); read back as the
 * measured density beside the computed one in app/read-model/noise-run-detail.ts.
 *
 * The service lends what a noise run needs through NoiseRunBench, so this file
 * holds the noise run's logic and service.ts only its hooks.
 */
import type { BenchClock } from '../bench/clock';
import type { InstrumentInfo, InstrumentRole, NoisePlanSummary, NoiseRequest, RunEvent, RunSummary, ServiceEvents } from '../contract/contract';
import { SOFTWARE_VERSION } from '../contract/version';
import { bandNoise, slowestTimeConstantS, solveDcTransfer, withActualValues, withSourceResistance, type Design } from '../circuit';
import { builtInProfiles } from '../bench';
import { planNoise } from '../sweep/plan';
import { noiseMeasurer } from '../sweep/runner/measure-noise';
import { runNoise } from '../sweep/runner/run-noise';
import type { SweepInstruments } from '../sweep/runner/types';
import type { RolloffStore, RunClaimant, StoredNoiseRun } from '../store';
import { createOwnedRunOrRefuse, driveOwnedRun, firstThenReconnect, type DrivenRun } from './run-ownership';
import { noiseDesign, noiseRunResultOf } from '../read-model/noise-run-detail';
import { designOf } from '../read-model/stored-design';

/** What a noise run borrows from the service that drives it. */
export interface NoiseRunBench {
  store: RolloffStore;
  clock: BenchClock;
  claimant: RunClaimant;
  staleAfterMs: number;
  heartbeatIntervalMs: number;
  giveUpAfterS: number;
  benchName: string;
  /** Time an instrument needs after a setting change, and the meter's aperture per reading (s). */
  instrumentSettleS: number;
  meterApertureS: number;
  requireMaxStimulus(): number;
  /** The generator's source resistance: the connected one's profile, else the generic profile's (planning preview). */
  sourceImpedanceOhm(): number;
  /** On an all-simulated bench, the simulated circuit becomes this build's. */
  matchSimulatedBench(buildId: number): Promise<void>;
  requireInstruments(request: NoiseRequest): void;
  instrumentInfos(): InstrumentInfo[];
  currentInstruments(): SweepInstruments;
  reconnectAll(): Promise<SweepInstruments>;
  /** Re-opens one role at its address, so its profile's setup applies again (the scope's record length after a noise run). */
  reopen(role: InstrumentRole): Promise<void>;
  track(runId: number, run: DrivenRun): void;
  untrack(runId: number): void;
  emit<E extends 'progress' | 'runEvent'>(event: E, payload: ServiceEvents[E]): void;
  logRunEvent(runId: number, level: RunEvent['level'], message: string): Promise<void>;
  summaryOf(runId: number): Promise<RunSummary>;
}

/** The generic generator profile's source resistance (ohms), for plans made before a generator is connected. */
export function genericGeneratorSourceOhm(): number {
  const profile = builtInProfiles().find((p) => p.role === 'generator');
  return profile?.role === 'generator' ? profile.generator.sourceImpedanceOhm : 50;
}

/**
 * Refuses a noise request for a design file and measured values not stored
 * yet, as the run would (a design noise analysis cannot cover, a band the
 * segment length cannot resolve), so a command can refuse before storing anything.
 */
export function checkNoiseRequestForUnsavedBuild(request: NoiseRequest, design: unknown, actualValues: Record<string, number>): void {
  const built = withActualValues(designOf({ id: 0, name: '', design, createdAt: '' }), actualValues);
  planNoiseForDesign(withSourceResistance(built, genericGeneratorSourceOhm()), request, { sourceImpedanceOhm: genericGeneratorSourceOhm(), instrumentSettleS: 0, meterApertureS: 0 });
}

function planNoiseForDesign(design: Design, request: NoiseRequest, settings: { sourceImpedanceOhm: number; instrumentSettleS: number; meterApertureS: number }): NoisePlanSummary {
  return planNoise({
    request,
    ...settings,
    theory: {
      slowestTimeConstantS: slowestTimeConstantS(design),
      outputDcV: solveDcTransfer(design, Float64Array.of(0)).outputV[0],
      rmsNoiseV: (fromHz, toHz) => bandNoise(design, fromHz, toHz).outputRmsV,
    },
  });
}

export async function planNoiseRunOn(bench: NoiseRunBench, request: NoiseRequest): Promise<NoisePlanSummary> {
  const sourceImpedanceOhm = bench.sourceImpedanceOhm();
  const design = await noiseDesign(bench.store, request.buildId, sourceImpedanceOhm);
  return planNoiseForDesign(design, request, { sourceImpedanceOhm, instrumentSettleS: bench.instrumentSettleS, meterApertureS: bench.meterApertureS });
}

/** Starts a noise run; the caller holds the bench (its idle check done) until this returns. */
export async function startNoiseRunOn(bench: NoiseRunBench, request: NoiseRequest): Promise<RunSummary> {
  const maxStimulusVpp = bench.requireMaxStimulus();
  await bench.matchSimulatedBench(request.buildId);
  bench.requireInstruments(request);
  const plan = await planNoiseRunOn(bench, request);
  const infos = bench.instrumentInfos();
  // One store transaction: the run exists only if no other run holds this bench, and is ours from its first moment.
  const run = (await createOwnedRunOrRefuse(bench.store, {
    buildId: request.buildId,
    kind: 'noise',
    request: { ...request, maxStimulusVpp },
    plan,
    softwareVersion: SOFTWARE_VERSION,
    bench: infos,
    operator: request.operator,
    notes: request.notes,
    simulated: infos.some((i) => i.simulated),
    benchName: bench.benchName,
  }, bench.claimant, bench.staleAfterMs)) as StoredNoiseRun;
  try {
    for (const warning of plan.warnings) await bench.logRunEvent(run.id, 'warning', `plan: ${warning}`);
    launchNoiseRun(bench, run, 0); // a new run: nothing stored yet
  } catch (error) {
    // Not started after all: give the bench back now rather than when the heartbeat goes stale.
    await bench.store.releaseRun(run.id, bench.claimant.ownerId).catch(() => undefined);
    throw error;
  }
  return bench.summaryOf(run.id);
}

/** Drives a noise run (new or resumed) to its end, pause or stop; the caller has claimed it. */
export function launchNoiseRun(bench: NoiseRunBench, run: StoredNoiseRun, firstStep: number): void {
  const { store } = bench;
  const acquisition = run.plan.acquisition;
  const driven = driveOwnedRun(store, run.id, bench.claimant.ownerId, bench.heartbeatIntervalMs, (control) =>
    runNoise({
      store,
      runId: run.id,
      firstStep,
      ownerId: bench.claimant.ownerId,
      clock: bench.clock,
      control,
      measurer: noiseMeasurer({ clock: bench.clock, acquisition, toHz: run.request.toHz, log: (level, message) => bench.logRunEvent(run.id, level, message) }),
      plannedSteps: run.plan.steps.map((s) => ({ step: s.index, stimulus: s.stimulus, amplitudeVpp: s.amplitudeVpp, settleS: s.settleS, integrateS: s.integrateS, averages: 1, refinement: false })),
      giveUpAfterS: bench.giveUpAfterS,
      emit: (event, payload) => bench.emit(event, payload),
      connectInstruments: firstThenReconnect(() => bench.currentInstruments(), () => bench.reconnectAll()),
    }), {
    ended: () => bench.untrack(run.id),
    async finish() {
      await finalizeNoiseRun(store, run.id, (level, message) => bench.logRunEvent(run.id, level, message));
      // The record length a noise run set is not what a sweep expects: the scope's profile sets it up again.
      if (acquisition.measurement === 'scope') await bench.reopen('scope').catch(() => undefined);
    },
  });
  bench.track(run.id, driven);
}

/** The figures of a noise run, stored with it; an analysis that fails is logged, not thrown. */
export async function finalizeNoiseRun(store: RolloffStore, runId: number, log: (level: RunEvent['level'], message: string) => Promise<void>): Promise<void> {
  try {
    const run = (await store.getRun(runId)) as StoredNoiseRun;
    const { figures } = await noiseRunResultOf(store, run);
    if (figures.noise) await store.setRunResults(runId, figures, null);
  } catch (error) {
    await log('error', `analysis failed: ${(error as Error).message}`);
  }
}

