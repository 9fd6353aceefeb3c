/** Words and number formats a record uses, shared by every format so they say the same thing. */
import { PointFlag, type InstrumentIdentity, type RunFigures, type Verdict } from '../contract/contract';
import { formatEngineering, formatFixed, formatPrecision, formatWithUncertainty } from '../units';
import type { MaybeNumber } from './model';
import { FIGURE_NAMES, PHASE_MARGIN_ESTIMATE_BASIS, theoryAside } from '../contract/vocabulary';

/** Point flags as words: one table for every surface (app/contract/vocabulary.ts). */
export { flagWords, FLAG_WORDS as FLAG_NAMES } from '../contract/vocabulary';

export function formatMaybe(value: MaybeNumber | undefined, format: (v: number) => string, missing = '—'): string {
  return value === null || value === undefined || !Number.isFinite(value) ? missing : format(value);
}

export const formatHz = (value: number) => formatEngineering(value, 'Hz', 4);
export const formatVolts = (value: number) => formatEngineering(value, 'V', 4);
export const formatDb = (value: number, decimals = 2) => `${formatFixed(value, decimals)} dB`;
export const formatDeg = (value: number, decimals = 1) => `${formatFixed(value, decimals)}°`;
/**
 * A point's gain (dB) or phase (°) with its stored uncertainty, rounded together as the GUM
 * reports them (app/units/uncertainty.ts), with no SI prefix on dB or °; the value alone
 * (three decimals) when the point has no uncertainty.
 */
export function formatMeasured(value: number, uncertainty: MaybeNumber | undefined, unit: 'dB' | '°'): string {
  return formatWithUncertainty(value, uncertainty ?? Number.NaN, unit, { prefix: false });
}

/** The reply an instrument gave to *IDN? (IEEE 488.2 §10.14: four comma-separated fields). */
export function idnText(identity: InstrumentIdentity): string {
  return [identity.manufacturer, identity.model, identity.serialNumber, identity.firmware].join(',');
}

export function verdictHeadline(verdict: Verdict | null): string {
  if (!verdict) return 'NO VERDICT (no limits were set for this run)';
  return verdict.pass ? 'PASS' : 'FAIL';
}

export interface FigureLine {
  key: keyof RunFigures | 'logFit.n' | 'logFit.isA' | 'logFit.rsOhm';
  label: string;
  value: string;
}

/** Extracted figures as labelled lines; only figures the run has. */
export function figureLines(figures: RunFigures): FigureLine[] {
  const lines: FigureLine[] = [];
  if (isNumber(figures.passbandGainDb)) lines.push({ key: 'passbandGainDb', label: FIGURE_NAMES.passbandGainDb, value: formatDb(figures.passbandGainDb) });
  if (figures.minus3dbHz && figures.minus3dbHz.length > 0) lines.push({ key: 'minus3dbHz', label: FIGURE_NAMES.minus3dbHz, value: figures.minus3dbHz.map(formatHz).join(', ') });
  if (isNumber(figures.rolloffDbPerDecade)) lines.push({ key: 'rolloffDbPerDecade', label: FIGURE_NAMES.rolloffDbPerDecade, value: `${formatFixed(figures.rolloffDbPerDecade, 1)} dB/decade` });
  if (isNumber(figures.gainLimitHz)) lines.push({ key: 'gainLimitHz', label: FIGURE_NAMES.gainLimitHz, value: `${formatHz(figures.gainLimitHz)} (loop gain = 1)` });
  if (isNumber(figures.gbwEstimateHz)) {
    const value = isNumber(figures.gbwUncertaintyHz) ? `${formatWithUncertainty(figures.gbwEstimateHz, figures.gbwUncertaintyHz, 'Hz')} (1σ)` : formatHz(figures.gbwEstimateHz);
    lines.push({ key: 'gbwEstimateHz', label: FIGURE_NAMES.gbwEstimateHz, value });
  }
  if (isNumber(figures.maxDeviationDb)) lines.push({ key: 'maxDeviationDb', label: FIGURE_NAMES.maxDeviationDb, value: formatDb(figures.maxDeviationDb) });
  if (isNumber(figures.closedLoopPeakingDb)) {
    const theory = isNumber(figures.theoryPeakingDb) ? ` ${theoryAside(formatDb(figures.theoryPeakingDb))}` : '';
    lines.push({ key: 'closedLoopPeakingDb', label: FIGURE_NAMES.closedLoopPeakingDb, value: `${formatDb(figures.closedLoopPeakingDb)} over the ideal gain${theory}` });
  }
  if (isNumber(figures.phaseMarginEstimateDeg)) {
    const theory = isNumber(figures.theoryPhaseMarginDeg) ? ` ${theoryAside(formatDeg(figures.theoryPhaseMarginDeg))}` : '';
    const bound = figures.phaseMarginEstimateIsLowerBound ? 'at least ' : '';
    lines.push({ key: 'phaseMarginEstimateDeg', label: FIGURE_NAMES.phaseMarginEstimateDeg, value: `${bound}${formatDeg(figures.phaseMarginEstimateDeg)} ${PHASE_MARGIN_ESTIMATE_BASIS}${theory}` });
  }
  for (const warning of figures.theoryWarnings ?? []) lines.push({ key: 'theoryWarnings', label: FIGURE_NAMES.theoryWarning, value: warning });
  const fit = figures.logFit;
  if (fit) {
    const ci = (pair: [number, number], format: (v: number) => string) => `95 % interval ${format(pair[0])} … ${format(pair[1])}`;
    const plain = (v: number) => formatPrecision(v, 4);
    lines.push({ key: 'logFit.n', label: FIGURE_NAMES.diodeIdealityN, value: `${plain(fit.n)} (${ci(fit.nCi, plain)})` });
    lines.push({ key: 'logFit.isA', label: FIGURE_NAMES.diodeSaturationCurrentA, value: `${formatEngineering(fit.isA, 'A', 4)} (${ci(fit.isCi, (v) => formatEngineering(v, 'A', 4))})` });
    lines.push({ key: 'logFit.rsOhm', label: FIGURE_NAMES.diodeSeriesResistanceOhm, value: `${formatEngineering(fit.rsOhm, 'Ω', 4)} (${ci(fit.rsCi, (v) => formatEngineering(v, 'Ω', 4))})` });
  }
  return lines;
}

function isNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

/** "2026-11-30T10:01:00.000Z to 2026-11-30T10:02:30.000Z (90 s)": one time the bench kept its points in its outbox. */
export function offlinePeriodText(period: { from: string; to: string }): string {
  const seconds = Math.round((Date.parse(period.to) - Date.parse(period.from)) / 1000);
  return `${period.from} to ${period.to} (${seconds} s)`;
}

/** All of a run's offline periods on one line, or '—' when it never lost its store. */
export function offlinePeriodsText(periods: ReadonlyArray<{ from: string; to: string }> | undefined): string {
  return periods && periods.length > 0 ? periods.map(offlinePeriodText).join('; ') : '—';
}
