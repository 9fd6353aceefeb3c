/** ScopeControl over a profile. */
import { ValidationError } from '../errors';
import { parseReading, type Reading } from '../scpi/reading';
import type { ScpiSession } from '../scpi/session';
import { OperationRunner } from './operation';
import type { ScopeProfile } from './profile';
import type { ScopeChannel, ScopeControl, Waveform } from './roles';
import { decodeWaveform, parsePreamble } from './waveform-decode';

export class ProfileScope implements ScopeControl {
  readonly divisions: number;
  private readonly runner: OperationRunner;
  private secondsPerRecord = 0;
  measureAmplitudeVpp?: (channel: ScopeChannel) => Promise<Reading>;
  measurePhaseDeg?: () => Promise<Reading>;

  constructor(
    session: ScpiSession,
    private readonly profile: ScopeProfile,
  ) {
    this.runner = new OperationRunner(session, profile);
    this.divisions = profile.scope.divisions;
    // Optional measurements exist only when the profile has them, so callers can feature-test.
    if (this.runner.has('measureAmplitudeVpp')) {
      this.measureAmplitudeVpp = async (channel) => parseReading(await this.runner.queryText('measureAmplitudeVpp', { channel: checkChannel(channel) }), this.runner.describe('measureAmplitudeVpp', { channel }));
    }
    if (this.runner.has('measurePhaseDeg')) {
      this.measurePhaseDeg = async () => parseReading(await this.runner.queryText('measurePhaseDeg'), this.runner.describe('measurePhaseDeg'));
    }
  }

  async setVerticalScale(channel: ScopeChannel, voltsPerDiv: number): Promise<void> {
    if (!(voltsPerDiv > 0) || !Number.isFinite(voltsPerDiv)) throw new ValidationError('voltsPerDiv', `${voltsPerDiv} is not a positive number`);
    await this.runner.set('verticalScale', { channel: checkChannel(channel), voltsPerDiv });
  }

  async setupChannels(voltsPerDiv: { 1: number; 2: number }): Promise<void> {
    for (const channel of [1, 2] as const) {
      await this.runner.set('channelOn', { channel });
      await this.setVerticalScale(channel, voltsPerDiv[channel]);
    }
  }

  async setTimebase(secondsPerRecord: number): Promise<void> {
    if (!(secondsPerRecord > 0) || !Number.isFinite(secondsPerRecord)) throw new ValidationError('secondsPerRecord', `${secondsPerRecord} is not a positive number of seconds`);
    await this.runner.set('timebase', { secondsPerRecord, secondsPerDiv: secondsPerRecord / this.divisions });
    this.secondsPerRecord = secondsPerRecord;
  }

  async acquire(): Promise<void> {
    // The acquisition lasts one record; allow for it on top of the link's own timeout.
    const reply = await this.runner.queryText('acquire', {}, this.profile.timeoutS + this.secondsPerRecord);
    if (reply.trim() === '') throw new ValidationError('acquire', 'the scope returned an empty reply');
  }

  async fetchWaveform(channel: ScopeChannel): Promise<Waveform> {
    checkChannel(channel);
    const preambleCommand = this.runner.describe('waveformPreamble', { channel });
    const scaling = parsePreamble(await this.runner.queryText('waveformPreamble', { channel }), this.profile.scope.preambleFields, preambleCommand);
    const bytes = await this.runner.queryBlock('waveformData', { channel });
    const { samplesV, clipped } = decodeWaveform(bytes, this.profile.scope.encoding, scaling, this.runner.describe('waveformData', { channel }));
    return { channel, sampleIntervalS: scaling.sampleIntervalS, samplesV, clipped };
  }
}

function checkChannel(channel: number): ScopeChannel {
  if (channel !== 1 && channel !== 2) throw new ValidationError('channel', `${channel} is not 1 or 2`);
  return channel;
}
