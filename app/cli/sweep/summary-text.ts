/** Plain-text summaries of runs for the terminal. */
import type { RunDetail, RunFigures, RunSummary } from '../../contract/contract';
import { shownStatus } from '../../contract/run-owner-text';
import { formatEngineering, formatFixed, formatPrecision, formatWithUncertainty } from '../../units';
import { FIGURE_NAMES, pointCountText } from '../../contract/vocabulary';
import { offlinePeriodsText } from '../../record/pure';

export function figureLines(figures: RunFigures, theory?: { gainLimitHz?: number; minus3dbHz: number[] }): string[] {
  const lines: string[] = [];
  const hz = (v: number | undefined) => (v === undefined ? '—' : formatEngineering(v, 'Hz'));
  if (figures.passbandGainDb !== undefined) lines.push(`pass-band gain      ${formatFixed(figures.passbandGainDb, 3)} dB`);
  if (figures.logFit) return logFitLines(figures.logFit);
  lines.push(`${FIGURE_NAMES.minus3dbHz.padEnd(20)}${figures.minus3dbHz.length ? figures.minus3dbHz.map(hz).join(', ') : '—'}${theory ? `   (theory ${theory.minus3dbHz.length ? theory.minus3dbHz.map(hz).join(', ') : '—'})` : ''}`);
  if (figures.rolloffDbPerDecade !== undefined) lines.push(`roll-off            ${formatFixed(figures.rolloffDbPerDecade, 1)} dB/decade`);
  lines.push(`gain-limit point    ${hz(figures.gainLimitHz)}${theory ? `   (theory ${hz(theory.gainLimitHz)})` : ''}`);
  if (figures.gbwEstimateHz !== undefined) {
    lines.push(`${`${FIGURE_NAMES.gbwEstimateHz} estimate`.padEnd(20)}${figures.gbwUncertaintyHz !== undefined ? `${formatWithUncertainty(figures.gbwEstimateHz, figures.gbwUncertaintyHz, 'Hz')} (1σ)` : hz(figures.gbwEstimateHz)}`);
  }
  if (figures.maxDeviationDb !== undefined) lines.push(`largest deviation   ${formatFixed(figures.maxDeviationDb, 3)} dB from theory (pass band)`);
  lines.push(...stabilityLines(figures));
  return lines;
}

/** Measured closed-loop peaking and its phase-margin estimate, beside the computed values. */
export function stabilityLines(figures: RunFigures): string[] {
  const lines: string[] = [];
  const deg = (v: number | undefined) => (v === undefined ? '—' : `${formatFixed(v, 1)}°`);
  const db = (v: number | undefined) => (v === undefined ? '—' : `${formatFixed(v, 2)} dB`);
  if (figures.closedLoopPeakingDb !== undefined) lines.push(`closed-loop peaking ${db(figures.closedLoopPeakingDb)}   (theory ${db(figures.theoryPeakingDb)})`);
  if (figures.phaseMarginEstimateDeg !== undefined) {
    const estimate = `${figures.phaseMarginEstimateIsLowerBound ? '≥ ' : ''}${deg(figures.phaseMarginEstimateDeg)}`;
    lines.push(`phase margin        ${estimate} estimated from the peaking (second-order loop)   (theory ${deg(figures.theoryPhaseMarginDeg)})`);
  }
  for (const warning of figures.theoryWarnings ?? []) lines.push(`warning             ${warning}`);
  return lines;
}

function logFitLines(f: NonNullable<RunFigures['logFit']>): string[] {
  return [
    `log fit n           ${formatPrecision(f.n, 4)}  [${f.nCi.map((v) => formatPrecision(v, 4)).join(', ')}] (95 %)`,
    `log fit IS          ${formatEngineering(f.isA, 'A')}  [${f.isCi.map((v) => formatEngineering(v, 'A')).join(', ')}]`,
    `log fit RS          ${formatEngineering(f.rsOhm, 'Ω')}  [${f.rsCi.map((v) => formatEngineering(v, 'Ω')).join(', ')}]`,
  ];
}

/** The design's diode model, printed beside a log-stage fit so the two can be compared. */
export interface DiodeTheory {
  n: number;
  isA: number;
  rsOhm: number;
}

export function runDetailText(detail: RunDetail, diode?: DiodeTheory): string {
  const lines = [
    `run ${detail.id}  ${detail.kind.toUpperCase()}  ${detail.status}${detail.simulated ? '  (SIMULATED: simulated bench)' : ''}`,
    `build "${detail.buildLabel}" of design "${detail.designName}"`,
    `points ${pointCountText(detail.plannedCount, detail.points.flags)}   started ${detail.startedAt ?? '—'}   ended ${detail.endedAt ?? '—'}`,
    ...((detail.offlinePeriods ?? []).length > 0 ? [`store unreachable, points kept in the bench's outbox: ${offlinePeriodsText(detail.offlinePeriods)}`] : []),
    '',
    ...figureLines(detail.figures, detail.kind === 'ac' ? { gainLimitHz: detail.theoryGainLimitHz, minus3dbHz: detail.theoryMinus3dbHz } : undefined),
  ];
  if (detail.figures.logFit && diode) {
    lines.push(`theory (build)      n ${diode.n}, IS ${formatEngineering(diode.isA, 'A')}, RS ${formatEngineering(diode.rsOhm, 'Ω')}` +
      '   (the fit takes I = Vin/R: source resistance and op-amp input error shift IS and n slightly)');
  }
  if (detail.verdict) lines.push('', `verdict: ${detail.verdict.pass ? 'PASS' : 'FAIL'}`, ...detail.verdict.reasons.map((r) => `  ${r}`));
  return lines.join('\n') + '\n';
}

export function runTable(runs: RunSummary[]): string {
  if (runs.length === 0) return 'No runs.\n';
  const rows = runs.map((r) => [String(r.id), r.kind, shownStatus(r), `${r.pointCount}/${r.plannedCount}`, r.buildLabel, r.designName, r.benchName || '—', r.startedAt ?? '—', r.simulated ? 'simulated' : '']);
  const header = ['run', 'kind', 'status', 'points', 'build', 'design', 'bench', 'started', ''];
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((row) => row[c].length)));
  return [header, ...rows].map((row) => row.map((cell, c) => cell.padEnd(widths[c])).join('  ').trimEnd()).join('\n') + '\n';
}
