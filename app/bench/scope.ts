/** ScopeControl over a profile. */
import { ValidationError } from '../errors';
import { ScpiMalformedReplyError } from '../scpi/errors';
import { parseReading, type Reading } from '../scpi/reading';
import type { ResponseUnit } from '../scpi/reply-framer';
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

  // Settings are checked (error queue) when the call ends, so a caller that sets up while the circuit
  // settles has the check's round trip behind it before it acquires.
  async setVerticalScale(channel: ScopeChannel, voltsPerDiv: number): Promise<void> {
    await this.sendVerticalScale(channel, voltsPerDiv);
    await this.runner.flush();
  }

  async setupChannels(voltsPerDiv: { 1: number; 2: number }): Promise<void> {
    for (const channel of [1, 2] as const) {
      await this.runner.set('channelOn', { channel });
      this.preambles.clear();
      await this.sendVerticalScale(channel, voltsPerDiv[channel]);
    }
    await this.runner.flush();
  }

  async setTimebase(secondsPerRecord: number): Promise<void> {
    if (!(secondsPerRecord > 0) || !Number.isFinite(secondsPerRecord)) throw new ValidationError('secondsPerRecord', `${secondsPerRecord} is not a positive number of seconds`);
    await this.runner.set('timebase', { secondsPerRecord, secondsPerDiv: secondsPerRecord / this.divisions });
    this.preambles.clear();
    this.secondsPerRecord = secondsPerRecord;
    await this.runner.flush();
  }

  private async sendVerticalScale(channel: ScopeChannel, voltsPerDiv: number): Promise<void> {
    if (!(voltsPerDiv > 0) || !Number.isFinite(voltsPerDiv)) throw new ValidationError('voltsPerDiv', `${voltsPerDiv} is not a positive number`);
    await this.runner.set('verticalScale', { channel: checkChannel(channel), voltsPerDiv });
    this.preambles.clear();
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

  async fetchBoth(): Promise<{ 1: Waveform; 2: Waveform }> {
    if (!this.runner.has('waveformBoth')) return { 1: await this.fetchWaveform(1), 2: await this.fetchWaveform(2) };
    const command = this.runner.describe('waveformBoth');
    const units = await this.runner.queryUnits('waveformBoth');
    const layout = units.map((u) => u.kind).join(';');
    if (layout !== 'text;block;text;block') {
      throw new ScpiMalformedReplyError(command, `<${layout || 'nothing'}>`, 'text;block;text;block (channel 1 preamble; channel 1 data; channel 2 preamble; channel 2 data)');
    }
    const waveform = (channel: ScopeChannel, preamble: ResponseUnit, data: ResponseUnit): Waveform => {
      // Read with the data, the preamble is always that of this record: nothing to cache.
      const scaling = parsePreamble(preamble.kind === 'text' ? preamble.text : '', this.profile.scope.preambleFields, command);
      this.preambles.set(channel, scaling);
      const { samplesV, clipped } = decodeWaveform(data.kind === 'block' ? data.bytes : new Uint8Array(0), this.profile.scope.encoding, scaling, command);
      return { channel, sampleIntervalS: scaling.sampleIntervalS, samplesV, clipped };
    };
    return { 1: waveform(1, units[0], units[1]), 2: waveform(2, units[2], units[3]) };
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
