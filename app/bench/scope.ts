/** ScopeControl over a profile. */
import { ValidationError } from '../errors';
import { parseReading, type Reading } from '../scpi/reading';
import type { ScpiSession } from '../scpi/session';
import { OperationRunner } from './operation';
import type { ScopeProfile } from './profile';
import type { ScopeChannel, ScopeControl, Waveform } from './roles';
import { BYTES_PER_SAMPLE, decodeWaveform, parsePreamble, type WaveformScaling } from './waveform-decode';

export class ProfileScope implements ScopeControl {
  readonly divisions: number;
  private readonly runner: OperationRunner;
  private secondsPerRecord = 0;
  /**
   * Preamble per channel, kept until a setting changes: it depends only on
   * settings this control makes, and refetching it costs a round trip per
   * channel per point. A block whose length disagrees refetches it.
   */
  private preambles = new Map<ScopeChannel, WaveformScaling>();
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
    this.preambles.clear();
  }

  async setupChannels(voltsPerDiv: { 1: number; 2: number }): Promise<void> {
    for (const channel of [1, 2] as const) {
      await this.runner.set('channelOn', { channel });
      this.preambles.clear();
      await this.setVerticalScale(channel, voltsPerDiv[channel]);
    }
  }

  async setTimebase(secondsPerRecord: number): Promise<void> {
    if (!(secondsPerRecord > 0) || !Number.isFinite(secondsPerRecord)) throw new ValidationError('secondsPerRecord', `${secondsPerRecord} is not a positive number of seconds`);
    await this.runner.set('timebase', { secondsPerRecord, secondsPerDiv: secondsPerRecord / this.divisions });
    this.preambles.clear();
    this.secondsPerRecord = secondsPerRecord;
  }

  async acquire(): Promise<void> {
    // The acquisition lasts one record; allow for it on top of the link's own timeout.
    const reply = await this.runner.queryText('acquire', {}, this.profile.timeoutS + this.secondsPerRecord);
    if (reply.trim() === '') throw new ValidationError('acquire', 'the scope returned an empty reply');
  }

  async fetchWaveform(channel: ScopeChannel): Promise<Waveform> {
    checkChannel(channel);
    const bytes = await this.runner.queryBlock('waveformData', { channel });
    const command = this.runner.describe('waveformData', { channel });
    let scaling = this.preambles.get(channel) ?? (await this.fetchPreamble(channel));
    const bytesPerPoint = scaling.points ? bytes.length / scaling.points : undefined;
    if (bytesPerPoint !== undefined && bytesPerPoint !== BYTES_PER_SAMPLE[this.profile.scope.encoding]) scaling = await this.fetchPreamble(channel);
    const { samplesV, clipped } = decodeWaveform(bytes, this.profile.scope.encoding, scaling, command);
    return { channel, sampleIntervalS: scaling.sampleIntervalS, samplesV, clipped };
  }

  private async fetchPreamble(channel: ScopeChannel): Promise<WaveformScaling> {
    const command = this.runner.describe('waveformPreamble', { channel });
    const scaling = parsePreamble(await this.runner.queryText('waveformPreamble', { channel }), this.profile.scope.preambleFields, command);
    this.preambles.set(channel, scaling);
    return scaling;
  }
}

function checkChannel(channel: number): ScopeChannel {
  if (channel !== 1 && channel !== 2) throw new ValidationError('channel', `${channel} is not 1 or 2`);
  return channel;
}
