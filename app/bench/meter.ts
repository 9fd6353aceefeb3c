/** MeterControl over a profile. */
import { ValidationError } from '../errors';
import { parseReading, type Reading } from '../scpi/reading';
import type { ScpiSession } from '../scpi/session';
import { OperationRunner } from './operation';
import type { MeterProfile } from './profile';
import type { MeterControl } from './roles';

export class ProfileMeter implements MeterControl {
  private readonly runner: OperationRunner;
  /** Last integration time set, so a reading's timeout covers it. */
  private integrationS = 0;

  constructor(
    session: ScpiSession,
    private readonly profile: MeterProfile,
  ) {
    this.runner = new OperationRunner(session, profile);
  }

  readAcRmsV(): Promise<Reading> {
    return this.read('readAcRms');
  }

  readDcV(): Promise<Reading> {
    return this.read('readDc');
  }

  async setRange(rangeV: number | 'auto'): Promise<void> {
    if (rangeV === 'auto') {
      await this.runner.set('acRangeAuto');
      await this.runner.set('dcRangeAuto');
    } else {
      if (!(rangeV > 0) || !Number.isFinite(rangeV)) throw new ValidationError('rangeV', `${rangeV} is not a positive number of volts`);
      await this.runner.set('acRange', { rangeV });
      await this.runner.set('dcRange', { rangeV });
    }
    await this.runner.flush();
  }

  async setIntegration(integrationS: number): Promise<void> {
    if (!(integrationS > 0) || !Number.isFinite(integrationS)) throw new ValidationError('integrationS', `${integrationS} is not a positive number of seconds`);
    const powerLineCycles = integrationS * this.profile.meter.powerLineHz;
    await this.runner.set('integration', { integrationS, powerLineCycles });
    this.integrationS = integrationS;
    // Checked now, not at the next reading: a sweep sets the aperture while the circuit settles.
    await this.runner.flush();
  }

  private async read(operation: 'readAcRms' | 'readDc'): Promise<Reading> {
    // The reading takes the integration time on top of the link's own delay.
    const timeoutS = this.profile.timeoutS + this.integrationS;
    const reply = await this.runner.queryText(operation, {}, timeoutS);
    return parseReading(reply, this.runner.describe(operation));
  }
}
