/**
 * A noise run's figures as labelled rows, the one wording the terminal, the
 * window and the records use (names from app/contract/vocabulary.ts; a value
 * with its uncertainty rounded together, app/units/uncertainty.ts).
 */
import type { NoiseFigures } from '../contract/contract';
import { FIGURE_NAMES } from '../contract/vocabulary';
import { formatEngineering, formatFixed, formatWithUncertainty } from '../units';

export function noiseFigureRows(figures: NoiseFigures): Array<[string, string]> {
  const rows: Array<[string, string]> = [];
  const measured = figures.measuredRmsUncertaintyV !== undefined
    ? `${formatWithUncertainty(figures.measuredRmsV, figures.measuredRmsUncertaintyV, 'V')} RMS (1σ)`
    : `${formatEngineering(figures.measuredRmsV, 'V')} RMS`;
  rows.push(['Band', `${formatEngineering(figures.fromHz, 'Hz')} – ${formatEngineering(figures.toHz, 'Hz')}`]);
  rows.push([FIGURE_NAMES.noiseMeasuredRmsV, `${measured}, from ${figures.recordsUsed} record${figures.recordsUsed === 1 ? '' : 's'}`]);
  rows.push([FIGURE_NAMES.noiseComputedRmsV, `${formatEngineering(figures.computedRmsV, 'V')} RMS`]);
  if (figures.densityRelativeUncertainty !== undefined && figures.degreesOfFreedom !== undefined) {
    rows.push([`${FIGURE_NAMES.noiseDensity}, uncertainty per bin`, `±${formatFixed(figures.densityRelativeUncertainty * 100, 1)} % (1σ; ν = ${formatFixed(figures.degreesOfFreedom, 0)} from ${figures.segments} averaged segments)`]);
  }
  if (figures.enbwHz !== undefined && figures.resolutionHz !== undefined) {
    rows.push(['Equivalent noise bandwidth per bin', `${formatEngineering(figures.enbwHz, 'Hz')} (bins ${formatEngineering(figures.resolutionHz, 'Hz')} apart)`]);
  }
  if (figures.shareWithin95 !== undefined && figures.bins !== undefined) {
    rows.push([FIGURE_NAMES.noiseShareWithin95, `${formatFixed(figures.shareWithin95 * 100, 1)} % of ${figures.bins}`]);
  }
  if (figures.meanDeviationDb !== undefined) {
    const db = figures.meanDeviationDb;
    rows.push([FIGURE_NAMES.noiseMeanDeviationDb, `${db > 0 ? '+' : ''}${formatFixed(db, 2)} dB`]);
  }
  return rows;
}
