/**
 * `rolloff noise`: a noise run of a build — the generator held off, the
 * output's noise recorded by the scope (a density by Welch's method) or the
 * meter (RMS in its bandwidth), every record stored as it is measured, and
 * the result set against the noise computed for the build's circuit.
 */
import type { CommandSpec, OptionSpec, ParsedArgs } from '../args';
import { optionFlag, optionNumber, optionString } from '../args';
import { SAFETY_NOTICE_SHORT } from '../../contract/safety';
import { NOISE_DEFAULTS, NOISE_MEASUREMENTS, NOISE_WINDOWS, NoiseRequestSchema, type NoiseRequest } from '../../contract/contract';
import { checkValue } from '../../contract/check-call';
import { formatDuration, formatEngineering } from '../../units';
import { BENCH_OPTIONS, BUILD_OPTIONS, checkBenchOptions, connectBench, openService, reportReusedLimit, resolveBuildId } from '../sweep/sweep-options';
import { checkNoiseRequestForUnsavedBuild } from '../../service/noise-run';
import { parseBand } from '../sweep/band-option';
import { followRun } from '../sweep/follow-run';
import { noiseRunText } from '../sweep/noise-text';
import { namedForOption } from '../field-option';
import { RUN_JSON_DESCRIPTION, runRecordJson } from '../run-json';

/**
 * The bench options of a sweep (app/cli/common-options.ts), with one default changed: no flat noise on the
 * simulated bench unless asked for, since a noise run measures the circuit's own (the shared 100 µV RMS
 * would be several times the density of a typical stage). The one exception to one default per option
 * (test/unit/cli/option-consistency.test.ts names it).
 */
export const NOISE_RUN_MEASUREMENT_NOISE_VRMS = 0;
const NOISE_BENCH_OPTIONS: OptionSpec[] = BENCH_OPTIONS.map((option) =>
  option.name === 'measurement-noise'
    ? { ...option, defaultValue: NOISE_RUN_MEASUREMENT_NOISE_VRMS, description: 'simulated bench: flat white noise on every reading (the measurement\'s own, added to the circuit\'s), volts RMS; none unless given, as a noise run measures the circuit\'s own' }
    : option,
);

const NOISE_OPTIONS: OptionSpec[] = [
  { name: 'band', kind: 'string', placeholder: 'FROM:TO', description: 'band of the density (scope) or of the computed RMS the meter is compared with, Hz', defaultValue: `${NOISE_DEFAULTS.fromHz}:${NOISE_DEFAULTS.toHz}` },
  { name: 'records', kind: 'integer', placeholder: 'N', description: 'scope records (each a Welch estimate, averaged) or meter readings', defaultValue: NOISE_DEFAULTS.records },
  { name: 'segment', kind: 'integer', placeholder: 'N', description: 'Welch segment length in samples, a power of two (resolution = sample rate ÷ N)', defaultValue: NOISE_DEFAULTS.segmentLength },
  { name: 'window', kind: 'string', placeholder: NOISE_WINDOWS.join('|'), description: 'window of each segment', defaultValue: NOISE_DEFAULTS.window },
  { name: 'measure', kind: 'string', placeholder: NOISE_MEASUREMENTS.join('|'), description: 'record with the scope (density) or the meter (RMS in its bandwidth)', defaultValue: NOISE_DEFAULTS.measurement },
  { name: 'operator', kind: 'string', placeholder: 'NAME', description: 'who ran it (recorded)', defaultValue: '' },
  { name: 'notes', kind: 'string', placeholder: 'TEXT', description: 'notes recorded with the run', defaultValue: '' },
  { name: 'json', kind: 'flag', description: `print the finished run on stdout as ${RUN_JSON_DESCRIPTION} (as show RUN --json)` },
];

export const noiseCommand: CommandSpec = {
  name: 'noise',
  summary: 'Noise run of a build: generator held off, the output\'s noise density (scope) or RMS (meter) against the computed noise',
  usage: '(--build ID | --design ID|FILE [--label TEXT] [--actual PART=VALUE …]) (--simulated [--circuit-noise] | --generator ADDR --scope ADDR|--meter ADDR) [--band FROM:TO] [options]',
  options: [...BUILD_OPTIONS, ...NOISE_BENCH_OPTIONS, ...NOISE_OPTIONS],
  details: `
The generator stays connected but is held off: output off, then its smallest
amplitude and no offset (within the maximum stimulus like every setting), and
read back off where its profile can. The computed density is the build's
circuit with its input held by the generator's source resistance (the
profile's, 50 Ω for the generic one); if your generator opens its output when
off, terminate the input with a resistor of that value. The maximum stimulus
is the bench's, as for sweep: --max-stimulus saves it for this bench and later
runs on the same bench reuse it.

Scope: records of the output (channel 2) at 2.56 × the band's top, each
reduced to its own Welch estimate (50 % overlapped segments, the window's
equivalent noise bandwidth applied); the run's density averages them, with
each bin's uncertainty from the number of averages. A scope measures its own
noise too: the smallest range it offers sets the floor.
Meter: AC RMS readings; the meter integrates over its own bandwidth, so give
that as --band to compare with the computed RMS.

Every record is stored the moment it is measured. Ctrl-C pauses after the
current record; "rolloff resume RUN" continues where it stopped (a simulated
run: give --circuit-noise and --measurement-noise as here).
Examples:
  rolloff noise --design preamp.json --simulated --circuit-noise --max-stimulus 1 --band 100:50k --segment 8192
  rolloff noise --build 3 --generator tcp://192.0.2.10:5025 --scope tcp://192.0.2.11:5025 --band 10:10k --segment 16384 --records 32`,
  async run(parsed) {
    process.stderr.write(`${SAFETY_NOTICE_SHORT}\n\n`);
    const service = await openService(parsed);
    try {
      requestFrom(parsed, 1);
      checkBenchOptions(service, parsed);
      const buildId = await resolveBuildId(service, parsed, (design, actualValues) => checkNoiseRequestForUnsavedBuild(requestFrom(parsed, 1), design, actualValues));
      const request = requestFrom(parsed, buildId);
      await connectBench(service, parsed, buildId);
      reportReusedLimit(service);
      if (optionFlag(parsed, 'simulated') && !optionFlag(parsed, 'circuit-noise')) {
        process.stderr.write('note: without --circuit-noise the simulated circuit adds no noise of its own; the run records only the flat --measurement-noise.\n');
      }
      const plan = await service.planNoiseRun(request);
      const a = plan.acquisition;
      process.stderr.write(
        `plan: ${plan.steps.length} ${a.measurement === 'scope' ? `records of ${a.recordPoints} samples at ${formatEngineering(a.sampleRateHz, 'Hz')}` : 'meter readings'}, ` +
          `physical minimum ${formatDuration(plan.estimatedDurationS)} of bench time${service.clock.timeScale !== 1 ? ` (simulated bench ×${service.clock.timeScale})` : ''}; computed output noise ${formatEngineering(a.expectedRmsV, 'V')} RMS\n`,
      );
      for (const warning of plan.warnings) process.stderr.write(`plan warning: ${warning}\n`);
      const run = await service.startNoiseRun(request);
      process.stderr.write(`run ${run.id} started${run.simulated ? ' on the simulated bench (simulated)' : ''}; database ${service.databaseLocation}\n`);
      const status = await followRun(service, run.id);
      if (optionFlag(parsed, 'json')) process.stdout.write(await runRecordJson(service, run.id));
      else process.stdout.write(noiseRunText(await service.getNoiseRun(run.id)));
      if (status === 'paused') process.stderr.write(`run ${run.id} paused; continue with: rolloff resume ${run.id} --db ${service.databaseLocation}\n`);
      return status === 'done' || status === 'paused' ? 0 : 1;
    } catch (error) {
      throw namedForTheCommandLine(error);
    } finally {
      await service.close();
    }
  },
};

/** The request the options describe, checked by the contract's own schema (field names turned into the options). */
function requestFrom(parsed: ParsedArgs, buildId: number): NoiseRequest {
  const [fromHz, toHz] = parseBand(optionString(parsed, 'band') ?? `${NOISE_DEFAULTS.fromHz}:${NOISE_DEFAULTS.toHz}`);
  const request = {
    buildId,
    kind: 'noise',
    fromHz,
    toHz,
    records: optionNumber(parsed, 'records'),
    segmentLength: optionNumber(parsed, 'segment'),
    window: optionString(parsed, 'window'),
    measurement: optionString(parsed, 'measure'),
    operator: optionString(parsed, 'operator') ?? '',
    notes: optionString(parsed, 'notes') ?? '',
  };
  return checkValue(NoiseRequestSchema, request, 'noise request');
}

/** The option behind each field of a noise request, so a refusal names what the user typed. */
const OPTION_OF_FIELD: Record<string, string> = {
  fromHz: '--band', toHz: '--band', records: '--records', segmentLength: '--segment', window: '--window', measurement: '--measure',
};

const namedForTheCommandLine = (error: unknown) => namedForOption(error, OPTION_OF_FIELD, /^noise request\./);
