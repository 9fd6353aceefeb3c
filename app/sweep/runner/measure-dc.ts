/**
 * DC transfer step (the log stage): set a DC level, settle, read the output's
 * DC volts `averages` times.
 */
import type { BenchClock } from '../../bench/clock';
import type { Reading } from '../../scpi/reading';
import { PointFlag } from '../../service/contract';
import { averageWithOutlierRejection } from '../../signal';
import { waitUntilSettled } from './timing';
import type { StepMeasurer, StepResult, StepSetting, SweepInstruments } from './types';

export function dcMeasurer(options: { clock: BenchClock }): StepMeasurer {
  const { clock } = options;
  let outputOn = false;
  let lastIntegrationS = NaN;
  return {
    async prepare(instruments: SweepInstruments) {
      if (!instruments.meter) throw new Error('a DC transfer sweep needs a meter');
      outputOn = false;
      lastIntegrationS = NaN;
      await instruments.meter.setRange('auto');
    },

    async measure(instruments: SweepInstruments, setting: StepSetting): Promise<StepResult> {
      const meter = instruments.meter!;
      await instruments.generator.configureDc(setting.stimulus);
      if (!outputOn) {
        await instruments.generator.setOutput(true);
        outputOn = true;
      }
      const changedAtS = clock.nowS();
      if (setting.integrateS !== lastIntegrationS) {
        await meter.setIntegration(setting.integrateS);
        lastIntegrationS = setting.integrateS;
      }
      await waitUntilSettled(clock, changedAtS, setting.settleS);
      const readings: Reading[] = [];
      for (let k = 0; k < setting.averages; k++) {
        // The reading itself integrates over the aperture set above (READ? returns when it is done).
        readings.push(await meter.readDcV());
      }
      return reduceDcReadings(readings, setting.stimulus);
    },
  };
}

export function reduceDcReadings(readings: Reading[], inputV: number): StepResult {
  const good = readings.filter((r) => r.flag === 'ok').map((r) => r.value);
  let flags = 0;
  if (readings.some((r) => r.flag === 'overrange')) flags |= PointFlag.overrange;
  if (readings.some((r) => r.flag === 'nan')) flags |= PointFlag.notANumber;
  const meanV = good.length > 0 ? averageWithOutlierRejection(good).mean : NaN;
  return { gainDb: NaN, gainUncertaintyDb: NaN, phaseDeg: NaN, phaseUncertaintyDeg: NaN, outputV: meanV, inputReading: inputV, outputReading: meanV, flags };
}
