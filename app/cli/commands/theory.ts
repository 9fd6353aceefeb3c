/**
 * `rolloff theory`: the computed response of a design — AC gain and phase
 * (with the ideal-op-amp curve and an optional tolerance band), the output
 * noise density with each source's share, or the DC transfer — as a table,
 * CSV or JSON, with each op-amp's stability figures and warnings.
 */
import { ValidationError } from '../../errors';
import { formatEngineering, formatFixed, logGrid, parseEngineering } from '../../units';
import {
  analyzeStability,
  bandNoise,
  DEFAULT_MIN_PHASE_MARGIN_DEG,
  parseDesign,
  solveNoise,
  stabilityWarnings,
  type BandNoise,
  type NoiseResponse,
  type OpAmpStability,
  type TheoryWarning,
  maxUndistortedOutputVpk,
  monteCarloAc,
  slowestTimeConstantS,
  solveAc,
  solveDcTransfer,
  summarizeAc,
  type AcResponse,
  type AcSummary,
  type Design,
  type MonteCarloBand,
  type ToleranceDistribution,
  TOLERANCE_BAND_SETTINGS,
} from '../../circuit';
import { SWEEP_RANGE_DEFAULTS } from '../../sweep/plan/defaults';
import { parseBand } from '../sweep/band-option';
import { perDecadeDefaultText, sweepEndDefaultText } from '../help-defaults';
import { optionFlag, optionNumber, optionString, requirePositional, type CommandSpec, type ParsedArgs } from '../args';
import { FIGURE_NAMES, OUTPUT_COLUMN, POINT_COLUMNS } from '../../contract/vocabulary';
import { DATABASE_OPTION } from '../common-options';
import { chooseDesign, designContent, DESIGN_PLACEHOLDER } from '../design-option';
import { openLocalServiceAt } from '../../service/open-service';
import { resolveDatabasePath } from '../../store';

const AC = SWEEP_RANGE_DEFAULTS.ac;
const DC = SWEEP_RANGE_DEFAULTS.dc;

type Format = 'table' | 'csv' | 'json';

/** The DC transfer's CSV columns: input and output named as in a DC run's records. */
const DC_COLUMNS = [POINT_COLUMNS.inputV, OUTPUT_COLUMN.dc, 'clipped'];

export const theoryCommand: CommandSpec = {
  name: 'theory',
  summary: 'Computed response of a design: AC gain/phase with op-amp limits, tolerance band, output noise, or DC transfer',
  usage: `${DESIGN_PLACEHOLDER} [options]`,
  options: [
    { name: 'from', kind: 'number', placeholder: 'HZ|V', description: `start of the sweep (${sweepEndDefaultText('from')}; engineering notation works: 1m is 1 mV)` },
    { name: 'to', kind: 'number', placeholder: 'HZ|V', description: `end of the sweep (${sweepEndDefaultText('to')}; engineering notation works: 1meg is 1 MHz)` },
    { name: 'per-decade', kind: 'integer', placeholder: 'N', description: `log-spaced points per decade (${perDecadeDefaultText()})` },
    { name: 'csv', kind: 'flag', description: 'print CSV (full precision) instead of a table' },
    { name: 'json', kind: 'flag', description: 'print JSON (columns plus summary) instead of a table' },
    { name: 'summary', kind: 'flag', description: 'print only the figures: pass-band gain, −3 dB frequencies, gain-limit point, roll-off, phase and gain margin (with --noise: margins, peaking and band noise)' },
    { name: 'noise', kind: 'flag', description: 'output noise density (V/√Hz): total, input-referred and each resistor\'s and op-amp\'s share' },
    { name: 'band', kind: 'string', placeholder: 'FROM:TO', description: 'with --noise: band for the RMS noise, Hz (default: the sweep, --from:--to)' },
    { name: 'min-phase-margin', kind: 'number', placeholder: 'DEG', description: 'warn when an op-amp\'s phase margin is below this', defaultValue: DEFAULT_MIN_PHASE_MARGIN_DEG },
    { name: 'tolerance', kind: 'flag', description: 'add a Monte Carlo tolerance band from the parts\' tolerances' },
    // No defaultValue on samples and seed: giving one without --tolerance is refused, so it must be seen as given.
    { name: 'samples', kind: 'integer', placeholder: 'N', description: `Monte Carlo samples (default ${TOLERANCE_BAND_SETTINGS.samples}, as the Design view, the Sweep view and records draw the band)` },
    { name: 'seed', kind: 'integer', placeholder: 'N', description: `Monte Carlo seed: same seed, same band (default ${TOLERANCE_BAND_SETTINGS.seed}, as the Design view, the Sweep view and records)` },
    { name: 'distribution', kind: 'string', placeholder: 'uniform|gaussian', description: 'part value distribution within tolerance', defaultValue: 'uniform' },
    { name: 'ideal', kind: 'flag', description: 'ideal op-amps (no gain or bandwidth limit) for the main curve or the DC transfer' },
    { name: 'dc', kind: 'flag', description: `DC transfer (${DC_COLUMNS.slice(0, 2).join(', ')}) instead of AC, e.g. for the log stage` },
    { ...DATABASE_OPTION, description: `with a stored design's id: ${DATABASE_OPTION.description}` },
  ],
  details: `
The design is a design file, or a stored design's id (rolloff design list).
The defaults are those of rolloff sweep and the Sweep view, so theory and
measurement cover the same range unless you ask otherwise.
Numbers accept engineering notation: --from 1m, --to 2meg.
The tolerance band is the 2.5th–97.5th percentile of gain and phase over the samples
(xoshiro128** generator, so a seed always gives the same band).
Noise (--noise): resistors' thermal noise 4kTR at the design's temperatureC,
and each op-amp's voltageNoiseVPerRtHz / currentNoiseAPerRtHz with their 1/f
corners (voltageNoiseCornerHz, currentNoiseCornerHz; absent means 0). The CSV
columns are frequency_hz, noise_v_per_rthz (total at the output), one
PART_v_per_rthz per source (U1_en, U1_in_plus, U1_in_minus for an op-amp),
then input_referred_v_per_rthz (total ÷ |gain|). The RMS over --band is
integrated on its own grid of 200 points per decade.
Stability: per op-amp the loop-gain crossover, phase margin, gain margin and
closed-loop peaking; a phase margin below --min-phase-margin is a warning
(on stderr with --csv).
Examples:
  rolloff theory app/circuit/examples/inverting-lowpass.json --summary
  rolloff theory design.json --csv --tolerance --samples 2000 --seed 7 > theory.csv
  rolloff theory app/circuit/examples/log-stage.json --dc --from 1m --to 10 --per-decade 5
  rolloff theory design.json --noise --band 10:100k --summary
  rolloff theory design.json --noise --csv --from 1 --to 10meg > noise.csv`,
  async run(parsed) {
    const design = await readDesign(requirePositional(parsed, 0, DESIGN_PLACEHOLDER), parsed);
    const format = outputFormat(parsed);
    if (optionFlag(parsed, 'noise') && optionFlag(parsed, 'dc')) throw new ValidationError('--noise/--dc', 'noise is computed for AC only', 'Drop --dc or --noise.');
    if (optionString(parsed, 'band') !== undefined && !optionFlag(parsed, 'noise')) throw new ValidationError('--band', 'only applies with --noise', 'Add --noise to integrate the noise over a band.');
    const text = optionFlag(parsed, 'dc') ? dcTransfer(design, parsed, format) : optionFlag(parsed, 'noise') ? noiseResponse(design, parsed, format) : acResponse(design, parsed, format);
    process.stdout.write(text);
    return 0;
  },
};

function outputFormat(parsed: ParsedArgs): Format {
  const csv = optionFlag(parsed, 'csv');
  const json = optionFlag(parsed, 'json');
  if (csv && json) throw new ValidationError('--csv/--json', 'choose one output format', 'Give either --csv or --json (or neither for a table).');
  return csv ? 'csv' : json ? 'json' : 'table';
}

function sweepLimits(parsed: ParsedArgs): { fromHz: number; toHz: number } {
  const fromHz = optionNumber(parsed, 'from') ?? AC.from;
  const toHz = optionNumber(parsed, 'to') ?? AC.to;
  if (!(fromHz > 0)) throw new ValidationError('--from', `${fromHz} Hz: the AC sweep is log-spaced and must start above 0 Hz`, 'For example --from 10.');
  if (!(toHz > fromHz)) throw new ValidationError('--to', `${toHz} Hz is not above --from (${fromHz} Hz)`, 'Give an end frequency above the start, e.g. --to 1meg.');
  return { fromHz, toHz };
}

function acResponse(design: Design, parsed: ParsedArgs, format: Format): string {
  const { fromHz, toHz } = sweepLimits(parsed);
  const frequencies = logGrid(fromHz, toHz, optionNumber(parsed, 'per-decade') ?? AC.pointsPerDecade);
  const ideal = optionFlag(parsed, 'ideal');
  const response = solveAc(design, frequencies, { idealOpAmps: ideal });
  const summary = summarizeAc(design, response);
  let band: MonteCarloBand | undefined;
  const summaryOnly = optionFlag(parsed, 'summary') && format !== 'json';
  if (optionFlag(parsed, 'tolerance') && !summaryOnly) {
    const distribution = optionString(parsed, 'distribution');
    if (distribution !== 'uniform' && distribution !== 'gaussian') {
      throw new ValidationError('--distribution', `"${distribution}" is not a distribution`, 'Use uniform or gaussian.');
    }
    if (!design.parts.some((p) => 'tolerance' in p && p.tolerance)) {
      throw new ValidationError('--tolerance', `no part of "${design.name}" has a tolerance`, 'Add "tolerance": 0.01 (for ±1 %) to the parts that vary.');
    }
    band = monteCarloAc(design, frequencies, {
      samples: optionNumber(parsed, 'samples') ?? TOLERANCE_BAND_SETTINGS.samples,
      seed: optionNumber(parsed, 'seed') ?? TOLERANCE_BAND_SETTINGS.seed,
      distribution: distribution as ToleranceDistribution,
      idealOpAmps: ideal,
    });
  } else if (!optionFlag(parsed, 'tolerance') && (parsed.options.samples !== undefined || parsed.options.seed !== undefined)) {
    // Silently ignoring a Monte Carlo setting would mislead; say it needs --tolerance.
    throw new ValidationError('--samples/--seed', 'only apply with --tolerance', 'Add --tolerance to compute the band.');
  }
  const tauS = slowestTimeConstantS(design, { idealOpAmps: ideal });
  const stability = stabilityOf(design, parsed, ideal);
  if (format === 'json') return JSON.stringify({ ...acJson(design, response, summary, band, tauS), ...stabilityJson(stability) }, null, 2) + '\n';
  const lines = [...summaryLines(design, summary, tauS), ...stabilityLines(stability)];
  if (summaryOnly) return lines.join('\n') + '\n';
  if (format === 'csv') {
    warnOnStderr(stability.warnings);
    return acCsv(response, band);
  }
  return acTable(design, response, band) + '\n' + lines.join('\n') + '\n';
}

interface Stability {
  opamps: OpAmpStability[];
  warnings: TheoryWarning[];
}

/** Stability figures and warnings; none with --ideal (an ideal op-amp has no loop to judge). */
function stabilityOf(design: Design, parsed: ParsedArgs, ideal: boolean): Stability {
  const limitDeg = optionNumber(parsed, 'min-phase-margin') as number;
  if (!(limitDeg > 0 && limitDeg < 180)) throw new ValidationError('--min-phase-margin', `${limitDeg}° is not a phase-margin limit`, 'Give degrees between 0 and 180, e.g. 45 or 60.');
  if (ideal) return { opamps: [], warnings: [] };
  const opamps = analyzeStability(design);
  return { opamps, warnings: stabilityWarnings(opamps, limitDeg) };
}

function stabilityLines(stability: Stability): string[] {
  const lines = stability.opamps.map((s) => {
    const pm = s.phaseMarginDeg === undefined ? 'no loop-gain crossover' : `phase margin ${formatFixed(s.phaseMarginDeg, 1)}° at ${formatEngineering(s.crossoverHz as number, 'Hz')}`;
    const gm = Number.isFinite(s.gainMarginDb) ? `gain margin ${formatFixed(s.gainMarginDb, 1)} dB at ${formatEngineering(s.phaseCrossoverHz as number, 'Hz')}` : 'gain margin infinite (phase never reaches −180°)';
    const peaking = s.peakingHz === undefined ? 'no closed-loop peaking' : `closed-loop peaking ${formatFixed(s.peakingDb, 2)} dB at ${formatEngineering(s.peakingHz, 'Hz')}`;
    return `Stability of ${s.id}: ${pm}, ${gm}, ${peaking}`;
  });
  return [...lines, ...stability.warnings.map((w) => `Warning: ${w.message}`)];
}

function stabilityJson(stability: Stability): { stability: unknown[]; warnings: TheoryWarning[] } {
  return {
    stability: stability.opamps.map((s) => ({
      ...s,
      crossoverHz: s.crossoverHz ?? null,
      phaseMarginDeg: s.phaseMarginDeg ?? null,
      phaseCrossoverHz: s.phaseCrossoverHz ?? null,
      gainMarginDb: Number.isFinite(s.gainMarginDb) ? s.gainMarginDb : null,
      peakingHz: s.peakingHz ?? null,
    })),
    warnings: stability.warnings,
  };
}

/** CSV keeps stdout to the table; warnings still reach the user. */
function warnOnStderr(warnings: TheoryWarning[]): void {
  for (const w of warnings) process.stderr.write(`Warning: ${w.message}\n`);
}

function noiseResponse(design: Design, parsed: ParsedArgs, format: Format): string {
  if (optionFlag(parsed, 'tolerance')) throw new ValidationError('--tolerance', 'the tolerance band is computed for the AC response only', 'Drop --noise or --tolerance.');
  const { fromHz, toHz } = sweepLimits(parsed);
  const frequencies = logGrid(fromHz, toHz, optionNumber(parsed, 'per-decade') ?? AC.pointsPerDecade);
  const ideal = optionFlag(parsed, 'ideal');
  const noise = solveNoise(design, frequencies, { idealOpAmps: ideal });
  const bandText = optionString(parsed, 'band');
  const [bandFromHz, bandToHz] = bandText === undefined ? [fromHz, toHz] : parseBand(bandText);
  const band = bandNoise(design, bandFromHz, bandToHz, { idealOpAmps: ideal });
  const stability = stabilityOf(design, parsed, ideal);
  if (format === 'json') return JSON.stringify({ ...noiseJson(design, noise, band), ...stabilityJson(stability) }, null, 2) + '\n';
  const lines = [...noiseSummaryLines(design, noise, band), ...stabilityLines(stability)];
  if (optionFlag(parsed, 'summary')) return lines.join('\n') + '\n';
  if (format === 'csv') {
    warnOnStderr(stability.warnings);
    return noiseCsv(noise);
  }
  return noiseTable(design, noise) + '\n' + lines.join('\n') + '\n';
}

/** One column name per source: the part id made CSV-safe, then the unit. */
function sourceColumn(name: string): string {
  return `${name.replace(/[^A-Za-z0-9_]/g, '_')}_v_per_rthz`;
}

function noiseCsv(n: NoiseResponse): string {
  const header = ['frequency_hz', 'noise_v_per_rthz', ...n.sources.map((s) => sourceColumn(s.name)), 'input_referred_v_per_rthz'];
  const lines = [header.join(',')];
  for (let i = 0; i < n.frequencyHz.length; i++) {
    lines.push([n.frequencyHz[i], n.outputVPerRtHz[i], ...n.contributionsVPerRtHz.map((c) => c[i]), n.inputReferredVPerRtHz[i]].map(String).join(','));
  }
  return lines.join('\n') + '\n';
}

function noiseTable(design: Design, n: NoiseResponse): string {
  const density = (v: number) => formatEngineering(v, 'V/√Hz');
  const rows = [['frequency', 'output', 'input-referred', ...n.sources.map((s) => s.name)]];
  for (let i = 0; i < n.frequencyHz.length; i++) {
    rows.push([formatEngineering(n.frequencyHz[i], 'Hz'), density(n.outputVPerRtHz[i]), density(n.inputReferredVPerRtHz[i]), ...n.contributionsVPerRtHz.map((c) => density(c[i]))]);
  }
  return `${design.name} — output noise density at ${formatFixed(n.temperatureK - 273.15, 2)} °C\n\n${alignColumns(rows)}`;
}

function noiseSummaryLines(design: Design, n: NoiseResponse, band: BandNoise): string[] {
  const range = `${formatEngineering(band.fromHz, 'Hz')} – ${formatEngineering(band.toHz, 'Hz')}`;
  const largest = band.sourceRmsV.map((v, k) => [band.sourceNames[k], v] as const).sort((a, b) => b[1] - a[1]);
  const lines = [
    `Design: ${design.name}`,
    `Output noise, ${range}: ${formatEngineering(band.outputRmsV, 'V')} RMS`,
  ];
  if (largest.length > 0) {
    const share = largest.slice(0, 3).map(([name, v]) => `${name} ${((100 * v * v) / (band.outputRmsV * band.outputRmsV)).toFixed(1)} %`);
    lines.push(`Largest sources (share of the noise power): ${share.join(', ')}`);
  }
  const last = n.frequencyHz.length - 1;
  lines.push(`Output density: ${formatEngineering(n.outputVPerRtHz[0], 'V/√Hz')} at ${formatEngineering(n.frequencyHz[0], 'Hz')}, ${formatEngineering(n.outputVPerRtHz[last], 'V/√Hz')} at ${formatEngineering(n.frequencyHz[last], 'Hz')}`);
  return lines;
}

function noiseJson(design: Design, n: NoiseResponse, band: BandNoise): Record<string, unknown> {
  return {
    design: design.name,
    temperatureK: n.temperatureK,
    frequencyHz: Array.from(n.frequencyHz),
    noiseVPerRtHz: Array.from(n.outputVPerRtHz),
    inputReferredVPerRtHz: Array.from(n.inputReferredVPerRtHz),
    sources: n.sources.map((s, k) => ({ ...s, vPerRtHz: Array.from(n.contributionsVPerRtHz[k]) })),
    band,
  };
}

function acCsv(r: AcResponse, band: MonteCarloBand | undefined): string {
  const header = ['frequency_hz', 'gain_db', 'phase_deg', 'ideal_gain_db', 'ideal_phase_deg'];
  if (band) header.push('band_low_db', 'band_high_db', 'band_phase_low_deg', 'band_phase_high_deg');
  const lines = [header.join(',')];
  for (let i = 0; i < r.frequencyHz.length; i++) {
    const row = [r.frequencyHz[i], r.gainDb[i], r.phaseDeg[i], r.idealGainDb[i], r.idealPhaseDeg[i]];
    if (band) row.push(band.gainLowDb[i], band.gainHighDb[i], band.phaseLowDeg[i], band.phaseHighDeg[i]);
    lines.push(row.map(String).join(','));
  }
  return lines.join('\n') + '\n';
}

function acTable(design: Design, r: AcResponse, band: MonteCarloBand | undefined): string {
  const header = ['frequency', 'gain dB', 'phase °', 'ideal dB', 'ideal °'];
  if (band) header.push('band low dB', 'band high dB');
  const rows = [header];
  for (let i = 0; i < r.frequencyHz.length; i++) {
    const row = [formatEngineering(r.frequencyHz[i], 'Hz'), formatFixed(r.gainDb[i], 3), formatFixed(r.phaseDeg[i], 2), formatFixed(r.idealGainDb[i], 3), formatFixed(r.idealPhaseDeg[i], 2)];
    if (band) row.push(formatFixed(band.gainLowDb[i], 3), formatFixed(band.gainHighDb[i], 3));
    rows.push(row);
  }
  return `${design.name}\n\n${alignColumns(rows)}`;
}

function summaryLines(design: Design, s: AcSummary, tauS: number): string[] {
  const hz = (value: number | undefined) => (value === undefined ? 'not in reach' : formatEngineering(value, 'Hz'));
  const lines = [
    `Design: ${design.name}`,
    `${(FIGURE_NAMES.passbandGainDb + ':').padEnd(20)}${formatFixed(s.passbandGainDb, 3)} dB`,
    `${(FIGURE_NAMES.minus3dbHz + ':').padEnd(20)}${s.minus3dbHz.length ? s.minus3dbHz.map((f) => formatEngineering(f, 'Hz')).join(', ') : 'none in the sweep'}`,
    `${(FIGURE_NAMES.gainLimitHz + ':').padEnd(20)}${hz(s.gainLimitHz)} (loop gain 1: above it the op-amp, not the design, sets the response)`,
    `Peak gain:          ${formatFixed(s.peakGainDb, 3)} dB at ${formatEngineering(s.peakFrequencyHz, 'Hz')}`,
    `${FIGURE_NAMES.rolloffDbPerDecade}, top decade: ${s.rolloffDbPerDecade === undefined ? 'n/a' : `${formatFixed(s.rolloffDbPerDecade, 1)} dB/decade`}`,
    `Slowest time constant: ${formatEngineering(tauS, 's')}`,
  ];
  const vpk = maxUndistortedOutputVpk(design, 1e3);
  if (Number.isFinite(vpk)) lines.push(`Largest undistorted output at 1 kHz: ${formatEngineering(vpk, 'V')} peak`);
  return lines;
}

function acJson(design: Design, r: AcResponse, summary: AcSummary, band: MonteCarloBand | undefined, tauS: number): Record<string, unknown> {
  return {
    design: design.name,
    frequencyHz: Array.from(r.frequencyHz),
    gainDb: Array.from(r.gainDb),
    phaseDeg: Array.from(r.phaseDeg),
    idealGainDb: Array.from(r.idealGainDb),
    idealPhaseDeg: Array.from(r.idealPhaseDeg),
    band: band && {
      gainLowDb: Array.from(band.gainLowDb),
      gainHighDb: Array.from(band.gainHighDb),
      phaseLowDeg: Array.from(band.phaseLowDeg),
      phaseHighDeg: Array.from(band.phaseHighDeg),
    },
    opamps: r.opamps.map((o) => ({ id: o.id, gainLimitHz: o.gainLimitHz ?? null, noiseGainDb: Array.from(o.noiseGainDb), loopGainDb: Array.from(o.loopGainDb) })),
    summary: { ...summary, gainLimitHz: summary.gainLimitHz ?? null, rolloffDbPerDecade: summary.rolloffDbPerDecade ?? null, slowestTimeConstantS: tauS },
  };
}

function dcTransfer(design: Design, parsed: ParsedArgs, format: Format): string {
  if (optionFlag(parsed, 'tolerance')) throw new ValidationError('--tolerance', 'the tolerance band is computed for AC only', 'Drop --dc or --tolerance.');
  const from = optionNumber(parsed, 'from') ?? DC.from;
  const to = optionNumber(parsed, 'to') ?? DC.to;
  const perDecade = optionNumber(parsed, 'per-decade') ?? DC.pointsPerDecade;
  let inputs: Float64Array;
  if (from > 0 && to > 0) inputs = logGrid(from, to, perDecade);
  else if (from < 0 && to < 0) inputs = logGrid(-from, -to, perDecade).map((v) => -v);
  else throw new ValidationError('--from/--to', `the DC sweep is log-spaced, so ${from} V to ${to} V cannot include 0 V`, 'Sweep a positive range (e.g. --from 1m --to 10) or a negative one.');
  const transfer = solveDcTransfer(design, inputs, { idealOpAmps: optionFlag(parsed, 'ideal') });
  if (format === 'json') {
    return JSON.stringify({ design: design.name, inputV: Array.from(transfer.inputV), outputV: Array.from(transfer.outputV), clipped: Array.from(transfer.clipped, Boolean) }, null, 2) + '\n';
  }
  if (format === 'csv') {
    const lines = [DC_COLUMNS.join(',')];
    for (let i = 0; i < inputs.length; i++) lines.push(`${transfer.inputV[i]},${transfer.outputV[i]},${transfer.clipped[i]}`);
    return lines.join('\n') + '\n';
  }
  const rows = [['input', 'output', '']];
  for (let i = 0; i < inputs.length; i++) {
    rows.push([formatEngineering(transfer.inputV[i], 'V'), `${formatFixed(transfer.outputV[i], 6)} V`, transfer.clipped[i] ? 'at the rail' : '']);
  }
  return `${design.name} — DC transfer\n\n${alignColumns(rows)}`;
}

function alignColumns(rows: string[][]): string {
  const widths = rows[0].map((_, c) => Math.max(...rows.map((row) => row[c].length)));
  return rows.map((row) => row.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ').trimEnd()).join('\n') + '\n';
}

/** The design named (a file, or a stored design's id read from --db), checked. */
async function readDesign(text: string, parsed: ParsedArgs): Promise<Design> {
  const choice = chooseDesign(text, 'design');
  if ('content' in choice) return parseDesign(choice.content, choice.path);
  const service = await openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')));
  try {
    return parseDesign(await designContent(service, choice), `stored design ${choice.storedId}`);
  } finally {
    await service.close();
  }
}
