/**
 * Noise measurement: the generator held off (GeneratorControl.holdOff, the
 * limit-checked quiet state, read back where the profile can), the circuit
 * given its settling time, then one record per step — a scope record of the
 * output (channel 2) reduced at once to its own Welch estimate (the window's
 * equivalent noise bandwidth applied, app/signal/welch.ts), or one meter AC
 * RMS reading. A clipped record is taken again on a wider range; the
 * generator is held off again after every reconnection.
 */
import type { BenchClock } from '../../bench/clock';
import type { MeterControl, OutputOffCheck, ScopeControl } from '../../bench/roles';
import { PointFlag, type NoiseAcquisition, type RunEvent } from '../../contract/contract';
import { ValidationError } from '../../errors';
import { welchPsd } from '../../signal';
import { formatEngineering } from '../../units';
import { RemeasureStep } from './errors';
import { niceScale } from './measure-scope';
import type { StepMeasurer, SweepInstruments } from './types';

/** Each widening of the scope's range is ×2.5; three cover a noise 15× above theory (as the sweep's scope measurement). */
const RANGE_WIDENING = 2.5;
const MAX_RANGE_WIDENINGS = 3;
/** A sample rate this close to the one planned is the one planned (instruments round their settings). */
const RATE_TOLERANCE = 1e-6;

/** One record as measured, before it is stored (NewNoiseRecord without its step). */
export interface NoiseStepResult {
  sampleRateHz: number;
  segments: number;
  degreesOfFreedom: number;
  psdV2PerHz?: Float64Array;
  rmsV: number;
  meanV: number;
  flags: number;
  note?: string;
}

export interface NoiseMeasurerOptions {
  clock: BenchClock;
  acquisition: NoiseAcquisition;
  /** The band's top (Hz): a scope that samples too slowly for it is refused. */
  toHz: number;
  /** The run's log (the generator's quiet state, the scope's own record length). */
  log(level: RunEvent['level'], message: string): Promise<void>;
}

export function noiseMeasurer(options: NoiseMeasurerOptions): StepMeasurer<NoiseStepResult> {
  const { clock, acquisition } = options;
  let settled = false;
  let widenings = 0;
  let rangeV = acquisition.rangeV;
  let reportedRate = false;

  const setRange = async (scope: ScopeControl) => {
    const voltsPerDiv = niceScale((2 * rangeV) / scope.verticalDivisions);
    await scope.setupChannels({ 1: voltsPerDiv, 2: voltsPerDiv });
  };

  return {
    async prepare(instruments: SweepInstruments) {
      settled = false;
      const check = await instruments.generator.holdOff();
      await options.log(check === 'read back' ? 'info' : 'warning', quietMessage(check));
      if (acquisition.measurement === 'meter') {
        const meter = requireMeter(instruments);
        await meter.setRange('auto');
        await meter.setIntegration(acquisition.recordS);
        return;
      }
      const scope = requireScope(instruments);
      if (scope.setRecordPoints) await scope.setRecordPoints(acquisition.recordPoints);
      else await options.log('info', `the scope profile cannot set the record length: the records are taken as long as the scope makes them (${acquisition.recordPoints} samples asked for)`);
      await scope.setTimebase(acquisition.recordS);
      await setRange(scope);
    },

    // Nothing to apply: the stimulus of every step is the generator held off.
    async apply() {},

    async acquire(instruments, _setting, acquiring) {
      if (!settled) {
        // Counted from the generator's quiet state (prepare, just before): the circuit's own transient dies away.
        await clock.sleepS(acquisition.settleS);
        settled = true;
      }
      if (acquisition.measurement === 'meter') {
        const meter = requireMeter(instruments);
        const reading = meter.readAcRmsV();
        acquiring();
        const { value, flag } = await reading;
        return async () => ({
          sampleRateHz: Number.NaN,
          segments: 0,
          degreesOfFreedom: 0,
          rmsV: flag === 'ok' ? value : Number.NaN,
          meanV: Number.NaN,
          flags: flag === 'overrange' ? PointFlag.overrange : flag === 'ok' ? 0 : PointFlag.notANumber,
        });
      }
      const scope = requireScope(instruments);
      const captured = scope.acquire();
      acquiring();
      await captured;
      return async () => {
        const waveform = await scope.fetchWaveform(2);
        if (waveform.clipped && widenings < MAX_RANGE_WIDENINGS) {
          widenings++;
          rangeV *= RANGE_WIDENING;
          await setRange(scope);
          throw new RemeasureStep(`clipped record; range widened to ±${formatEngineering(rangeV, 'V')}`);
        }
        const sampleRateHz = 1 / waveform.sampleIntervalS;
        if (sampleRateHz < 2 * options.toHz) {
          throw new ValidationError('scope sample rate', `the scope samples at ${formatEngineering(sampleRateHz, 'Hz')}, too slowly for a band up to ${formatEngineering(options.toHz, 'Hz')}`, 'Check the scope profile\'s timebase and recordPoints operations, or lower the band\'s top.');
        }
        const estimate = welchPsd(waveform.samplesV, sampleRateHz, { segmentLength: acquisition.segmentLength, overlap: acquisition.overlap, window: acquisition.window });
        const { meanV, rmsV } = moments(waveform.samplesV);
        let note: string | undefined;
        if (!reportedRate) {
          reportedRate = true;
          const off = Math.abs(sampleRateHz / acquisition.sampleRateHz - 1) > RATE_TOLERANCE;
          note = `records of ${waveform.samplesV.length} samples at ${formatEngineering(sampleRateHz, 'Hz')}${off ? ` (${formatEngineering(acquisition.sampleRateHz, 'Hz')} planned)` : ''}, ${estimate.segments} segments each, ENBW ${formatEngineering(estimate.enbwHz, 'Hz')} per bin`;
        }
        return {
          sampleRateHz,
          segments: estimate.segments,
          degreesOfFreedom: estimate.degreesOfFreedom,
          psdV2PerHz: estimate.psdV2PerHz,
          rmsV,
          meanV,
          flags: waveform.clipped ? PointFlag.overrange : 0,
          note,
        };
      };
    },
  };
}

function quietMessage(check: OutputOffCheck): string {
  return check === 'read back'
    ? 'generator held off: output off at the smallest amplitude and no offset, and the generator reports its output off'
    : 'generator output commanded off at the smallest amplitude and no offset; its profile cannot read the output state back (no readOutput operation), so check it is off';
}

function requireScope(instruments: SweepInstruments): ScopeControl {
  if (!instruments.scope) throw new ValidationError('noise run', 'a scope noise run needs a scope', 'Connect a scope, or measure with the meter.');
  return instruments.scope;
}

function requireMeter(instruments: SweepInstruments): MeterControl {
  if (!instruments.meter) throw new ValidationError('noise run', 'a meter noise run needs a meter', 'Connect a meter, or measure with the scope.');
  return instruments.meter;
}

/** Mean and the RMS about it (population form), volts. */
function moments(samples: Float64Array): { meanV: number; rmsV: number } {
  let sum = 0;
  for (const v of samples) sum += v;
  const meanV = sum / samples.length;
  let squares = 0;
  for (const v of samples) squares += (v - meanV) ** 2;
  return { meanV, rmsV: Math.sqrt(squares / samples.length) };
}
