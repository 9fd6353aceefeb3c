/**
 * DC transfer step (the log stage): set a DC level, settle, read the output's
 * DC volts `averages` times.
 */
import type { BenchClock } from '../../bench/clock';
import type { Reading } from '../../scpi/reading';
import { averageWithOutlierRejection } from '../../signal';
import { AppliedStimulus, apertureChanged } from './applied-stimulus';
import { splitReadings } from './reading-flags';
import type { StepMeasurer, StepResult, StepSetting, SweepInstruments } from './types';

export function dcMeasurer(options: { clock: BenchClock }): StepMeasurer {
  const stimulus = new AppliedStimulus(options.clock);
  let lastIntegrationS = NaN;
  return {
    async prepare(instruments: SweepInstruments) {
      if (!instruments.meter) throw new Error('a DC transfer sweep needs a meter');
      stimulus.reset();
      lastIntegrationS = NaN;
      await instruments.meter.setRange('auto');
    },

    apply: (instruments, setting) => stimulus.apply(instruments, setting, 'dc'),

    async acquire(instruments: SweepInstruments, setting: StepSetting, acquiring: () => void) {
      const meter = instruments.meter!;
      await stimulus.ensureWhile(instruments, setting, 'dc', async () => {
        if (!apertureChanged(lastIntegrationS, setting.integrateS)) return;
        lastIntegrationS = NaN;
        await meter.setIntegration(setting.integrateS);
        lastIntegrationS = setting.integrateS;
      });
      await stimulus.settled(setting.settleS);
      const readings: Reading[] = [];
      for (let k = 0; k < setting.averages; k++) {
        const reading = meter.readDcV();
        if (k === 0) acquiring();
        readings.push(await reading);
      }
      return async () => reduceDcReadings(readings, setting.stimulus);
    },
  };
}

function reduceDcReadings(readings: Reading[], inputV: number): StepResult {
  const { okValues: good, flags } = splitReadings(readings);
  const meanV = good.length > 0 ? averageWithOutlierRejection(good).mean : NaN;
  return { gainDb: NaN, gainUncertaintyDb: NaN, phaseDeg: NaN, phaseUncertaintyDeg: NaN, outputV: meanV, inputReading: inputV, outputReading: meanV, flags };
}
