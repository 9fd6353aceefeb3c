/**
 * `rolloff theory`: the computed response of a design — AC gain and phase
 * (with the ideal-op-amp curve and an optional tolerance band) or the DC
 * transfer — as a table, CSV or JSON.
 */
import { readFileSync } from 'node:fs';
import { UserError, ValidationError } from '../../errors';
import { formatEngineering, logGrid } from '../../units';
import {
  parseDesign,
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
} from '../../circuit';
import { optionFlag, optionNumber, optionString, requirePositional, type CommandSpec, type ParsedArgs } from '../args';

type Format = 'table' | 'csv' | 'json';

export const theoryCommand: CommandSpec = {
  name: 'theory',
  summary: 'Computed response of a design: AC gain/phase with op-amp limits, tolerance band, or DC transfer',
  usage: 'DESIGN.json [options]',
  options: [
    { name: 'from', kind: 'number', placeholder: 'HZ|V', description: 'start of the sweep (AC default 10 Hz, DC default 1m V)' },
    { name: 'to', kind: 'number', placeholder: 'HZ|V', description: 'end of the sweep (AC default 1meg Hz, DC default 10 V)' },
    { name: 'per-decade', kind: 'integer', placeholder: 'N', description: 'log-spaced points per decade (AC default 20, DC default 10)' },
    { name: 'csv', kind: 'flag', description: 'print CSV (full precision) instead of a table' },
    { name: 'json', kind: 'flag', description: 'print JSON (columns plus summary) instead of a table' },
    { name: 'summary', kind: 'flag', description: 'print only the figures: pass-band gain, −3 dB points, gain-limit point, roll-off' },
    { name: 'tolerance', kind: 'flag', description: 'add a Monte Carlo tolerance band from the parts\' tolerances' },
    { name: 'samples', kind: 'integer', placeholder: 'N', description: 'Monte Carlo samples', defaultValue: 1000 },
    { name: 'seed', kind: 'integer', placeholder: 'N', description: 'Monte Carlo seed (same seed, same band)', defaultValue: 1 },
    { name: 'distribution', kind: 'string', placeholder: 'uniform|gaussian', description: 'part value distribution within tolerance', defaultValue: 'uniform' },
    { name: 'ideal', kind: 'flag', description: 'ideal op-amps (no gain or bandwidth limit) for the main curve or the DC transfer' },
    { name: 'dc', kind: 'flag', description: 'DC transfer (input_v, output_v) instead of AC, e.g. for the log stage' },
  ],
  details: `
Numbers accept engineering notation: --from 1m, --to 2meg.
The band is the 2.5th–97.5th percentile of gain and phase over the samples
(xoshiro128** generator, so a seed always gives the same band).
Examples:
  rolloff theory app/circuit/examples/inverting-lowpass.json --summary
  rolloff theory design.json --csv --tolerance --samples 2000 --seed 7 > theory.csv
  rolloff theory app/circuit/examples/log-stage.json --dc --from 1m --to 10 --per-decade 5`,
  async run(parsed) {
    const design = readDesignFile(requirePositional(parsed, 0, 'DESIGN.json'));
    const format = outputFormat(parsed);
    const text = optionFlag(parsed, 'dc') ? dcTransfer(design, parsed, format) : acResponse(design, parsed, format);
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

function acResponse(design: Design, parsed: ParsedArgs, format: Format): string {
  const fromHz = optionNumber(parsed, 'from') ?? 10;
  const toHz = optionNumber(parsed, 'to') ?? 1e6;
  if (!(fromHz > 0)) throw new ValidationError('--from', `${fromHz} Hz: the AC sweep is log-spaced and must start above 0 Hz`, 'For example --from 10.');
  if (!(toHz > fromHz)) throw new ValidationError('--to', `${toHz} Hz is not above --from (${fromHz} Hz)`, 'Give an end frequency above the start, e.g. --to 1meg.');
  const frequencies = logGrid(fromHz, toHz, optionNumber(parsed, 'per-decade') ?? 20);
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
      samples: optionNumber(parsed, 'samples') as number,
      seed: optionNumber(parsed, 'seed') as number,
      distribution: distribution as ToleranceDistribution,
      idealOpAmps: ideal,
    });
  } else if (!optionFlag(parsed, 'tolerance') && (parsed.options.samples !== 1000 || parsed.options.seed !== 1)) {
    // Silently ignoring a Monte Carlo setting would mislead; say it needs --tolerance.
    throw new ValidationError('--samples/--seed', 'only apply with --tolerance', 'Add --tolerance to compute the band.');
  }
  const tauS = slowestTimeConstantS(design, { idealOpAmps: ideal });
  if (format === 'json') return JSON.stringify(acJson(design, response, summary, band, tauS), null, 2) + '\n';
  if (summaryOnly) return summaryLines(design, summary, tauS).join('\n') + '\n';
  if (format === 'csv') return acCsv(response, band);
  return acTable(design, response, band) + '\n' + summaryLines(design, summary, tauS).join('\n') + '\n';
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
    const row = [formatEngineering(r.frequencyHz[i], 'Hz'), r.gainDb[i].toFixed(3), r.phaseDeg[i].toFixed(2), r.idealGainDb[i].toFixed(3), r.idealPhaseDeg[i].toFixed(2)];
    if (band) row.push(band.gainLowDb[i].toFixed(3), band.gainHighDb[i].toFixed(3));
    rows.push(row);
  }
  return `${design.name}\n\n${alignColumns(rows)}`;
}

function summaryLines(design: Design, s: AcSummary, tauS: number): string[] {
  const hz = (value: number | undefined) => (value === undefined ? 'not in reach' : formatEngineering(value, 'Hz'));
  const lines = [
    `Design: ${design.name}`,
    `Pass-band gain:     ${s.passbandGainDb.toFixed(3)} dB`,
    `−3 dB points:       ${s.minus3dbHz.length ? s.minus3dbHz.map((f) => formatEngineering(f, 'Hz')).join(', ') : 'none in the sweep'}`,
    `Gain-limit point:   ${hz(s.gainLimitHz)} (loop gain 1: above it the op-amp, not the design, sets the response)`,
    `Peak gain:          ${s.peakGainDb.toFixed(3)} dB at ${formatEngineering(s.peakFrequencyHz, 'Hz')}`,
    `Roll-off, top decade: ${s.rolloffDbPerDecade === undefined ? 'n/a' : `${s.rolloffDbPerDecade.toFixed(1)} dB/decade`}`,
    `Slowest time constant: ${formatEngineering(tauS, 's')}`,
  ];
  const vpk = maxUndistortedOutputVpk(design, 1e3);
  if (Number.isFinite(vpk)) lines.push(`Largest undistorted output at 1 kHz: ${formatEngineering(vpk, 'V')} peak`);
  return lines;
}

function acJson(design: Design, r: AcResponse, summary: AcSummary, band: MonteCarloBand | undefined, tauS: number): unknown {
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
  const from = optionNumber(parsed, 'from') ?? 1e-3;
  const to = optionNumber(parsed, 'to') ?? 10;
  const perDecade = optionNumber(parsed, 'per-decade') ?? 10;
  let inputs: Float64Array;
  if (from > 0 && to > 0) inputs = logGrid(from, to, perDecade);
  else if (from < 0 && to < 0) inputs = logGrid(-from, -to, perDecade).map((v) => -v);
  else throw new ValidationError('--from/--to', `the DC sweep is log-spaced, so ${from} V to ${to} V cannot include 0 V`, 'Sweep a positive range (e.g. --from 1m --to 10) or a negative one.');
  const transfer = solveDcTransfer(design, inputs, { idealOpAmps: optionFlag(parsed, 'ideal') });
  if (format === 'json') {
    return JSON.stringify({ design: design.name, inputV: Array.from(transfer.inputV), outputV: Array.from(transfer.outputV), clipped: Array.from(transfer.clipped, Boolean) }, null, 2) + '\n';
  }
  if (format === 'csv') {
    const lines = ['input_v,output_v,clipped'];
    for (let i = 0; i < inputs.length; i++) lines.push(`${transfer.inputV[i]},${transfer.outputV[i]},${transfer.clipped[i]}`);
    return lines.join('\n') + '\n';
  }
  const rows = [['input', 'output', '']];
  for (let i = 0; i < inputs.length; i++) {
    rows.push([formatEngineering(transfer.inputV[i], 'V'), `${transfer.outputV[i].toFixed(6)} V`, transfer.clipped[i] ? 'at the rail' : '']);
  }
  return `${design.name} — DC transfer\n\n${alignColumns(rows)}`;
}

function alignColumns(rows: string[][]): string {
  const widths = rows[0].map((_, c) => Math.max(...rows.map((row) => row[c].length)));
  return rows.map((row) => row.map((cell, c) => (c === 0 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join('  ').trimEnd()).join('\n') + '\n';
}

/** Reads and checks a design file; file and JSON errors name the file. */
function readDesignFile(path: string): Design {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'it is a directory' : code === 'EACCES' ? 'permission denied' : String((error as Error).message);
    throw new UserError(`cannot read design file ${path}: ${reason}`, 'Give the path of a design JSON file, or write one with "rolloff template ID --out FILE".');
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (error) {
    throw new ValidationError(path, `is not valid JSON (${(error as Error).message})`, 'Fix the syntax; a design file is one JSON object.');
  }
  return parseDesign(json, path);
}
