/**
 * Scope measurement: both channels' waveforms (ch1 = stage input, ch2 = stage
 * output), each fitted with the IEEE Std 1057 three-parameter sine fit at the
 * stimulus frequency; gain and phase with uncertainties from the fits.
 */
import type { BenchClock } from '../../bench/clock';
import type { ScopeControl, Waveform } from '../../bench/roles';
import { PointFlag } from '../../contract/contract';
import { distortionScore, DISTORTION_SCORE_LIMIT, responseFromFits, sineFit3, type StageResponse } from '../../signal';
import { formatEngineering } from '../../units';
import { combineAcquisitions } from './combine';
import { AppliedStimulus } from './applied-stimulus';
import { RemeasureStep } from './errors';
import type { StepMeasurer, StepResult, StepSetting, SweepInstruments } from './types';

/** Signal height on screen: 6 divisions peak-to-peak, inside the 8 or 10 vertical divisions scopes have, with room for tolerance and overshoot (common practice, no source). */
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
  const stimulus = new AppliedStimulus(clock);
  let lastTimebaseS = NaN;
  let lastScales = { 1: NaN, 2: NaN };
  let channelsOn = false;
  /** Per channel, how far the scale is widened beyond theory's expectation; kept for the rest of the sweep. */
  const boost = { 1: 1, 2: 1 };
  let crossChecked = false;
  /** The generator's latest move to a step, until it has acknowledged the setting. */
  let moving: Promise<void> | undefined;

  const setScale = async (scope: ScopeControl, wanted: { 1: number; 2: number }) => {
    if (!channelsOn) {
      await scope.setupChannels(wanted);
      channelsOn = true;
    } else {
      // Only the channel whose scale changed: each command is a round trip on a slow link.
      for (const channel of [1, 2] as const) if (wanted[channel] !== lastScales[channel]) await scope.setVerticalScale(channel, wanted[channel]);
    }
    lastScales = { ...wanted };
  };

  /**
   * Time base and scales for a step. One record holds all `averages` acquisitions back to back (each
   * whole cycles), split into segments in software, so averaging costs no extra read-backs. The
   * bookkeeping follows each setting only once the scope has taken it.
   */
  const setUp = async (scope: ScopeControl, setting: StepSetting) => {
    const recordS = setting.integrateS * setting.averages;
    if (recordS !== lastTimebaseS) {
      lastTimebaseS = NaN;
      await scope.setTimebase(recordS);
      lastTimebaseS = recordS;
    }
    const wanted = {
      1: niceScale((boost[1] * setting.amplitudeVpp) / SCREEN_DIVISIONS_USED),
      2: niceScale((boost[2] * setting.amplitudeVpp * options.expectedGainRatioAt(setting.stimulus)) / SCREEN_DIVISIONS_USED),
    };
    if (wanted[1] !== lastScales[1] || wanted[2] !== lastScales[2]) await setScale(scope, wanted);
  };

  /** A clipped record: widen that channel (×2.5 per try) and report whether another try is allowed. */
  const widenFor = (record: { input: Waveform; output: Waveform }): boolean => {
    if (record.input.clipped) boost[1] *= 2.5;
    if (record.output.clipped) boost[2] *= 2.5;
    return Math.max(boost[1], boost[2]) <= 2.5 ** MAX_SCALE_WIDENINGS;
  };

  return {
    async prepare(instruments: SweepInstruments) {
      if (!instruments.scope) throw new Error('scope measurement needs a scope');
      stimulus.reset();
      lastTimebaseS = NaN;
      lastScales = { 1: NaN, 2: NaN };
      channelsOn = false;
    },

    apply: (instruments, setting) => (moving = stimulus.apply(instruments, setting, 'sine')),

    async acquire(instruments: SweepInstruments, setting: StepSetting, acquiring: () => void) {
      const scope = instruments.scope!;
      // The set-up is usually done already, right after the previous step's read-back (see below).
      await stimulus.ensureWhile(instruments, setting, 'sine', () => setUp(scope, setting));
      await stimulus.settled(setting.settleS);
      // Both channels at once on one time base. Once captured the stimulus is free: the runner moves the
      // generator on while this record is read back.
      const captured = scope.acquire();
      acquiring();
      await captured;
      return async (next?: StepSetting) => {
        // The generator's setting for the next step (started by the runner just before this) goes out first:
        // its acknowledgement starts that step's settling, so it should not queue behind this record's
        // read-back in the instruments' process or be taken after decoding it here.
        if (next) await new Promise<void>((resolve) => setImmediate(resolve));
        const record = await fetchBoth(scope);
        const clipped = record.input.clipped || record.output.clipped;
        if (clipped && widenFor(record)) throw new RemeasureStep('clipped record; scale widened');
        // Once per sweep, the scope's own amplitude measurement of this capture against the sine fit: catches a
        // wrong probe attenuation or a channel mix-up before a whole sweep is trusted. Asked before the next
        // step's settings change the scope.
        let crossChecking: Promise<{ note?: string; advice?: string }> | undefined;
        if (!crossChecked && scope.measureAmplitudeVpp) {
          crossChecked = true;
          crossChecking = crossCheck(scope, record, setting);
        }
        // The scope is free now: the next step's time base and scales go out while this record is reduced and
        // stored and the circuit settles. A refused setting is left for the next step's own set-up to report.
        const nextSetUp = next
          ? (async () => {
              await crossChecking?.catch(() => undefined);
              await setUp(scope, next);
            })().catch(() => undefined)
          : undefined;
        try {
          // The fits keep the event loop busy for a while: let the generator's acknowledgement of the next
          // stimulus be taken first, since settling is counted from it.
          await moving?.catch(() => undefined);
          const result = reduceRecords(splitRecord(record, setting.averages), setting);
          return crossChecking ? { ...result, ...(await crossChecking) } : result;
        } finally {
          await nextSetUp;
        }
      };
    },
  };
}

/** Relative disagreement above which the cross-check warns: well above noise in a peak-to-peak reading (common practice, no source). */
const CROSS_CHECK_LIMIT = 0.1;

async function crossCheck(scope: ScopeControl, record: { input: Waveform; output: Waveform }, setting: StepSetting): Promise<{ note?: string; advice?: string }> {
  const fitted = (w: Waveform) => 2 * sineFit3({ samplesV: w.samplesV, sampleIntervalS: w.sampleIntervalS, frequencyHz: setting.stimulus }).amplitudeV;
  const rows: string[] = [];
  let worst = 0;
  for (const [channel, wave] of [[1, record.input], [2, record.output]] as const) {
    const reading = await scope.measureAmplitudeVpp!(channel);
    if (reading.flag !== 'ok') return { advice: `the scope's own Vpp measurement of channel ${channel} read ${reading.flag}; check its vertical setup` };
    const fit = fitted(wave);
    const relative = reading.value / fit - 1;
    worst = Math.max(worst, Math.abs(relative));
    rows.push(`ch${channel} ${formatEngineering(reading.value, 'Vpp')} vs fit ${formatEngineering(fit, 'Vpp')}`);
  }
  const text = `cross-check at ${formatEngineering(setting.stimulus, 'Hz')}, scope's own measurement against the sine fit: ${rows.join(', ')}`;
  return worst > CROSS_CHECK_LIMIT
    ? { advice: `${text} — they differ by ${(worst * 100).toFixed(0)} %: check probe attenuation settings and which channel is input (ch1) and output (ch2).` }
    : { note: `${text} (agree within ${(CROSS_CHECK_LIMIT * 100).toFixed(0)} %)` };
}

/**
 * A record cut into `count` equal consecutive segments, each one acquisition for
 * the robust average. Each keeps its start time so phases stay on one time axis.
 */
export function splitRecord(record: { input: Waveform; output: Waveform }, count: number): Array<{ input: Waveform; output: Waveform; startTimeS: number }> {
  const length = Math.floor(record.input.samplesV.length / count);
  return Array.from({ length: count }, (_, k) => ({
    input: { ...record.input, samplesV: record.input.samplesV.subarray(k * length, (k + 1) * length) },
    output: { ...record.output, samplesV: record.output.samplesV.subarray(k * length, (k + 1) * length) },
    startTimeS: k * length * record.input.sampleIntervalS,
  }));
}

/** Sine fits of every record, combined into one point with its flags and advice. */
function reduceRecords(records: Array<{ input: Waveform; output: Waveform; startTimeS: number }>, setting: StepSetting): StepResult {
  const responses: StageResponse[] = [];
  let worstDistortion = 0;
  let clipped = false;
  for (const record of records) {
    clipped ||= record.input.clipped || record.output.clipped;
    const { startTimeS } = record;
    const inputFit = sineFit3({ samplesV: record.input.samplesV, sampleIntervalS: record.input.sampleIntervalS, frequencyHz: setting.stimulus, startTimeS });
    const outputFit = sineFit3({ samplesV: record.output.samplesV, sampleIntervalS: record.output.sampleIntervalS, frequencyHz: setting.stimulus, startTimeS });
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
}

async function fetchBoth(scope: ScopeControl): Promise<{ input: Waveform; output: Waveform }> {
  const both = await scope.fetchBoth();
  return { input: both[1], output: both[2] };
}

/** Rounds up to the 1-2-5 sequence of vertical scales scopes offer (common practice, no source). */
export function niceScale(voltsPerDiv: number): number {
  if (!(voltsPerDiv > 0) || !Number.isFinite(voltsPerDiv)) return 1;
  const decade = 10 ** Math.floor(Math.log10(voltsPerDiv));
  for (const step of [1, 2, 5, 10]) if (step * decade >= voltsPerDiv * (1 - 1e-9)) return step * decade;
  return 10 * decade;
}
