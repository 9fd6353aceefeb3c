/**
 * Options that several commands take, declared once so each has one name, one
 * placeholder, one default and one check wherever it appears
 * (test/unit/cli/option-consistency.test.ts walks every command for this).
 */
import { ValidationError } from '../errors';
import { SETTINGS } from '../contract/vocabulary';
import { SIMULATED_BENCH_DEFAULTS } from '../sim/defaults';
import { checkMaxStimulusVpp } from '../service/stimulus-limits';
import { optionFlag, optionNumber, type OptionSpec, type ParsedArgs } from './args';

export const DATABASE_OPTION: OptionSpec = {
  name: 'db',
  kind: 'string',
  placeholder: 'PATH|URL',
  description: 'database file, or a lab store postgres://USER@HOST:PORT/DATABASE (default: ROLLOFF_DB or the user data folder)',
};

export const TIME_SCALE_OPTION: OptionSpec = {
  name: 'time-scale',
  kind: 'number',
  placeholder: 'X',
  description: 'simulated bench: bench seconds per wall-clock second (1 is real time; 20 runs a sweep 20 times faster)',
  defaultValue: SIMULATED_BENCH_DEFAULTS.timeScale,
};

/** The simulated bench's own settings: how fast its clock runs, how noisy its readings are, and which noise it draws. */
export const SIMULATED_BENCH_OPTIONS: OptionSpec[] = [
  TIME_SCALE_OPTION,
  {
    // Not --noise: on theory that asks for the noise density.
    name: 'measurement-noise',
    kind: 'number',
    placeholder: 'VRMS',
    description: 'simulated bench: flat white noise on every reading (the measurement\'s own, not the circuit\'s), volts RMS',
    defaultValue: SIMULATED_BENCH_DEFAULTS.measurementNoiseVrms,
  },
  {
    name: 'circuit-noise',
    kind: 'flag',
    description: 'simulated bench: also add the circuit\'s own output noise, shaped by the circuit (resistors, op-amp en and in, as `rolloff theory --noise` computes it)',
  },
  {
    // A fresh simulated bench after a crash need not replay the noise the one before made (resume --seed 2).
    name: 'seed',
    kind: 'integer',
    placeholder: 'N',
    description: 'simulated bench: random seed of its noise and faults (the same seed draws the same noise)',
    defaultValue: SIMULATED_BENCH_DEFAULTS.seed,
  },
];

export interface SimulatedBenchChoice {
  timeScale: number;
  noiseVrms: number;
  circuitNoise: boolean;
  seed: number;
}

/** The simulated bench settings the options ask for, checked. */
export function simulatedBenchFrom(parsed: ParsedArgs): SimulatedBenchChoice {
  const timeScale = timeScaleFrom(parsed);
  const noiseVrms = optionNumber(parsed, 'measurement-noise') ?? SIMULATED_BENCH_DEFAULTS.measurementNoiseVrms;
  if (!(noiseVrms >= 0)) throw new ValidationError('--measurement-noise', `${noiseVrms} V is below zero`, 'Give volts RMS, 0 for none.');
  const seed = optionNumber(parsed, 'seed') ?? SIMULATED_BENCH_DEFAULTS.seed;
  if (!Number.isSafeInteger(seed)) throw new ValidationError('--seed', `${seed} is not a whole number`, 'Give a whole number, e.g. --seed 2.');
  return { timeScale, noiseVrms, circuitNoise: optionFlag(parsed, 'circuit-noise'), seed };
}

export function timeScaleFrom(parsed: ParsedArgs): number {
  const timeScale = optionNumber(parsed, 'time-scale') ?? SIMULATED_BENCH_DEFAULTS.timeScale;
  if (!(timeScale > 0)) throw new ValidationError('--time-scale', `${timeScale} is not above 0`, 'Use 1 for real time, 20 for twenty times faster.');
  return timeScale;
}

/** The maximum-stimulus option, with what it means in this command. */
export function maxStimulusOption(note: string): OptionSpec {
  return {
    name: SETTINGS.maxStimulus.cliOption,
    aliases: [...SETTINGS.maxStimulus.cliAliases],
    kind: 'number',
    placeholder: 'VPP',
    description: `${SETTINGS.maxStimulus.label}, ${SETTINGS.maxStimulus.unit}: ${SETTINGS.maxStimulus.explanation} (${note})`,
  };
}

/** The maximum stimulus given, if any, checked as the service checks every limit. */
export function maxStimulusFrom(parsed: ParsedArgs): number | undefined {
  const vpp = optionNumber(parsed, SETTINGS.maxStimulus.cliOption);
  return vpp === undefined ? undefined : checkMaxStimulusVpp(vpp, `--${SETTINGS.maxStimulus.cliOption}`);
}

/**
 * How long to wait for an instrument's reply. 2 s is the VISA default timeout
 * (VI_ATTR_TMO_VALUE, IVI VPP-4.3), which users of other bench software know.
 */
export const REPLY_TIMEOUT_S = 2;

export function replyTimeoutOption(note = ''): OptionSpec {
  return { name: 'timeout', kind: 'number', placeholder: 'S', description: `seconds to wait for each reply${note}`, defaultValue: REPLY_TIMEOUT_S };
}

/** The reply timeout given, checked. */
export function replyTimeoutFrom(parsed: ParsedArgs): number {
  const timeoutS = optionNumber(parsed, 'timeout') ?? REPLY_TIMEOUT_S;
  if (!(timeoutS > 0)) throw new ValidationError('--timeout', `${timeoutS} s is not above 0`, `Give seconds, e.g. --timeout ${REPLY_TIMEOUT_S}.`);
  return timeoutS;
}
