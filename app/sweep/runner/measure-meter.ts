/**
 * Meter-only AC measurement: the output's AC RMS against the nominal stimulus,
 * corrected by the bench's through-calibration (the same sweep with the stage
 * bypassed, so the generator's real output and the meter's frequency response
 * cancel). No phase: a meter cannot see it.
 */
import type { BenchClock } from '../../bench/clock';
import type { MeterControl } from '../../bench/roles';
import type { Reading } from '../../scpi/reading';
import { dbFromRatio } from '../../units';
import { averageWithOutlierRejection } from '../../signal';
import { AppliedStimulus, apertureChanged } from './applied-stimulus';
import { splitReadings } from './reading-flags';
import type { StepMeasurer, StepResult, StepSetting, SweepInstruments } from './types';

/** Through-calibration: gain of the bypassed path per frequency (dB). */
export interface ThroughCalibration {
  frequencyHz: number[];
  gainDb: number[];
}

export interface MeterMeasurerOptions {
  clock: BenchClock;
  /** Applied when present; a through-calibration run itself has none. */
  calibration?: ThroughCalibration;
}

/** dB per relative unit of a voltage ratio: d(20·log10 x)/dx · x = 20/ln 10. */
const DB_PER_RELATIVE_UNIT = 20 / Math.LN10;

export function meterMeasurer(options: MeterMeasurerOptions): StepMeasurer {
  const stimulus = new AppliedStimulus(options.clock);
  let lastIntegrationS = NaN;
  /** The step's aperture; the bookkeeping follows only once the meter has taken it. */
  const setUp = async (meter: MeterControl, setting: StepSetting) => {
    if (!apertureChanged(lastIntegrationS, setting.integrateS)) return;
    lastIntegrationS = NaN;
    await meter.setIntegration(setting.integrateS);
    lastIntegrationS = setting.integrateS;
  };
  return {
    async prepare(instruments: SweepInstruments) {
      if (!instruments.meter) throw new Error('meter measurement needs a meter');
      stimulus.reset();
      lastIntegrationS = NaN;
      await instruments.meter.setRange('auto');
    },

    apply: (instruments, setting) => stimulus.apply(instruments, setting, 'sine'),

    async acquire(instruments: SweepInstruments, setting: StepSetting, acquiring: () => void) {
      const meter = instruments.meter!;
      // The set-up is usually done already, right after the previous step's readings (see below).
      await stimulus.ensureWhile(instruments, setting, 'sine', () => setUp(meter, setting));
      await stimulus.settled(setting.settleS);
      const readings: Reading[] = [];
      // Each reading integrates over the aperture set above (READ? returns when it is done).
      for (let k = 0; k < setting.averages; k++) {
        const reading = meter.readAcRmsV();
        if (k === 0) acquiring();
        readings.push(await reading);
      }
      return async (next?: StepSetting) => {
        // The meter is free: the next step's aperture goes out while the generator moves on and the circuit
        // settles. A refused setting is left for the next step's own set-up to report.
        if (next) await setUp(meter, next).catch(() => undefined);
        return reduceRmsReadings(readings, setting, options.calibration);
      };
    },
  };
}

/** Turns RMS readings into a gain point; overrange/NaN readings flag the point instead of entering the mean. */
export function reduceRmsReadings(readings: Reading[], setting: StepSetting, calibration?: ThroughCalibration): StepResult {
  const { okValues: good, flags } = splitReadings(readings);
  const nominalInputRmsV = setting.amplitudeVpp / (2 * Math.SQRT2); // sine: Vrms = Vpp/(2√2) (handbook)
  if (good.length === 0) {
    return { gainDb: NaN, gainUncertaintyDb: NaN, phaseDeg: NaN, phaseUncertaintyDeg: NaN, outputV: NaN, inputReading: nominalInputRmsV, outputReading: NaN, flags };
  }
  // Outliers (a reading caught mid-transient, a glitch) are rejected by modified z-score (app/signal).
  const robust = averageWithOutlierRejection(good);
  const meanV = robust.mean;
  const correctionDb = calibration ? interpolateLogF(calibration.frequencyHz, calibration.gainDb, setting.stimulus) : 0;
  return {
    gainDb: dbFromRatio(meanV / nominalInputRmsV) - correctionDb,
    gainUncertaintyDb: (DB_PER_RELATIVE_UNIT * robust.standardError) / meanV,
    phaseDeg: NaN,
    phaseUncertaintyDeg: NaN,
    outputV: meanV,
    inputReading: nominalInputRmsV,
    outputReading: meanV,
    flags,
  };
}

/** Calibration value at f, linear in log f between neighbours, held flat beyond the ends. */
export function interpolateLogF(frequencyHz: number[], valuesDb: number[], atHz: number): number {
  const n = frequencyHz.length;
  if (n === 0) return 0;
  if (atHz <= frequencyHz[0]) return valuesDb[0];
  if (atHz >= frequencyHz[n - 1]) return valuesDb[n - 1];
  let i = 1;
  while (frequencyHz[i] < atHz) i++;
  const t = Math.log(atHz / frequencyHz[i - 1]) / Math.log(frequencyHz[i] / frequencyHz[i - 1]);
  return valuesDb[i - 1] + t * (valuesDb[i] - valuesDb[i - 1]);
}

