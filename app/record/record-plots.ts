/**
 * Which plots a record shows, built from the record alone:
 * run (AC) → Bode gain and phase, measured over theory, tolerance band,
 *            gain-limit point and −3 dB frequencies marked;
 * run (DC) → transfer curve, measured points and the fitted curve;
 * comparison → overlay of all runs and their difference from the reference;
 * noise run (scope) → the measured density with its 95 % interval over the
 *            computed density, log-log.
 */
import { formatEngineering, unwrapPhaseDeg } from '../units';
import { ascendingOrder, curveSortedByX } from '../numeric';
import { FIGURE_NAMES } from '../contract/vocabulary';
import { linearAxis, logAxis, type Axis } from './plot-axes';
import { recordOutputV, type ComparisonRecord, type MaybeNumber, type NoiseRunRecord, type RunRecord } from './model';
import type { PlotMarker, PlotSeries, PlotSpec } from './plot-spec';
import { CURVE_NAMES, PLOT_PALETTE, runColour } from '../contract/plot-palette';

/** The window's palette and curve names (app/contract/plot-palette.ts). */
const PLOT_COLORS = PLOT_PALETTE;
const THEORY_NAME = `${CURVE_NAMES.theory} (actual circuit)`;
const MEASURED_NAME = `${CURVE_NAMES.measured} ± uncertainty`;

export function runPlots(record: RunRecord): PlotSpec[] {
  return record.run.kind === 'dc' ? [dcTransferPlot(record)] : [gainPlot(record), phasePlot(record)];
}

export function comparisonPlots(record: ComparisonRecord): PlotSpec[] {
  return [overlayPlot(record), differencePlot(record)];
}

function stimulusAxis(record: RunRecord, extra: MaybeNumber[] = []): Axis {
  const values = [...record.points.stimulus, ...record.theory.stimulus, ...extra];
  return logAxis(values, 'Frequency (Hz)', 'Hz');
}

function gainMarkers(record: RunRecord): PlotMarker[] {
  const markers: PlotMarker[] = [];
  if (record.theory.gainLimitHz !== null) {
    markers.push({ name: `${FIGURE_NAMES.gainLimitHz} (theory)`, color: PLOT_COLORS.gainLimitTheory, x: record.theory.gainLimitHz, label: `gain limit ${formatEngineering(record.theory.gainLimitHz, 'Hz', 3)}` });
  }
  if (record.figures.gainLimitHz !== undefined && record.figures.gainLimitHz !== null) {
    markers.push({ name: `${FIGURE_NAMES.gainLimitHz} (measured)`, color: PLOT_COLORS.gainLimitMeasured, x: record.figures.gainLimitHz, label: `meas. gain limit ${formatEngineering(record.figures.gainLimitHz, 'Hz', 3)}` });
  }
  for (const f of record.theory.minus3dbHz) {
    markers.push({ name: '−3 dB (theory)', color: PLOT_COLORS.minus3dbTheory, x: f, label: `−3 dB ${formatEngineering(f, 'Hz', 3)}` });
  }
  for (const f of record.figures.minus3dbHz ?? []) {
    markers.push({ name: '−3 dB (measured)', color: PLOT_COLORS.minus3dbMeasured, x: f, label: `meas. −3 dB ${formatEngineering(f, 'Hz', 3)}` });
  }
  return markers;
}

function gainPlot(record: RunRecord): PlotSpec {
  const { points, theory } = record;
  const yValues = [...points.gainDb, ...theory.gainDb, ...(theory.bandLowDb ?? []), ...(theory.bandHighDb ?? [])];
  const series: PlotSeries[] = [];
  if (theory.idealGainDb.some((v) => v !== null)) series.push({ name: CURVE_NAMES.ideal, color: PLOT_COLORS.ideal, style: 'dashed', xs: theory.stimulus, ys: theory.idealGainDb });
  if (theory.stimulus.length) series.push({ name: THEORY_NAME, color: PLOT_COLORS.theory, style: 'line', xs: theory.stimulus, ys: theory.gainDb });
  series.push({ name: MEASURED_NAME, color: PLOT_COLORS.measured, style: 'points', xs: points.stimulus, ys: points.gainDb, errors: points.gainUncertaintyDb });
  return {
    title: 'Gain',
    x: stimulusAxis(record),
    y: linearAxis(yValues, 'Gain (dB)', ''),
    bands: theory.bandLowDb && theory.bandHighDb ? [{ name: CURVE_NAMES.toleranceBand, color: PLOT_COLORS.toleranceBand, xs: theory.stimulus, lows: theory.bandLowDb, highs: theory.bandHighDb }] : [],
    series,
    markers: gainMarkers(record),
  };
}

/** Linear interpolation in log-frequency; null outside the grid. */
function interpolateLog(xs: MaybeNumber[], ys: MaybeNumber[], x: number): number | null {
  for (let i = 1; i < xs.length; i++) {
    const x0 = xs[i - 1];
    const x1 = xs[i];
    const y0 = ys[i - 1];
    const y1 = ys[i];
    if (x0 === null || x1 === null || y0 === null || y1 === null || x0 <= 0 || x1 <= 0) continue;
    if ((x >= x0 && x <= x1) || (x <= x0 && x >= x1)) {
      const t = x1 === x0 ? 0 : Math.log(x / x0) / Math.log(x1 / x0);
      return y0 + t * (y1 - y0);
    }
  }
  return null;
}

/**
 * Unwraps a phase column along increasing frequency (refinement points are stored last, and unwrapping
 * follows neighbours) with the one unwrap in app/units, keeping null gaps as gaps.
 */
function unwrapColumn(values: MaybeNumber[], stimulus: MaybeNumber[]): MaybeNumber[] {
  const present = ascendingOrder(stimulus).filter((i) => values[i] !== null);
  const unwrapped = unwrapPhaseDeg(Float64Array.from(present.map((i) => values[i]!)));
  const result: MaybeNumber[] = values.map(() => null);
  present.forEach((index, k) => (result[index] = unwrapped[k]));
  return result;
}

/** Shifts a phase curve by whole turns so it lies on the same branch as a reference curve. */
function alignToReference(phases: MaybeNumber[], stimulus: MaybeNumber[], refStimulus: MaybeNumber[], refPhases: MaybeNumber[]): MaybeNumber[] {
  const first = phases.findIndex((p, i) => p !== null && stimulus[i] !== null);
  if (first < 0) return phases;
  const reference = interpolateLog(refStimulus, refPhases, stimulus[first]!);
  if (reference === null) return phases;
  const turns = Math.round((reference - phases[first]!) / 360);
  return phases.map((p) => (p === null ? null : p + 360 * turns));
}

function phasePlot(record: RunRecord): PlotSpec {
  const { points, theory } = record;
  const theoryPhase = unwrapColumn(theory.phaseDeg, theory.stimulus);
  const idealPhase = alignToReference(unwrapColumn(theory.idealPhaseDeg, theory.stimulus), theory.stimulus, theory.stimulus, theoryPhase);
  const measuredPhase = alignToReference(unwrapColumn(points.phaseDeg, points.stimulus), points.stimulus, theory.stimulus, theoryPhase);
  const series: PlotSeries[] = [];
  if (idealPhase.some((v) => v !== null)) series.push({ name: CURVE_NAMES.ideal, color: PLOT_COLORS.ideal, style: 'dashed', xs: theory.stimulus, ys: idealPhase });
  if (theory.stimulus.length) series.push({ name: THEORY_NAME, color: PLOT_COLORS.theory, style: 'line', xs: theory.stimulus, ys: theoryPhase });
  series.push({ name: MEASURED_NAME, color: PLOT_COLORS.measured, style: 'points', xs: points.stimulus, ys: measuredPhase, errors: points.phaseUncertaintyDeg });
  return {
    title: 'Phase',
    x: stimulusAxis(record),
    y: linearAxis([...theoryPhase, ...measuredPhase], 'Phase (°)', ''),
    bands: [],
    series,
    markers: gainMarkers(record).filter((m) => m.name.startsWith(FIGURE_NAMES.gainLimitHz)),
  };
}

function inputAxis(values: MaybeNumber[]): Axis {
  const finite = values.filter((v): v is number => v !== null);
  // A log stage is swept over decades of input; fall back to linear if any input is ≤ 0.
  return finite.length > 0 && finite.every((v) => v > 0) ? logAxis(finite, 'Input (V)', 'V') : linearAxis(finite, 'Input (V)', 'V');
}

function dcTransferPlot(record: RunRecord): PlotSpec {
  const { points, dcFit } = record;
  const series: PlotSeries[] = [];
  if (dcFit) series.push({ name: 'Fitted curve', color: PLOT_COLORS.theory, style: 'line', xs: dcFit.inputV, ys: dcFit.outputV });
  series.push({ name: CURVE_NAMES.measured, color: PLOT_COLORS.measured, style: 'points', xs: points.stimulus, ys: recordOutputV(points) });
  return {
    title: 'DC transfer',
    x: inputAxis([...points.stimulus, ...(dcFit?.inputV ?? [])]),
    y: linearAxis([...recordOutputV(points), ...(dcFit?.outputV ?? [])], 'Output (V)', 'V'),
    bands: [],
    series,
    markers: [],
  };
}

function runLegendName(run: RunRecord): string {
  return `Run ${run.run.id} — ${run.build.label}`;
}

function overlayPlot(record: ComparisonRecord): PlotSpec {
  const dc = record.runs.every((r) => r.run.kind === 'dc');
  const series: PlotSeries[] = [];
  const first = record.runs[0];
  if (!dc && record.reference === 'theory' && first.theory.stimulus.length) {
    series.push({ name: `${CURVE_NAMES.theory} (run ${first.run.id})`, color: PLOT_COLORS.theory, style: 'dashed', xs: first.theory.stimulus, ys: first.theory.gainDb });
  }
  record.runs.forEach((run, i) => {
    const color = runColour(i, record.runs.length);
    // Points are stored in measuring order (refinement points last); the line runs in stimulus order.
    const curve = curveSortedByX({ xs: run.points.stimulus, ys: dc ? recordOutputV(run.points) : run.points.gainDb });
    series.push({ name: runLegendName(run) + (run.run.id === record.reference ? ' (reference)' : ''), color, style: 'line', ...curve });
  });
  const xs = series.flatMap((s) => s.xs);
  const ys = series.flatMap((s) => s.ys);
  return {
    title: dc ? 'Overlay: DC transfer' : 'Overlay: gain',
    x: dc ? inputAxis(xs) : logAxis(xs, 'Frequency (Hz)', 'Hz'),
    y: dc ? linearAxis(ys, 'Output (V)', 'V') : linearAxis(ys, 'Gain (dB)', ''),
    bands: [],
    series,
    markers: [],
  };
}

function differencePlot(record: ComparisonRecord): PlotSpec {
  const dc = record.runs.every((r) => r.run.kind === 'dc');
  const series: PlotSeries[] = record.differences.map((difference) => {
    const index = record.runs.findIndex((r) => r.run.id === difference.runId);
    const run = record.runs[index];
    const curve = curveSortedByX({ xs: difference.stimulus, ys: difference.deltaDb });
    return { name: run ? runLegendName(run) : `Run ${difference.runId}`, color: runColour(Math.max(0, index), record.runs.length), style: 'line' as const, ...curve };
  });
  const xs = series.flatMap((s) => s.xs);
  const reference = record.reference === 'theory' ? 'theory' : `run ${record.reference}`;
  return {
    title: `Difference from ${reference}`,
    x: dc ? inputAxis(xs) : logAxis(xs, 'Frequency (Hz)', 'Hz'),
    y: linearAxis([0, ...series.flatMap((s) => s.ys)], `Measured − ${reference} (dB)`, ''),
    bands: [],
    series,
    markers: [],
  };
}

export function noisePlots(record: NoiseRunRecord): PlotSpec[] {
  const { density } = record;
  if (density.frequencyHz.length === 0) return [];
  return [{
    title: 'Output noise density',
    x: logAxis(density.frequencyHz, 'Frequency (Hz)', 'Hz'),
    y: logAxis([...density.low95VPerRtHz, ...density.high95VPerRtHz, ...density.computedVPerRtHz], 'Noise density (V/√Hz)', 'V/√Hz'),
    bands: [{ name: CURVE_NAMES.measuredInterval, color: PLOT_COLORS.measured, xs: density.frequencyHz, lows: density.low95VPerRtHz, highs: density.high95VPerRtHz }],
    series: [
      { name: CURVE_NAMES.measured, color: PLOT_COLORS.measured, style: 'line', xs: density.frequencyHz, ys: density.measuredVPerRtHz },
      { name: THEORY_NAME, color: PLOT_COLORS.theory, style: 'line', xs: density.frequencyHz, ys: density.computedVPerRtHz },
    ],
    markers: [],
  }];
}
