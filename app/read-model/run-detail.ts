/**
 * A run with everything a view or a record needs: points, theory over the
 * run's frequencies with the tolerance band, figures, flags and verdict.
 */
import type { RunOwnership, RunReadStore, StoredRun, StoredRunSummary, StoredSweepRun } from '../store';
import { FINISHED_RUN_STATUSES, type PointColumns, type RunDetail, type RunFigures, type RunOwner, type RunSummary, type TheoryColumns, type Verdict } from '../contract/contract';
import { analyzeAcRun, usablePointIndexes } from '../analysis';
import { analyzeStability, inputResistor, outputOpAmpIndex, stabilityWarnings, throughDesign, type OpAmpStability, type AcResponse, type Design, type DiodePart } from '../circuit';
import { fitLogStage, logFitFigures, FitError } from '../signal';
import { ValidationError } from '../errors';
import { estimateGbw, theoryAtPoints, theoryColumns, theoryFigures } from './theory';
import { buildDesign } from './stored-design';
import { RunKindError } from './run-kind-error';

export interface RunAnalysis {
  figures: RunFigures;
  verdict: Verdict | null;
  /** Flags per point including the analysis flags (tolerance band, past gain limit). */
  flags: number[];
  theoryGainLimitHz?: number;
  theoryMinus3dbHz: number[];
}

/** The circuit a run measured: the build, or for a through-calibration the through connection of it. */
export function designForRun(store: RunReadStore, run: StoredRun): Promise<Design> {
  return designForBuild(store, run.buildId, run.kind === 'noise' ? undefined : run.request.through);
}

/** The build's circuit (its actual part values), or its through connection when `through` is set. */
export async function designForBuild(store: RunReadStore, buildId: number, through: boolean | undefined): Promise<Design> {
  const build = await store.getBuild(buildId);
  const design = buildDesign(await store.getDesign(build.designId), build);
  return through ? throughDesign(design) : design;
}

/** Figures, flags and verdict of a sweep from its stored points (a noise run's are in noise-run-detail.ts). */
export async function analyzeRun(store: RunReadStore, run: StoredSweepRun, points?: PointColumns): Promise<RunAnalysis> {
  return analyzeRunOf(await designForRun(store, run), run, points ?? (await store.loadPoints(run.id)));
}

/** `columns`, when given, supply the tolerance band at the points (see theoryAtPoints). */
function analyzeRunOf(design: Design, run: StoredSweepRun, points: PointColumns, columns?: TheoryColumns): RunAnalysis & { theoryResponse?: AcResponse } {
  if (run.kind === 'dc') return analyzeDcRun(design, points);
  const from = Math.min(run.request.from, ...points.stimulus);
  const to = Math.max(run.request.to, ...points.stimulus);
  const figuresOfTheory = theoryFigures(design, from, to);
  const theory = theoryAtPoints(design, points.stimulus, figuresOfTheory, columns);
  const gbw = run.request.measurement === 'scope' ? estimateGbw(design, {
    frequencyHz: points.stimulus, gainDb: points.gainDb, phaseDeg: points.phaseDeg,
    gainUncertaintyDb: points.gainUncertaintyDb, phaseUncertaintyDeg: points.phaseUncertaintyDeg,
  }) : undefined;
  const result = analyzeAcRun(
    { frequencyHz: points.stimulus, gainDb: points.gainDb, gainUncertaintyDb: points.gainUncertaintyDb, phaseDeg: points.phaseDeg, flags: points.flags },
    theory,
    run.request.limits,
    gbw,
  );
  const stages = analyzeStability(design);
  const stability = outputOpAmpStability(design, stages);
  const warnings = stabilityWarnings(stages).map((w) => w.message);
  return {
    figures: {
      ...result.figures,
      theoryPhaseMarginDeg: stability?.phaseMarginDeg,
      theoryPeakingDb: stability?.peakingDb,
      ...(warnings.length ? { theoryWarnings: warnings } : {}),
    },
    verdict: result.verdict,
    flags: Array.from(result.flags),
    theoryGainLimitHz: figuresOfTheory.gainLimitHz,
    theoryMinus3dbHz: figuresOfTheory.minus3dbHz,
    theoryResponse: theory.response,
  };
}

/** The computed stability of the op-amp that drives the output, when the design has one with a loop crossover. */
function outputOpAmpStability(design: Design, stages: OpAmpStability[]): { phaseMarginDeg?: number; peakingDb?: number } | undefined {
  const index = outputOpAmpIndex(design);
  if (index === undefined) return undefined;
  const stage = stages[index];
  return stage ? { phaseMarginDeg: stage.phaseMarginDeg, peakingDb: stage.peakingDb } : undefined;
}

function analyzeDcRun(design: Design, points: PointColumns): RunAnalysis {
  const figures: RunFigures = { minus3dbHz: [] };
  const usable = usablePointIndexes(points.flags, points.outputV);
  const resistor = inputResistor(design);
  if (resistor && usable.length >= 4) {
    try {
      const diode = design.parts.find((p): p is DiodePart => p.type === 'diode');
      const fit = fitLogStage(
        usable.map((i) => points.stimulus[i]),
        usable.map((i) => points.outputV[i]),
        resistor.value,
        design.temperatureC,
        diode ? { n: diode.model.n, isA: diode.model.is, rsOhm: diode.model.rs } : {},
      );
      figures.logFit = logFitFigures(fit);
    } catch (error) {
      if (!(error instanceof FitError || error instanceof ValidationError)) throw error;
    }
  }
  return { figures, verdict: null, flags: [...points.flags], theoryMinus3dbHz: [] };
}

/** The build's diode model (log stage), for comparing a DC fit with theory. */
export async function diodeOfRun(store: RunReadStore, runId: number): Promise<{ n: number; isA: number; rsOhm: number } | undefined> {
  const diode = (await designForRun(store, await store.getRun(runId))).parts.find((p): p is DiodePart => p.type === 'diode');
  return diode ? { n: diode.model.n, isA: diode.model.is, rsOhm: diode.model.rs } : undefined;
}

/**
 * How a recorded owner is shown: live or not, and its heartbeat's age. That is
 * the service's rule (runOwnerOf in app/service/run-ownership.ts: it asks the
 * operating system whether the process is there), so the caller passes it in.
 */
export type OwnerJudge = (ownership: RunOwnership) => RunOwner;

/**
 * The contract's summary of a stored run, with its owner as judged. A finished
 * run has no driver: an owner still recorded with it (stored before finished runs
 * were released, or by a process killed before it released the run) is not shown.
 */
export function summaryOf(run: StoredRunSummary, judgeOwner: OwnerJudge): RunSummary {
  const { id, uid, buildId, buildLabel, designName, kind, status, startedAt, endedAt, pointCount, plannedCount, simulated, benchName, owner } = run;
  const driver = owner && !FINISHED_RUN_STATUSES.has(status) ? judgeOwner(owner) : null;
  return { id, uid, buildId, buildLabel, designName, kind, status, startedAt, endedAt, pointCount, plannedCount, simulated, benchName, owner: driver };
}

export async function runDetail(store: RunReadStore, runId: number, judgeOwner: OwnerJudge): Promise<RunDetail> {
  const run = await store.getRun(runId);
  if (run.kind === 'noise') throw new RunKindError(runId, run.kind, 'getNoiseRun');
  const points = await store.loadPoints(runId);
  const design = await designForRun(store, run);
  // One Monte Carlo run for the whole detail: the theory columns cover every measured frequency.
  const theory: RunDetail['theory'] = run.kind === 'ac'
    ? theoryColumns(design, [...run.plan.steps.map((s) => s.stimulus), ...points.stimulus])
    : { frequencyHz: [], gainDb: [], phaseDeg: [], idealGainDb: [], idealPhaseDeg: [] };
  const analysis = analyzeRunOf(design, run, points, run.kind === 'ac' ? theory : undefined);
  const response = analysis.theoryResponse;
  if (response) {
    // Measured phases are wrapped to (−180°, 180°]; shift each by whole turns to sit on the theory's continuous curve.
    points.phaseDeg = points.phaseDeg.map((p, i) => (Number.isFinite(p) ? p + 360 * Math.round((response.phaseDeg[i] - p) / 360) : p));
  }
  points.flags = analysis.flags;
  return {
    ...summaryOf(run, judgeOwner),
    kind: run.kind,
    offlinePeriods: run.offlinePeriods,
    request: run.request,
    bench: run.bench,
    softwareVersion: run.softwareVersion,
    points,
    theory,
    figures: analysis.figures,
    verdict: analysis.verdict,
    events: await store.listEvents(runId),
    theoryGainLimitHz: analysis.theoryGainLimitHz,
    theoryMinus3dbHz: analysis.theoryMinus3dbHz,
  };
}
