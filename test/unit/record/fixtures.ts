/**
 * Run data for record tests, made without a bench: the theory is the handbook
 * closed form of an inverting RC low-pass stage with a single-pole op-amp
 * (DEVELOPERS.md "Theory": H = −(Z_F/Z_N) / (1 + (1 + Z_F/Z_N)/A), A = A0/(1 + s/ω_p)),
 * the "measurement" is that theory plus seeded pseudo-random noise, and the
 * figures and verdict come from the real run analysis (app/analysis).
 * All of it is invented demo data and labelled simulated.
 */
import type { BuildRecord, Comparison, InstrumentInfo, OfflinePeriod, RunDetail } from '../../../app/contract/contract';
import { PointFlag } from '../../../app/contract/contract';
import { analyzeAcRun } from '../../../app/analysis';
import { dbFromRatio, degreesFromRadians, logGrid } from '../../../app/units';
import { logStageIdeal } from '../../../app/circuit/log-stage';
import { fitLogStage, logFitFigures } from '../../../app/signal';
import type { RecordDcFit } from '../../../app/record';
import { SeededRandom } from '../../../app/numeric';

export const INVENTED_NOTE = 'Invented demo data for tests (theory plus seeded noise), not a measurement.';

/** Deterministic noise for reproducible fixtures, uniform in [−0.5, 0.5): the project's seeded generator (app/numeric). */
function seededNoise(seed: number): () => number {
  const random = new SeededRandom(seed);
  return () => random.nextUniform() - 0.5;
}

export interface StageValues {
  inputOhm: number;
  feedbackOhm: number;
  feedbackF: number;
  openLoopGain: number;
  gbwHz: number;
}

export const NOMINAL_STAGE: StageValues = { inputOhm: 10e3, feedbackOhm: 100e3, feedbackF: 1.5e-9, openLoopGain: 1e5, gbwHz: 1e6 };

/** Complex H(j2πf) of the inverting low-pass, real op-amp; returns [re, im]. */
export function invertingLowPass(values: StageValues, frequencyHz: number, idealOpAmp = false): [number, number] {
  const w = 2 * Math.PI * frequencyHz;
  // Z_F = R_F / (1 + jωR_F C_F) → ratio Z_F/Z_N = k / (1 + jx), with k = R_F/R_N, x = ωR_F C_F.
  const k = values.feedbackOhm / values.inputOhm;
  const x = w * values.feedbackOhm * values.feedbackF;
  const den = 1 + x * x;
  const ratio: [number, number] = [k / den, (-k * x) / den];
  if (idealOpAmp) return [-ratio[0], -ratio[1]];
  // 1/A = (1 + jω/ω_p)/A0 with ω_p = 2π·GBW/A0.
  const wp = (2 * Math.PI * values.gbwHz) / values.openLoopGain;
  const invA: [number, number] = [1 / values.openLoopGain, w / wp / values.openLoopGain];
  const noiseGain: [number, number] = [1 + ratio[0], ratio[1]];
  const correction: [number, number] = [1 + noiseGain[0] * invA[0] - noiseGain[1] * invA[1], noiseGain[0] * invA[1] + noiseGain[1] * invA[0]];
  const cd = correction[0] ** 2 + correction[1] ** 2;
  const h: [number, number] = [(ratio[0] * correction[0] + ratio[1] * correction[1]) / cd, (ratio[1] * correction[0] - ratio[0] * correction[1]) / cd];
  return [-h[0], -h[1]];
}

/** Where |A| meets |noise gain 1 + Z_F/Z_N| (loop gain 1, DEVELOPERS.md "Theory"), by bisection on log f. */
export function gainLimitPointHz(values: StageValues): number {
  const loopGainExcess = (f: number) => {
    const fp = values.gbwHz / values.openLoopGain;
    const openLoop = values.openLoopGain / Math.hypot(1, f / fp);
    const k = values.feedbackOhm / values.inputOhm;
    const x = 2 * Math.PI * f * values.feedbackOhm * values.feedbackF;
    const noiseGain = Math.hypot(1 + k / (1 + x * x), (-k * x) / (1 + x * x));
    return openLoop - noiseGain;
  };
  let low = 1;
  let high = 1e10;
  for (let i = 0; i < 200; i++) {
    const mid = Math.sqrt(low * high);
    if (loopGainExcess(mid) > 0) low = mid;
    else high = mid;
  }
  return Math.sqrt(low * high);
}

export const SIMULATED_BENCH: InstrumentInfo[] = [
  { role: 'generator', address: 'tcp://127.0.0.1:5025', profileId: 'generic-generator', simulated: true, identity: { manufacturer: 'Rolloff', model: 'Virtual generator', serialNumber: 'VB-GEN-0001', firmware: '0.1.0' } },
  { role: 'scope', address: 'serial:/dev/pts/7?baud=115200', profileId: 'generic-scope', simulated: true, identity: { manufacturer: 'Rolloff', model: 'Virtual scope', serialNumber: 'VB-SCOPE-0002', firmware: '0.1.0' } },
];

export const FIXTURE_DESIGN = {
  name: 'Inverting low-pass, gain 10',
  description: INVENTED_NOTE,
  input: 'in',
  output: 'out',
  temperatureC: 25,
  parts: [
    { id: 'RN', type: 'resistor', nodes: ['in', 'sum'], value: 10e3, tolerance: 0.01 },
    { id: 'RF', type: 'resistor', nodes: ['sum', 'out'], value: 100e3, tolerance: 0.01 },
    { id: 'CF', type: 'capacitor', nodes: ['sum', 'out'], value: 1.5e-9, tolerance: 0.05 },
    { id: 'U1', type: 'opamp', nodes: ['0', 'sum', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 0.5e6, rails: [-13, 13] } },
  ],
};

export function fixtureBuild(overrides: Partial<BuildRecord> = {}): BuildRecord {
  return {
    id: 3,
    uid: '5d0c8f8e-3b7a-4c1e-9f2d-6a4b8e1c7d03',
    designId: 1,
    label: 'Board A (hand-wired)',
    notes: `${INVENTED_NOTE} CF measured on the bridge before fitting.`,
    actualValues: { RN: 9.98e3, RF: 100.4e3, CF: 1.52e-9 },
    createdAt: '2026-11-30T09:12:00.000Z',
    ...overrides,
  };
}

export interface AcFixtureOptions {
  runId?: number;
  /** The run's stable id (invented). */
  runUid?: string;
  offlinePeriods?: OfflinePeriod[];
  build?: BuildRecord;
  seed?: number;
  noiseDb?: number;
  /** Index of a point to mark overrange with a non-finite reading. */
  overrangeIndex?: number;
  /** Measured points per decade over 10 Hz … 1 MHz (default 8, i.e. 41 points). */
  pointsPerDecade?: number;
  /** Extra points stored after the grid and flagged as refinement points, as a sweep with refine on stores them. */
  refinementHz?: number[];
}

/** A complete AC RunDetail: actual-value theory plus noise as "measured", analysed by app/analysis. */
export function acRunDetail(options: AcFixtureOptions = {}): RunDetail {
  const build = options.build ?? fixtureBuild();
  const actual: StageValues = {
    ...NOMINAL_STAGE,
    inputOhm: build.actualValues.RN ?? NOMINAL_STAGE.inputOhm,
    feedbackOhm: build.actualValues.RF ?? NOMINAL_STAGE.feedbackOhm,
    feedbackF: build.actualValues.CF ?? NOMINAL_STAGE.feedbackF,
  };
  const noise = seededNoise(options.seed ?? 7);
  const noiseDb = options.noiseDb ?? 0.05;
  const grid = Array.from(logGrid(10, 1e6, options.pointsPerDecade ?? 8));
  const frequencies = [...grid, ...(options.refinementHz ?? [])];
  const theoryGrid = Array.from(logGrid(10, 1e6, 40));
  const gainOf = (values: StageValues, f: number, ideal = false) => {
    const [re, im] = invertingLowPass(values, f, ideal);
    return { gainDb: dbFromRatio(Math.hypot(re, im)), phaseDeg: degreesFromRadians(Math.atan2(im, re)) };
  };
  const measuredGain: number[] = [];
  const measuredPhase: number[] = [];
  const flags: number[] = [];
  frequencies.forEach((f, i) => {
    const { gainDb, phaseDeg } = gainOf(actual, f);
    measuredGain.push(gainDb + noiseDb * 2 * noise());
    measuredPhase.push(phaseDeg + 0.5 * noise());
    flags.push((i === options.overrangeIndex ? PointFlag.overrange : 0) | (i >= grid.length ? PointFlag.refinement : 0));
  });
  if (options.overrangeIndex !== undefined) measuredGain[options.overrangeIndex] = Number.NaN;
  const theoryAtPoints = frequencies.map((f) => gainOf(actual, f).gainDb);
  const idealAtPoints = frequencies.map((f) => gainOf(actual, f, true).gainDb);
  // Tolerance band: ±(0.2 dB + 3 % of the slope region), a simple invented band for drawing.
  const bandWidthDb = (g: number, ideal: number) => 0.2 + Math.min(3, Math.abs(g - ideal) + 0.03 * Math.abs(g));
  const gainLimitHz = gainLimitPointHz(actual);
  const cornerHz = 1 / (2 * Math.PI * actual.feedbackOhm * actual.feedbackF);
  const limits = { maxDeviationDb: 1, cornerTolerance: 0.1, passbandGainDb: [19, 21] as [number, number] };
  const analysis = analyzeAcRun(
    { frequencyHz: frequencies, gainDb: measuredGain, gainUncertaintyDb: frequencies.map(() => noiseDb), phaseDeg: measuredPhase, flags },
    {
      gainDb: theoryAtPoints,
      idealGainDb: idealAtPoints,
      bandLowDb: theoryAtPoints.map((g, i) => g - bandWidthDb(g, idealAtPoints[i])),
      bandHighDb: theoryAtPoints.map((g, i) => g + bandWidthDb(g, idealAtPoints[i])),
      gainLimitHz,
      minus3dbHz: [cornerHz],
    },
    limits,
  );
  const theory = theoryGrid.map((f) => ({ ...gainOf(actual, f), ideal: gainOf(actual, f, true) }));
  const runId = options.runId ?? 12;
  return {
    id: runId,
    uid: options.runUid ?? `9a3e2c71-4b8d-4f60-a1c5-${String(runId).padStart(12, '0')}`,
    offlinePeriods: options.offlinePeriods ?? [],
    buildId: build.id,
    buildLabel: build.label,
    designName: FIXTURE_DESIGN.name,
    kind: 'ac',
    status: 'done',
    startedAt: '2026-11-30T10:00:00.000Z',
    endedAt: '2026-11-30T10:04:31.500Z',
    pointCount: frequencies.length,
    // Refinement points are added after the plan, so the plan is the grid.
    plannedCount: grid.length,
    simulated: true,
    benchName: 'simulated bench 1',
    owner: null,
    request: {
      buildId: build.id, kind: 'ac', from: 10, to: 1e6, pointsPerDecade: 8, spacing: 'log',
      amplitude: { mode: 'auto', targetOutputVpp: 2 }, measurement: 'scope', minCycles: 10, averages: 4, refine: (options.refinementHz ?? []).length > 0,
      operator: 'J. Doe (invented)', notes: INVENTED_NOTE, limits,
    },
    bench: SIMULATED_BENCH,
    softwareVersion: '0.1.0',
    points: {
      step: frequencies.map((_, i) => i),
      stimulus: frequencies,
      amplitudeVpp: frequencies.map(() => 0.2),
      gainDb: measuredGain,
      gainUncertaintyDb: frequencies.map(() => noiseDb),
      phaseDeg: measuredPhase,
      phaseUncertaintyDeg: frequencies.map(() => 0.3),
      outputV: frequencies.map(() => Number.NaN),
      flags: Array.from(analysis.flags),
      measuredAt: frequencies.map((_, i) => new Date(Date.parse('2026-11-30T10:00:00.000Z') + i * 5000).toISOString()),
    },
    theory: {
      frequencyHz: theoryGrid,
      gainDb: theory.map((t) => t.gainDb),
      phaseDeg: theory.map((t) => t.phaseDeg),
      idealGainDb: theory.map((t) => t.ideal.gainDb),
      idealPhaseDeg: theory.map((t) => t.ideal.phaseDeg),
      bandLowDb: theory.map((t) => t.gainDb - bandWidthDb(t.gainDb, t.ideal.gainDb)),
      bandHighDb: theory.map((t) => t.gainDb + bandWidthDb(t.gainDb, t.ideal.gainDb)),
    },
    figures: analysis.figures,
    verdict: analysis.verdict,
    events: [
      { at: '2026-11-30T10:00:00.000Z', level: 'info', message: 'Run started on the simulated bench.' },
      { at: '2026-11-30T10:02:10.000Z', level: 'warning', message: 'Point 30 retried after a distorted reading.' },
    ],
    theoryGainLimitHz: gainLimitHz,
    theoryMinus3dbHz: [cornerHz],
  };
}

/**
 * A Comparison of two fixture runs on two builds, with differences against a
 * reference run (same frequency grid, so point-by-point), as the service would
 * produce. Figures' deltas are run minus reference.
 */
export function comparisonFixture(
  reference: number | 'theory' = 12,
  options: Pick<AcFixtureOptions, 'refinementHz'> = {},
): { comparison: Comparison; contexts: Map<number, { design: unknown; build: BuildRecord }> } {
  const buildA = fixtureBuild();
  const buildB = fixtureBuild({ id: 4, label: 'Board B (PCB rev 2)', actualValues: { RN: 10.05e3, RF: 99.1e3, CF: 1.43e-9 }, notes: `${INVENTED_NOTE} Second board.` });
  const runA = acRunDetail({ runId: 12, build: buildA, seed: 3, ...options });
  const runB = acRunDetail({ runId: 15, build: buildB, seed: 11, ...options });
  const runs = [runA, runB];
  const referenceRun = runs.find((r) => r.id === reference);
  const differences = runs.map((run) => {
    // Against theory: measured − theory of the same run (interpolated on its own fine grid is not needed:
    // the fixture theory is evaluated exactly at each point).
    const deltaDb = run.points.gainDb.map((g, i) => {
      if (referenceRun) return g - referenceRun.points.gainDb[i];
      const build = run.id === 12 ? buildA : buildB;
      const [re, im] = invertingLowPass({ ...NOMINAL_STAGE, inputOhm: build.actualValues.RN, feedbackOhm: build.actualValues.RF, feedbackF: build.actualValues.CF }, run.points.stimulus[i]);
      return g - dbFromRatio(Math.hypot(re, im));
    });
    return { runId: run.id, stimulus: run.points.stimulus, deltaDb };
  });
  const figureDelta = (run: RunDetail, key: 'passbandGainDb' | 'gainLimitHz' | 'maxDeviationDb') => {
    const value = run.figures[key];
    const base = referenceRun ? referenceRun.figures[key] : key === 'gainLimitHz' ? run.theoryGainLimitHz : key === 'passbandGainDb' ? 20 : 0;
    return value !== undefined && base !== undefined ? value - base : undefined;
  };
  const comparison: Comparison = {
    runs,
    referenceRunId: reference,
    differences,
    figureTable: runs.map((run) => ({
      runId: run.id,
      label: run.buildLabel,
      figures: run.figures,
      deltas: {
        passbandGainDb: figureDelta(run, 'passbandGainDb'),
        gainLimitHz: figureDelta(run, 'gainLimitHz'),
        minus3dbHz: run.figures.minus3dbHz[0] - (referenceRun ? referenceRun.figures.minus3dbHz[0] : run.theoryMinus3dbHz[0]),
      },
      verdict: run.verdict,
    })),
  };
  return { comparison, contexts: new Map([[12, { design: FIXTURE_DESIGN, build: buildA }], [15, { design: FIXTURE_DESIGN, build: buildB }]]) };
}

/** The invented log-stage design (same values as app/circuit/examples/log-stage.json). */
export const LOG_STAGE_DESIGN = {
  name: 'Diode-feedback log stage',
  description: INVENTED_NOTE,
  input: 'in',
  output: 'out',
  temperatureC: 25,
  parts: [
    { id: 'R1', type: 'resistor', nodes: ['in', 'inv'], value: '10k', tolerance: 0.01 },
    { id: 'D1', type: 'diode', nodes: ['inv', 'out'], model: { is: 1e-14, n: 1.0, rs: 0.5 } },
    { id: 'U1', type: 'opamp', nodes: ['0', 'inv', 'out'], model: { openLoopGain: 1e5, gbw: 1e6, slewRate: 5e5, rails: [-12, 12] } },
  ],
};

/**
 * A DC log-stage run: output from the log-stage equation (app/circuit logStageIdeal,
 * DEVELOPERS.md "Theory") plus seeded noise, fitted with app/signal's fitLogStage, and the
 * fitted curve drawn as the service does.
 */
export function dcRunDetail(): { detail: RunDetail; build: BuildRecord; dcFit: RecordDcFit } {
  const build = fixtureBuild({ id: 5, designId: 2, label: 'Log stage board', actualValues: { R1: 10.02e3 } });
  const noise = seededNoise(5);
  const inputs = Array.from(logGrid(1e-3, 10, 6));
  const diode = { is: 1e-14, n: 1.0, rs: 0.5 };
  const outputs = inputs.map((v) => logStageIdeal(v, 10.02e3, diode, 25) + 0.0005 * noise());
  const fit = fitLogStage(inputs, outputs, 10.02e3, 25, { n: 1, isA: 1e-14, rsOhm: 0.5 });
  const curveInputs = Array.from(logGrid(1e-3, 10, 12));
  const dcFit: RecordDcFit = {
    inputV: curveInputs,
    outputV: curveInputs.map((v) => logStageIdeal(v, 10.02e3, { is: fit.isA, n: fit.n, rs: fit.rsOhm }, 25)),
    description: `fitted n = ${fit.n.toPrecision(4)}`,
  };
  const count = inputs.length;
  const detail: RunDetail = {
    id: 21, uid: 'c47d1e09-8a2b-4e3f-b6d5-1f0a9c8e7b21', offlinePeriods: [], buildId: build.id, buildLabel: build.label, designName: LOG_STAGE_DESIGN.name, kind: 'dc', status: 'done',
    startedAt: '2026-11-30T11:00:00.000Z', endedAt: '2026-11-30T11:01:00.000Z', pointCount: count, plannedCount: count, simulated: true, benchName: 'simulated bench 1', owner: null,
    request: {
      buildId: build.id, kind: 'dc', from: 1e-3, to: 10, pointsPerDecade: 6, spacing: 'log', amplitude: { mode: 'fixed', vpp: 0 },
      measurement: 'meter', minCycles: 1, averages: 1, refine: false, operator: 'J. Doe (invented)', notes: INVENTED_NOTE,
    },
    bench: [SIMULATED_BENCH[0], { ...SIMULATED_BENCH[1], role: 'meter', profileId: 'generic-meter', identity: { manufacturer: 'Rolloff', model: 'Virtual meter', serialNumber: 'VB-METER-0003', firmware: '0.1.0' } }],
    softwareVersion: '0.1.0',
    points: {
      step: inputs.map((_, i) => i), stimulus: inputs, amplitudeVpp: inputs.map(() => 0), gainDb: inputs.map(() => Number.NaN),
      gainUncertaintyDb: inputs.map(() => Number.NaN), phaseDeg: inputs.map(() => Number.NaN), phaseUncertaintyDeg: inputs.map(() => Number.NaN),
      outputV: outputs, flags: inputs.map(() => 0), measuredAt: inputs.map((_, i) => new Date(Date.parse('2026-11-30T11:00:00.000Z') + i * 2000).toISOString()),
    },
    theory: { frequencyHz: [], gainDb: [], phaseDeg: [], idealGainDb: [], idealPhaseDeg: [] },
    figures: { minus3dbHz: [], logFit: logFitFigures(fit) },
    verdict: null,
    events: [],
    theoryMinus3dbHz: [],
  };
  return { detail, build, dcFit };
}
