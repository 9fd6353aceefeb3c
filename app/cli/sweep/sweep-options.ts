/**
 * Options shared by the commands that sweep (sweep, schedule, resume, demo):
 * the bench, the plan and the database, and the one way to turn them into a
 * service call. Every command goes through the service, like the window does.
 */
import type { OptionSpec, ParsedArgs } from '../../cli/args';
import { optionFlag, optionNumber, optionString } from '../../cli/args';
import { ValidationError } from '../../errors';
import type { LocalService } from '../../service/local-service';
import { openLocalServiceAt } from '../../service/open-service';
import { SweepRequestSchema, type ConnectRequest, type SweepRequest, type VerdictLimits } from '../../contract/contract';
import { checkValue } from '../../contract/check-call';
import { resolveDatabasePath } from '../../store';
import { DEFAULT_PROFILE_ID, resolveBenchName } from '../../bench';
import { parseEngineering } from '../../units';
import { SWEEP_DEFAULTS, SWEEP_RANGE_DEFAULTS } from '../../sweep/plan/defaults';
import { perDecadeDefaultText, sweepEndDefaultText } from '../help-defaults';
import { DATABASE_OPTION, SIMULATED_BENCH_OPTIONS, maxStimulusFrom, maxStimulusOption, simulatedBenchFrom } from '../common-options';
import { chooseDesign, designContent, designOption, storedDesignId } from '../design-option';
import { namedForOption } from '../field-option';
import { SETTINGS } from '../../contract/vocabulary';
import { benchDescription, limitReuseText } from '../../contract/bench-text';

/** "reusing the limit of 2 Vpp set on … for bench "lab-3"" on stderr, when the limit in force was saved earlier. */
export function reportReusedLimit(service: LocalService): void {
  const limit = service.stimulusLimit;
  if (limit?.reused) process.stderr.write(`${limitReuseText(limit)}\n`);
}

export const BENCH_OPTIONS: OptionSpec[] = [
  { name: 'simulated', kind: 'flag', aliases: ['virtual'], description: 'use the simulated bench (simulated instruments on 127.0.0.1) with the build\'s circuit' },
  ...SIMULATED_BENCH_OPTIONS,
  { name: 'generator', kind: 'string', placeholder: 'ADDRESS', description: 'generator address, e.g. tcp://HOST:5025 or serial:///dev/ttyUSB0?baud=9600' },
  { name: 'scope', kind: 'string', placeholder: 'ADDRESS', description: 'scope address (scope measurement)' },
  { name: 'meter', kind: 'string', placeholder: 'ADDRESS', description: 'meter address (meter or DC measurement)' },
  { name: 'generator-profile', kind: 'string', placeholder: 'ID', description: 'generator profile', defaultValue: DEFAULT_PROFILE_ID.generator },
  { name: 'scope-profile', kind: 'string', placeholder: 'ID', description: 'scope profile', defaultValue: DEFAULT_PROFILE_ID.scope },
  { name: 'meter-profile', kind: 'string', placeholder: 'ID', description: 'meter profile', defaultValue: DEFAULT_PROFILE_ID.meter },
  { name: 'give-up', kind: 'number', placeholder: 'S', description: 'mark the run failed (points kept) when the instruments stay unreachable this long', defaultValue: 120 },
  maxStimulusOption('saved for this bench: the simulated bench and real instruments each keep their own; later runs on the same bench reuse it'),
  { name: 'bench', kind: 'string', placeholder: 'NAME', description: 'name of this bench, recorded with each run (default: ROLLOFF_BENCH or the host name)' },
  DATABASE_OPTION,
];

export const PLAN_OPTIONS: OptionSpec[] = [
  { name: 'dc', kind: 'flag', description: 'DC transfer sweep (log stage) instead of a frequency sweep' },
  { name: 'from', kind: 'number', placeholder: 'HZ|V', description: `start frequency, or DC level with --dc (${sweepEndDefaultText('from')})` },
  { name: 'to', kind: 'number', placeholder: 'HZ|V', description: `end frequency, or DC level with --dc (${sweepEndDefaultText('to')})` },
  // No defaultValue on per-decade and points: which of them was given is how a spacing mix-up is caught.
  { name: SETTINGS.pointsPerDecade.cliOption, kind: 'integer', placeholder: 'N', description: `${SETTINGS.pointsPerDecade.explanation} (${perDecadeDefaultText()})` },
  { name: 'linear', kind: 'flag', description: `linear spacing instead of log; give --${SETTINGS.linearPoints.cliOption}` },
  { name: SETTINGS.linearPoints.cliOption, kind: 'integer', placeholder: 'N', description: `${SETTINGS.linearPoints.explanation} (default ${SWEEP_RANGE_DEFAULTS.ac.linearPoints})` },
  { name: SETTINGS.fixedAmplitude.cliOption, kind: 'number', placeholder: 'VPP', description: `${SETTINGS.fixedAmplitude.label}, ${SETTINGS.fixedAmplitude.unit}: ${SETTINGS.fixedAmplitude.explanation} (default: ${SETTINGS.automaticAmplitude.label.toLowerCase()}, ${SETTINGS.automaticAmplitude.explanation})` },
  { name: SETTINGS.targetOutput.cliOption, kind: 'number', placeholder: 'VPP', description: `${SETTINGS.targetOutput.label}, ${SETTINGS.targetOutput.unit}: ${SETTINGS.targetOutput.explanation}` },
  { name: 'measure', kind: 'string', placeholder: 'scope|meter', description: 'how to measure AC points', defaultValue: 'scope' },
  { name: 'through', kind: 'flag', description: 'through-calibration run (meter measures the generator directly; stage bypassed)' },
  { name: 'cycles', kind: 'integer', placeholder: 'N', description: 'minimum whole cycles per acquisition', defaultValue: SWEEP_DEFAULTS.minCycles },
  { name: 'averages', kind: 'integer', placeholder: 'N', description: 'acquisitions per point (outliers rejected)', defaultValue: SWEEP_DEFAULTS.averages },
  { name: SETTINGS.refine.cliOption, kind: 'flag', description: `turn off the ${SETTINGS.refine.label.toLowerCase()} (${SETTINGS.refine.explanation}; default on)` },
  { name: 'max-deviation', kind: 'number', placeholder: 'DB', description: 'verdict: largest allowed |measured − theory| in the pass band' },
  { name: 'corner-tolerance', kind: 'number', placeholder: 'FRACTION', description: 'verdict: allowed relative error of each −3 dB point, e.g. 0.05' },
  { name: 'operator', kind: 'string', placeholder: 'NAME', description: 'who ran it (recorded)', defaultValue: '' },
  { name: 'notes', kind: 'string', placeholder: 'TEXT', description: 'notes recorded with the run', defaultValue: '' },
];

export const BUILD_OPTIONS: OptionSpec[] = [
  { name: 'build', kind: 'integer', placeholder: 'ID', description: 'stored build to sweep' },
  designOption('design of a new build to sweep (a file is stored first)'),
  { name: 'label', kind: 'string', placeholder: 'TEXT', description: 'label of the new build (with --design)', defaultValue: 'build' },
  { name: 'actual', kind: 'string', placeholder: 'PART=VALUE', repeatable: true, description: 'measured part value of the new build, e.g. C1=16.2n' },
];

/**
 * Opens the service on --db; the simulated bench options apply when --simulated is used.
 * `benchFromOptions`: the bench is the one the options name (--simulated or real
 * instruments), so its stored maximum stimulus applies at once; else (resume)
 * the run decides.
 */
export async function openService(parsed: ParsedArgs, overrides: { timeScale?: number; latencyS?: number; benchFromOptions?: boolean } = {}): Promise<LocalService> {
  const simulated = simulatedBenchFrom(parsed);
  return openLocalServiceAt(resolveDatabasePath(optionString(parsed, 'db')), {
    maxStimulusVpp: maxStimulusFrom(parsed),
    ...(overrides.benchFromOptions === false ? {} : { startOn: optionFlag(parsed, 'simulated') ? 'simulated bench' : 'real instruments' }),
    giveUpAfterS: optionNumber(parsed, 'give-up') ?? 120,
    benchName: resolveBenchName(optionString(parsed, 'bench')),
    ownerLabel: 'rolloff (command line)',
    simulatedBench: { ...simulated, timeScale: overrides.timeScale ?? simulated.timeScale, latencyS: overrides.latencyS ?? 0 },
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
export async function prepareSweep(service: LocalService, parsed: ParsedArgs): Promise<{ buildId: number; request: SweepRequest }> {
  try {
    requestFrom(parsed, 0);
    checkBenchOptions(service, parsed);
    const buildId = await resolveBuildId(service, parsed, (design, actualValues) => service.planForUnsavedBuild(requestFrom(parsed, 0), design, actualValues));
    const request = requestFrom(parsed, buildId);
    await connectBench(service, parsed, buildId);
    return { buildId, request };
  } catch (error) {
    throw namedForTheCommandLine(error);
  }
}

/**
 * The command-line option behind each field of a sweep request (as the plan
 * names it, or as the schema's path `request.…`), so a refusal names what the
 * user typed.
 */
const OPTION_OF_FIELD: Record<string, string> = {
  from: '--from',
  to: '--to',
  'from/to': '--from/--to',
  amplitude: '--amplitude',
  'amplitude.vpp': '--amplitude',
  'target output': '--target-output',
  'amplitude.targetOutputVpp': '--target-output',
  pointsPerDecade: '--per-decade',
  points: '--points',
  minCycles: '--cycles',
  averages: '--averages',
  'limits.maxDeviationDb': '--max-deviation',
  'limits.cornerTolerance': '--corner-tolerance',
  operator: '--operator',
  notes: '--notes',
};

export function namedForTheCommandLine(error: unknown): unknown {
  return namedForOption(error, OPTION_OF_FIELD, /^request\./);
}

/**
 * The build to measure: --build ID, or a new build of --design ID|FILE. `checkUnsaved` refuses a design and
 * measured values the run could not take, before anything is stored.
 */
export async function resolveBuildId(service: LocalService, parsed: ParsedArgs, checkUnsaved: (design: unknown, actualValues: Record<string, number>) => void): Promise<number> {
  const buildId = optionNumber(parsed, 'build');
  const designText = optionString(parsed, 'design');
  if (buildId !== undefined && designText !== undefined) throw new ValidationError('--build/--design', 'give one, not both');
  if (buildId !== undefined) return (await service.getBuild(buildId)).id;
  if (designText === undefined) throw new ValidationError('--build', 'is missing', 'Give --build ID (see rolloff build list) or --design ID|FILE [--label TEXT] [--actual PART=VALUE …].');
  const design = chooseDesign(designText);
  const actualValues = actualValuesFrom(parsed);
  // Design, measured values and plan are all checked before anything is stored.
  checkUnsaved(await designContent(service, design), actualValues);
  const designId = await storedDesignId(service, design);
  const build = await service.createBuild({ designId, label: optionString(parsed, 'label') ?? 'build', notes: '', actualValues });
  return build.id;
}

/** Refuses a run that could not start (no ceiling, no instruments) before anything is stored. */
export function checkBenchOptions(service: LocalService, parsed: ParsedArgs): void {
  if (service.maxStimulus === undefined) {
    const bench = service.bench ? benchDescription(service.bench) : 'this bench';
    throw new ValidationError(
      '--max-stimulus',
      `is missing and ${bench} has no maximum stimulus saved`,
      `Give the largest peak-to-peak voltage the circuit may see, e.g. --max-stimulus 2; it is saved for ${bench}${service.bench?.simulated ? '' : ' (a limit set for the simulated bench never applies to real instruments)'}.`,
    );
  }
  if (!optionFlag(parsed, 'simulated') && !optionString(parsed, 'generator')) {
    throw new ValidationError('--generator', 'no instruments given', 'Give --generator ADDRESS with --scope or --meter ADDRESS, or use --simulated for the simulated bench.');
  }
}

/** Connects what the options name: the simulated bench of the build, or the given addresses. */
export async function connectBench(service: LocalService, parsed: ParsedArgs, buildId: number): Promise<void> {
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

/**
 * The sweep request the options describe, checked by the contract's own schema
 * (as a window's call is at the host boundary); a refusal names the option.
 * `buildId` 0: a build not stored yet (--design), checked before it is.
 */
export function requestFrom(parsed: ParsedArgs, buildId: number): SweepRequest {
  const request = requestOfOptions(parsed, buildId);
  // The build is checked where --build/--design are read; any stored id stands in for one not stored yet.
  const checked = checkValue(SweepRequestSchema, { ...request, buildId: buildId || 1 }, 'request');
  return { ...checked, buildId };
}

function requestOfOptions(parsed: ParsedArgs, buildId: number): SweepRequest {
  const measure = optionString(parsed, 'measure') ?? 'scope';
  if (measure !== 'scope' && measure !== 'meter') throw new ValidationError('--measure', `"${measure}" is not scope or meter`);
  const through = optionFlag(parsed, 'through');
  const fixed = optionNumber(parsed, SETTINGS.fixedAmplitude.cliOption);
  const target = optionNumber(parsed, SETTINGS.targetOutput.cliOption);
  if (fixed !== undefined && target !== undefined) throw new ValidationError('--amplitude/--target-output', 'give one, not both', '--amplitude fixes the stimulus; --target-output sets it per frequency from theory.');
  const limits: VerdictLimits = {};
  const maxDeviation = optionNumber(parsed, 'max-deviation');
  const cornerTolerance = optionNumber(parsed, 'corner-tolerance');
  if (maxDeviation !== undefined) limits.maxDeviationDb = maxDeviation;
  if (cornerTolerance !== undefined) limits.cornerTolerance = cornerTolerance;
  const kind = optionFlag(parsed, 'dc') ? 'dc' : 'ac';
  const range = SWEEP_RANGE_DEFAULTS[kind];
  const linear = optionFlag(parsed, 'linear');
  const perDecade = optionNumber(parsed, SETTINGS.pointsPerDecade.cliOption);
  const points = optionNumber(parsed, SETTINGS.linearPoints.cliOption);
  if (linear && perDecade !== undefined) throw new ValidationError('--per-decade', 'applies to log spacing', 'With --linear, give the number of points with --points N.');
  if (!linear && points !== undefined) throw new ValidationError('--points', 'applies to --linear sweeps', 'A log sweep takes --per-decade N; add --linear for evenly spaced points.');
  return {
    buildId,
    kind,
    from: optionNumber(parsed, 'from') ?? range.from,
    to: optionNumber(parsed, 'to') ?? range.to,
    pointsPerDecade: perDecade ?? range.pointsPerDecade,
    spacing: linear ? 'linear' : 'log',
    ...(linear ? { points: points ?? range.linearPoints } : {}),
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
