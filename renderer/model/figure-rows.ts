/**
 * A run's extracted figures as the Sweep view lists them: one row per figure,
 * labelled with the table's names (app/contract/vocabulary.ts) as the CLI
 * summary and the records are, the computed value beside the measured one.
 */
import type { RunFigures } from '../../app/contract/contract';
import { FIGURE_NAMES, PHASE_MARGIN_ESTIMATE_BASIS, theoryAside } from '../../app/contract/vocabulary';
import { formatEngineering, formatFixed, formatWithUncertainty } from '../../app/units';
import { formatDb, formatHz } from './format';

export function figureRows(figures: RunFigures): Array<[string, string]> {
  const rows: Array<[string, string]> = [];
  const deg = (v: number) => `${formatFixed(v, 1)}°`;
  if (figures.passbandGainDb !== undefined) rows.push([FIGURE_NAMES.passbandGainDb, formatDb(figures.passbandGainDb)]);
  if (figures.minus3dbHz.length > 0) rows.push([FIGURE_NAMES.minus3dbHz, figures.minus3dbHz.map((f) => formatHz(f)).join(', ')]);
  if (figures.gainLimitHz !== undefined) rows.push([FIGURE_NAMES.gainLimitHz, formatHz(figures.gainLimitHz)]);
  if (figures.gbwEstimateHz !== undefined) rows.push([FIGURE_NAMES.gbwEstimateHz, figures.gbwUncertaintyHz !== undefined ? `${formatWithUncertainty(figures.gbwEstimateHz, figures.gbwUncertaintyHz, 'Hz')} (1σ)` : formatHz(figures.gbwEstimateHz)]);
  if (figures.rolloffDbPerDecade !== undefined) rows.push([FIGURE_NAMES.rolloffDbPerDecade, `${formatFixed(figures.rolloffDbPerDecade, 1)} dB/decade`]);
  if (figures.maxDeviationDb !== undefined) rows.push([FIGURE_NAMES.maxDeviationDb, formatDb(figures.maxDeviationDb)]);
  if (figures.closedLoopPeakingDb !== undefined) {
    rows.push([FIGURE_NAMES.closedLoopPeakingDb, `${formatDb(figures.closedLoopPeakingDb)}${figures.theoryPeakingDb !== undefined ? ` ${theoryAside(formatDb(figures.theoryPeakingDb))}` : ''}`]);
  }
  if (figures.phaseMarginEstimateDeg !== undefined) {
    const bound = figures.phaseMarginEstimateIsLowerBound ? '≥ ' : '';
    const theory = figures.theoryPhaseMarginDeg !== undefined ? ` ${theoryAside(deg(figures.theoryPhaseMarginDeg))}` : '';
    rows.push([FIGURE_NAMES.phaseMarginEstimateDeg, `${bound}${deg(figures.phaseMarginEstimateDeg)} ${PHASE_MARGIN_ESTIMATE_BASIS}${theory}`]);
  }
  for (const warning of figures.theoryWarnings ?? []) rows.push([FIGURE_NAMES.theoryWarning, warning]);
  const fit = figures.logFit;
  if (fit) {
    const interval = (value: number, ci: [number, number], unit: string) => `${formatEngineering(value, unit)} (95 %: ${formatEngineering(ci[0], unit)} … ${formatEngineering(ci[1], unit)})`;
    rows.push([FIGURE_NAMES.diodeIdealityN, `${formatFixed(fit.n, 3)} (95 %: ${formatFixed(fit.nCi[0], 3)} … ${formatFixed(fit.nCi[1], 3)})`]);
    rows.push([FIGURE_NAMES.diodeSaturationCurrentA, interval(fit.isA, fit.isCi, 'A')]);
    rows.push([FIGURE_NAMES.diodeSeriesResistanceOhm, interval(fit.rsOhm, fit.rsCi, 'Ω')]);
  }
  return rows;
}
