/**
 * Scope measurement: both channels' waveforms (ch1 = stage input, ch2 = stage
 * output), each fitted with the IEEE Std 1057 three-parameter sine fit at the
 * stimulus frequency; gain and phase with uncertainties from the fits.
 */
import type { BenchClock } from '../../bench/clock';
import type { ScopeControl, Waveform } from '../../bench/roles';
import { PointFlag } from '../../service/contract';
import { distortionScore, DISTORTION_SCORE_LIMIT, responseFromFits, sineFit3, type StageResponse } from '../../signal';
import { formatEngineering } from '../../units';
import { combineAcquisitions } from './combine';
import { waitUntilSettled } from './timing';
import type { StepMeasurer, StepResult, StepSetting, SweepInstruments } from './types';

/** Signal height on screen: 6 of 8 vertical divisions, room for tolerance and overshoot (common practice, no source). */
const SCREEN_DIVISIONS_USED = 6;
/** Each widening is ×2.5 of the scale; three cover a build 15× off theory. */
const MAX_SCALE_WIDENINGS = 3;

export interface ScopeMeasurerOptions {
  clock: BenchClock;
  /** Expected |H(f)| from theory, to set channel 2's vertical scale. */
  expectedGainRatioAt(frequencyHz: number): number;
}

export function scopeMeasurer(options: ScopeMeasurerOptions): StepMeasurer {
  const { clock } = options;
  let outputOn = false;
  let lastTimebaseS = NaN;
  let lastScales = { 1: NaN, 2: NaN };

  return {
    async prepare(instruments: SweepInstruments) {
      if (!instruments.scope) throw new Error('scope measurement needs a scope');
      outputOn = false;
      lastTimebaseS = NaN;
      lastScales = { 1: NaN, 2: NaN };
    },

    async measure(instruments: SweepInstruments, setting: StepSetting): Promise<StepResult> {
      const scope = instruments.scope!;
      await instruments.generator.configureSine({ frequencyHz: setting.stimulus, amplitudeVpp: setting.amplitudeVpp, offsetV: 0 });
      if (!outputOn) {
        await instruments.generator.setOutput(true);
        outputOn = true;
      }
      const changedAtS = clock.nowS();
      if (setting.integrateS !== lastTimebaseS) {
        await scope.setTimebase(setting.integrateS);
        lastTimebaseS = setting.integrateS;
      }
      const scales = {
        1: niceScale(setting.amplitudeVpp / SCREEN_DIVISIONS_USED),
        2: niceScale((setting.amplitudeVpp * options.expectedGainRatioAt(setting.stimulus)) / SCREEN_DIVISIONS_USED),
      };
      if (scales[1] !== lastScales[1] || scales[2] !== lastScales[2]) {
        await scope.setupChannels(scales);
        lastScales = scales;
      }
      await waitUntilSettled(clock, changedAtS, setting.settleS);

      const responses: StageResponse[] = [];
      let worstDistortion = 0;
      let clipped = false;
      for (let k = 0; k < setting.averages; k++) {
        // One record of both channels at once spans the integration time (whole cycles).
        let record = await acquireBoth(scope);
        // A build that differs from theory can overflow the expected scale: widen and take the record again.
        for (let widen = 0; widen < MAX_SCALE_WIDENINGS && (record.input.clipped || record.output.clipped); widen++) {
          lastScales = {
            1: record.input.clipped ? niceScale(lastScales[1] * 2.5) : lastScales[1],
            2: record.output.clipped ? niceScale(lastScales[2] * 2.5) : lastScales[2],
          };
          await scope.setupChannels(lastScales);
          record = await acquireBoth(scope);
        }
        clipped ||= record.input.clipped || record.output.clipped;
        const inputFit = sineFit3({ samplesV: record.input.samplesV, sampleIntervalS: record.input.sampleIntervalS, frequencyHz: setting.stimulus });
        const outputFit = sineFit3({ samplesV: record.output.samplesV, sampleIntervalS: record.output.sampleIntervalS, frequencyHz: setting.stimulus });
        worstDistortion = Math.max(worstDistortion, distortionScore(outputFit));
        responses.push(responseFromFits(inputFit, outputFit));
      }
      const combined = combineAcquisitions(responses);
      const distorted = worstDistortion > DISTORTION_SCORE_LIMIT;
      const last = responses[responses.length - 1];
      return {
        gainDb: combined.gainDb,
        gainUncertaintyDb: combined.gainUncertaintyDb,
        phaseDeg: combined.phaseDeg,
        phaseUncertaintyDeg: combined.phaseUncertaintyDeg,
        outputV: last.output.amplitudeV,
        inputReading: last.input.amplitudeV,
        outputReading: last.output.amplitudeV,
        flags: (distorted ? PointFlag.distorted : 0) | (clipped ? PointFlag.overrange : 0),
        advice: distorted
          ? `output at ${formatEngineering(setting.stimulus, 'Hz')} is not a clean sine (residual ${(worstDistortion * 100).toFixed(1)} % of its RMS): ` +
            `likely slew limiting or clipping. Lower the amplitude (now ${setting.amplitudeVpp.toPrecision(3)} Vpp) or use automatic amplitude.`
          : undefined,
      };
    },
  };
}

async function acquireBoth(scope: ScopeControl): Promise<{ input: Waveform; output: Waveform }> {
  await scope.acquire();
  return { input: await scope.fetchWaveform(1), output: await scope.fetchWaveform(2) };
}

/** Rounds up to the 1-2-5 sequence of vertical scales scopes offer (common practice, no source). */
export function niceScale(voltsPerDiv: number): number {
  if (!(voltsPerDiv > 0) || !Number.isFinite(voltsPerDiv)) return 1;
  const decade = 10 ** Math.floor(Math.log10(voltsPerDiv));
  for (const step of [1, 2, 5, 10]) if (step * decade >= voltsPerDiv * (1 - 1e-9)) return step * decade;
  return 10 * decade;
}
