/**
 * Options shared by the commands that sweep (sweep, schedule, resume, demo):
 * the bench, the plan and the database, and the one way to turn them into a
 * service call. Every command goes through the service, like the window does.
 */
import { readFileSync } from 'node:fs';
import type { OptionSpec, ParsedArgs } from '../../cli/args';
import { optionFlag, optionNumber, optionString } from '../../cli/args';
import { ValidationError } from '../../errors';
import type { RolloffService } from '../../service/service';
import { openServiceAt } from '../../service/open-service';
import type { ConnectRequest, SweepRequest, VerdictLimits } from '../../contract/contract';
import { resolveDatabasePath } from '../../store';
import { DEFAULT_PROFILE_ID, resolveBenchName } from '../../bench';
import { parseEngineering } from '../../units';
import { SWEEP_DEFAULTS, SWEEP_RANGE_DEFAULTS } from '../../sweep/plan/defaults';
import { SETTINGS } from '../../contract/vocabulary';
import { benchDescription, limitReuseText } from '../../contract/bench-text';
import { checkMaxStimulusVpp } from '../../service/stimulus-limits';

/** "reusing the limit of 2 Vpp set on … for bench "lab-3"" on stderr, when the limit in force was saved earlier. */
export function reportReusedLimit(service: RolloffService): void {
  const limit = service.stimulusLimit;
  if (limit?.reused) process.stderr.write(`${limitReuseText(limit)}\n`);
}

export const DATABASE_OPTION: OptionSpec = { name: 'db', kind: 'string', placeholder: 'PATH|URL', description: 'database file, or a lab store postgres://USER@HOST:PORT/DATABASE (default: ROLLOFF_DB or the user data folder)' };

export const BENCH_OPTIONS: OptionSpec[] = [
  { name: 'simulated', kind: 'flag', aliases: ['virtual'], description: 'use the simulated bench (simulated instruments on 127.0.0.1) with the build\'s circuit' },
  { name: 'time-scale', kind: 'number', placeholder: 'X', description: 'simulated bench: bench seconds per wall second', defaultValue: 1 },
  { name: 'noise', kind: 'number', placeholder: 'VRMS', description: 'simulated bench: flat white noise on every reading (the measurement\'s own), volts RMS', defaultValue: 1e-4 },
  { name: 'circuit-noise', kind: 'flag', description: 'simulated bench: also add the circuit\'s own output noise, shaped by the circuit (as `rolloff theory --noise` computes it)' },
  { name: 'generator', kind: 'string', placeholder: 'ADDRESS', description: 'generator address, e.g. tcp://HOST:5025 or serial:///dev/ttyUSB0?baud=9600' },
  { name: 'scope', kind: 'string', placeholder: 'ADDRESS', description: 'scope address (scope measurement)' },
  { name: 'meter', kind: 'string', placeholder: 'ADDRESS', description: 'meter address (meter or DC measurement)' },
  { name: 'generator-profile', kind: 'string', placeholder: 'ID', description: 'generator profile', defaultValue: DEFAULT_PROFILE_ID.generator },
  { name: 'scope-profile', kind: 'string', placeholder: 'ID', description: 'scope profile', defaultValue: DEFAULT_PROFILE_ID.scope },
  { name: 'meter-profile', kind: 'string', placeholder: 'ID', description: 'meter profile', defaultValue: DEFAULT_PROFILE_ID.meter },
  { name: 'give-up', kind: 'number', placeholder: 'S', description: 'mark the run failed (points kept) when the instruments stay unreachable this long', defaultValue: 120 },
  { name: 'max-amplitude', kind: 'number', placeholder: 'VPP', description: `${SETTINGS.maxStimulus.label}, V peak-to-peak: ${SETTINGS.maxStimulus.explanation} (saved for this bench: the simulated bench and real instruments each keep their own; later runs on the same bench reuse it)` },
  { name: 'bench', kind: 'string', placeholder: 'NAME', description: 'name of this bench, recorded with each run (default: ROLLOFF_BENCH or the host name)' },
  DATABASE_OPTION,
];

export const PLAN_OPTIONS: OptionSpec[] = [
  { name: 'dc', kind: 'flag', description: 'DC transfer sweep (log stage) instead of a frequency sweep' },
  { name: 'from', kind: 'number', placeholder: 'HZ|V', description: `start frequency, or DC level with --dc (default ${SWEEP_RANGE_DEFAULTS.ac.from} Hz; DC ${SWEEP_RANGE_DEFAULTS.dc.from} V)` },
  { name: 'to', kind: 'number', placeholder: 'HZ|V', description: `end frequency, or DC level with --dc (default ${SWEEP_RANGE_DEFAULTS.ac.to} Hz; DC ${SWEEP_RANGE_DEFAULTS.dc.to} V)` },
  { name: 'per-decade', kind: 'integer', placeholder: 'N', description: 'points per decade', defaultValue: SWEEP_RANGE_DEFAULTS.ac.pointsPerDecade },
  { name: 'linear', kind: 'flag', description: 'linear spacing (same number of points)' },
  { name: 'amplitude', kind: 'number', placeholder: 'VPP', description: 'fixed stimulus amplitude (default: automatic per frequency from theory)' },
  { name: 'target-output', kind: 'number', placeholder: 'VPP', description: 'automatic amplitude: aim for this output' },
  { name: 'measure', kind: 'string', placeholder: 'scope|meter', description: 'how to measure AC points', defaultValue: 'scope' },
  { name: 'through', kind: 'flag', description: 'through-calibration run (meter measures the generator directly; stage bypassed)' },
  { name: 'cycles', kind: 'integer', placeholder: 'N', description: 'minimum whole cycles per acquisition', defaultValue: SWEEP_DEFAULTS.minCycles },
  { name: 'averages', kind: 'integer', placeholder: 'N', description: 'acquisitions per point (outliers rejected)', defaultValue: SWEEP_DEFAULTS.averages },
  { name: 'no-refine', kind: 'flag', description: 'skip the extra points near the −3 dB and gain-limit points' },
  { name: 'max-deviation', kind: 'number', placeholder: 'DB', description: 'verdict: largest allowed |measured − theory| in the pass band' },
  { name: 'corner-tolerance', kind: 'number', placeholder: 'FRACTION', description: 'verdict: allowed relative error of each −3 dB point, e.g. 0.05' },
  { name: 'operator', kind: 'string', placeholder: 'NAME', description: 'who ran it (recorded)', defaultValue: '' },
  { name: 'notes', kind: 'string', placeholder: 'TEXT', description: 'notes recorded with the run', defaultValue: '' },
];

export const BUILD_OPTIONS: OptionSpec[] = [
  { name: 'build', kind: 'integer', placeholder: 'ID', description: 'stored build to sweep' },
  { name: 'design', kind: 'string', placeholder: 'FILE', description: 'design file: stores it and a new build of it' },
  { name: 'label', kind: 'string', placeholder: 'TEXT', description: 'label of the new build (with --design)', defaultValue: 'build' },
  { name: 'actual', kind: 'string', placeholder: 'PART=VALUE', repeatable: true, description: 'measured part value of the new build, e.g. C1=16.2n' },
];

/**
 * Opens the service on --db; the simulated bench options apply when --simulated is used.
 * `benchFromOptions`: the bench is the one the options name (--simulated or real
 * instruments), so its stored maximum stimulus applies at once; else (resume)
 * the run decides.
 */
export async function openService(parsed: ParsedArgs, overrides: { timeScale?: number; latencyS?: number; benchFromOptions?: boolean } = {}): Promise<RolloffService> {
  const timeScale = overrides.timeScale ?? optionNumber(parsed, 'time-scale') ?? 1;
  if (!(timeScale > 0)) throw new ValidationError('--time-scale', `${timeScale} is not a positive number`);
  const maxStimulusVpp = optionNumber(parsed, 'max-amplitude');
  if (maxStimulusVpp !== undefined) checkMaxStimulusVpp(maxStimulusVpp, '--max-amplitude');
  return openServiceAt(resolveDatabasePath(optionString(parsed, 'db')), {
    maxStimulusVpp,
    ...(overrides.benchFromOptions === false ? {} : { startOn: optionFlag(parsed, 'simulated') ? 'simulated bench' : 'real instruments' }),
    giveUpAfterS: optionNumber(parsed, 'give-up') ?? 120,
    benchName: resolveBenchName(optionString(parsed, 'bench')),
    ownerLabel: 'rolloff (command line)',
    simulatedBench: { timeScale, noiseVrms: optionNumber(parsed, 'noise') ?? 1e-4, circuitNoise: optionFlag(parsed, 'circuit-noise'), latencyS: overrides.latencyS ?? 0 },
  });
}

/** "C1=16.2n" pairs → part values in SI units. */
export function actualValuesFrom(parsed: ParsedArgs): Record<string, number> {
  const values: Record<string, number> = {};
  for (const entry of (parsed.options.actual as string[] | undefined) ?? []) {
    const at = entry.indexOf('=');
    if (at <= 0) throw new ValidationError(`--actual ${entry}`, 'is not PART=VALUE', 'Example: --actual C1=16.2n --actual R2=10.1k');
    values[entry.slice(0, at).trim()] = parseEngineering(entry.slice(at + 1), `--actual ${entry}`);
  }
  return values;
}

/**
 * The sweep a command (sweep, schedule) asks for, with its bench connected. Everything that can be
 * checked is checked before a design or build is stored.
 */
export async function prepareSweep(service: RolloffService, parsed: ParsedArgs): Promise<{ buildId: number; request: SweepRequest }> {
  try {
    requestFrom(parsed, 0);
    checkBenchOptions(service, parsed);
    const buildId = await resolveBuildId(service, parsed);
    const request = requestFrom(parsed, buildId);
    await connectBench(service, parsed, buildId);
    return { buildId, request };
  } catch (error) {
    throw namedForTheCommandLine(error);
  }
}

/** The command-line option behind each field of a sweep request, so a refused plan names what the user typed. */
const OPTION_OF_FIELD: Record<string, string> = {
  from: '--from',
  to: '--to',
  'from/to': '--from/--to',
  amplitude: '--amplitude',
  'target output': '--target-output',
  pointsPerDecade: '--per-decade',
  minCycles: '--cycles',
  averages: '--averages',
};

export function namedForTheCommandLine(error: unknown): unknown {
  if (!(error instanceof ValidationError)) return error;
  const option = OPTION_OF_FIELD[error.where];
  if (option === undefined) return error;
  return new ValidationError(option, error.message.slice(error.where.length + 2), error.hint);
}

/** The build to sweep: --build ID, or a new build of --design FILE. */
async function resolveBuildId(service: RolloffService, parsed: ParsedArgs): Promise<number> {
  const buildId = optionNumber(parsed, 'build');
  const designFile = optionString(parsed, 'design');
  if (buildId !== undefined && designFile !== undefined) throw new ValidationError('--build/--design', 'give one, not both');
  if (buildId !== undefined) return (await service.getBuild(buildId)).id;
  if (designFile === undefined) throw new ValidationError('--build', 'is missing', 'Give --build ID (see rolloff build list) or --design FILE.json [--label TEXT] [--actual PART=VALUE …].');
  const design = readJsonFile(designFile, '--design');
  const actualValues = actualValuesFrom(parsed);
  // Design, measured values and plan are all checked before anything is stored.
  service.planForUnsavedBuild(requestFrom(parsed, 0), design, actualValues);
  const saved = await service.saveDesign(design);
  const build = await service.createBuild({ designId: saved.id, label: optionString(parsed, 'label') ?? 'build', notes: '', actualValues });
  return build.id;
}

export function readJsonFile(path: string, where: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (error) {
    throw new ValidationError(where, `cannot read ${path}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}`, 'Check the path.');
  }
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new ValidationError(`${where} ${path}`, `is not valid JSON (${(error as Error).message})`, 'Fix the file, or make one with rolloff template.');
  }
}

/** Refuses a sweep that could not start (no ceiling, no instruments) before anything is stored. */
function checkBenchOptions(service: RolloffService, parsed: ParsedArgs): void {
  if (service.maxStimulus === undefined) {
    const bench = service.bench ? benchDescription(service.bench) : 'this bench';
    throw new ValidationError(
      '--max-amplitude',
      `is missing and ${bench} has no maximum stimulus saved`,
      `Give the largest peak-to-peak voltage the circuit may see, e.g. --max-amplitude 2; it is saved for ${bench}${service.bench?.simulated ? '' : ' (a limit set for the simulated bench never applies to real instruments)'}.`,
    );
  }
  if (!optionFlag(parsed, 'simulated') && !optionString(parsed, 'generator')) {
    throw new ValidationError('--generator', 'no instruments given', 'Give --generator ADDRESS with --scope or --meter ADDRESS, or use --simulated for the simulated bench.');
  }
}

/** Connects what the options name: the simulated bench of the build, or the given addresses. */
export async function connectBench(service: RolloffService, parsed: ParsedArgs, buildId: number): Promise<void> {
  if (optionFlag(parsed, 'simulated')) {
    await service.startSimulatedBenchForBuild(buildId);
    return;
  }
  for (const request of connectRequestsFrom(parsed)) await service.connect(request);
}

/** The instruments --generator, --scope and --meter name, with their profiles. */
export function connectRequestsFrom(parsed: ParsedArgs): ConnectRequest[] {
  return (['generator', 'scope', 'meter'] as const).flatMap((role) => {
    const address = optionString(parsed, role);
    return address ? [{ role, address, profileId: optionString(parsed, `${role}-profile`) ?? `scpi-${role}` }] : [];
  });
}

export function requestFrom(parsed: ParsedArgs, buildId: number): SweepRequest {
  const measure = optionString(parsed, 'measure') ?? 'scope';
  if (measure !== 'scope' && measure !== 'meter') throw new ValidationError('--measure', `"${measure}" is not scope or meter`);
  const through = optionFlag(parsed, 'through');
  const fixed = optionNumber(parsed, 'amplitude');
  const target = optionNumber(parsed, 'target-output');
  if (fixed !== undefined && target !== undefined) throw new ValidationError('--amplitude/--target-output', 'give one, not both', '--amplitude fixes the stimulus; --target-output sets it per frequency from theory.');
  const limits: VerdictLimits = {};
  const maxDeviation = optionNumber(parsed, 'max-deviation');
  const cornerTolerance = optionNumber(parsed, 'corner-tolerance');
  if (maxDeviation !== undefined) limits.maxDeviationDb = maxDeviation;
  if (cornerTolerance !== undefined) limits.cornerTolerance = cornerTolerance;
  const kind = optionFlag(parsed, 'dc') ? 'dc' : 'ac';
  const range = SWEEP_RANGE_DEFAULTS[kind];
  return {
    buildId,
    kind,
    from: optionNumber(parsed, 'from') ?? range.from,
    to: optionNumber(parsed, 'to') ?? range.to,
    pointsPerDecade: optionNumber(parsed, 'per-decade') ?? range.pointsPerDecade,
    spacing: optionFlag(parsed, 'linear') ? 'linear' : 'log',
    amplitude: fixed !== undefined ? { mode: 'fixed', vpp: fixed } : { mode: 'auto', ...(target !== undefined ? { targetOutputVpp: target } : {}) },
    measurement: through ? 'meter' : measure,
    minCycles: optionNumber(parsed, 'cycles') ?? SWEEP_DEFAULTS.minCycles,
    averages: optionNumber(parsed, 'averages') ?? SWEEP_DEFAULTS.averages,
    refine: !optionFlag(parsed, 'no-refine') && !through,
    operator: optionString(parsed, 'operator') ?? '',
    notes: optionString(parsed, 'notes') ?? '',
    ...(Object.keys(limits).length > 0 ? { limits } : {}),
    ...(through ? { through: true } : {}),
  };
}
