/**
 * What differs between the kinds of run: the steps, the measurer and any extra
 * steps (refinement) a run is swept with, and what is stored once it ends. The
 * one place a new kind of run slots in: its case in sweepSetupFor (its launch)
 * and in finalizeRun (its end); run-launch.ts and runs.ts stay as they are. A
 * noise run is driven by a loop of its own (noise-run.ts, which run-launch.ts
 * hands it to); its end is finalizeNoiseRun.
 */
import type { RolloffStore, StoredRun, StoredSweepRun } from '../store';
import type { BenchClock } from '../bench';
import type { RunEvent } from '../contract/contract';
import { scopeMeasurer } from '../sweep/runner/measure-scope';
import { meterMeasurer } from '../sweep/runner/measure-meter';
import { dcMeasurer } from '../sweep/runner/measure-dc';
import type { SweepRunOptions } from '../sweep/runner/run-sweep';
import type { StepMeasurer, StepSetting } from '../sweep/runner/types';
import { analyzeRun, designForRun } from '../read-model/run-detail';
import type { BenchControl } from './bench-control';
import type { SweepPlanning } from './sweep-planning';
import { refinementSteps } from './refinement';
import { finalizeNoiseRun } from './noise-run';
import type { RolloffServiceOptions } from './service-options';

/** Writes a line to a run's events and tells the listeners. */
export type RunEventLog = (runId: number, level: RunEvent['level'], message: string) => Promise<void>;

/** What a kind's launch and end read: the store, the bench, the planning, and the run's event log. */
export interface RunKindContext {
  store: RolloffStore;
  bench: Pick<BenchControl, 'requireMaxStimulus' | 'clock' | 'instrumentPairKey'>;
  planning: Pick<SweepPlanning, 'planInputFor'>;
  options: Pick<RolloffServiceOptions, 'maxRefinementPoints'>;
  logRunEvent: RunEventLog;
}

/** How one run is swept: the runner's kind-specific options, and the clock they count on. */
export type SweepSetup = Pick<SweepRunOptions, 'plannedSteps' | 'measurer' | 'nextExtraSteps' | 'clock'>;

/** The launch of a run, by its kind. Refuses (before anything is sent) when the bench has no maximum stimulus. */
export async function sweepSetupFor(context: RunKindContext, run: StoredSweepRun): Promise<SweepSetup> {
  const design = await designForRun(context.store, run);
  const request = run.request;
  const planInput = context.planning.planInputFor(request, context.bench.requireMaxStimulus(), design);
  const clock = context.bench.clock;
  const plannedSteps = plannedStepsOf(run);
  switch (run.kind) {
    case 'dc':
      return { clock, plannedSteps, measurer: dcMeasurer({ clock }) };
    case 'ac': {
      const nextExtraSteps = request.refine ? refinementSteps(design, planInput, context.options.maxRefinementPoints ?? 8, request.averages) : undefined;
      return { clock, plannedSteps, nextExtraSteps, measurer: await acMeasurerFor(context, run, clock, planInput.theory.gainRatioAt) };
    }
  }
}

/** The end of a run, by its kind: figures and verdict stored with it (never throws: a failed analysis is an event line). */
export async function finalizeRun(context: RunKindContext, runId: number): Promise<void> {
  try {
    const run = await context.store.getRun(runId);
    switch (run.kind) {
      case 'ac':
      case 'dc':
        await storeAnalysis(context, run);
        return;
      case 'noise':
        await finalizeNoiseRun(context.store, runId, (level, message) => context.logRunEvent(runId, level, message));
        return;
    }
  } catch (error) {
    await context.logRunEvent(runId, 'error', `analysis failed: ${(error as Error).message}`);
  }
}

function plannedStepsOf(run: StoredSweepRun): StepSetting[] {
  const averages = run.request.averages;
  return run.plan.steps.map((s) => ({ step: s.index, stimulus: s.stimulus, amplitudeVpp: s.amplitudeVpp, settleS: s.settleS, integrateS: s.integrateS, averages, refinement: false }));
}

/** An AC run measures with the meter (through-calibrated where the bench has a calibration) or the scope. */
async function acMeasurerFor(context: RunKindContext, run: StoredSweepRun, clock: BenchClock, gainRatioAt: ((f: number) => number) | undefined): Promise<StepMeasurer> {
  if (run.request.measurement === 'meter') {
    const calibration = run.request.through ? undefined : await context.store.latestCalibration(context.bench.instrumentPairKey());
    if (calibration) await context.logRunEvent(run.id, 'info', `through-calibration ${calibration.id} of ${calibration.createdAt} applied`);
    else if (!run.request.through) await context.logRunEvent(run.id, 'warning', 'no through-calibration for this bench: gains include the generator\'s and meter\'s own response');
    return meterMeasurer({ clock, calibration });
  }
  return scopeMeasurer({ clock, expectedGainRatioAt: gainRatioAt ?? (() => 1) });
}

/** Figures and verdict stored with the run; a through-calibration run becomes the bench's calibration. */
async function storeAnalysis(context: RunKindContext, run: StoredSweepRun): Promise<void> {
  const { store } = context;
  const points = await store.loadPoints(run.id);
  if (points.step.length === 0) return;
  const analysis = await analyzeRun(store, run, points);
  await store.setRunResults(run.id, analysis.figures, analysis.verdict);
  if (run.request.through && run.status === 'done') {
    const calibration = await store.saveCalibration({
      instrumentPairKey: context.bench.instrumentPairKey(), bench: run.bench, frequencyHz: points.stimulus, gainDb: points.gainDb,
      phaseDeg: points.phaseDeg.map((p) => (Number.isFinite(p) ? p : 0)), notes: `through-calibration from run ${run.id}`,
    });
    await context.logRunEvent(run.id, 'info', `stored as through-calibration ${calibration.id} for this bench`);
  }
}
