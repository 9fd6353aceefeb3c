/** ScopeControl over a profile. */
import { ValidationError } from '../errors';
import { ScpiMalformedReplyError, ScpiTimeoutError } from '../scpi/errors';
import { parseNumberList, parseReading, type Reading } from '../scpi/reading';
import type { ResponseUnit } from '../scpi/reply-framer';
import type { ScpiSession } from '../scpi/session';
import { OperationRunner } from './operation';
import type { PollCondition, ScopeProfile } from './profile';
import type { ScopeChannel, ScopeControl, Waveform } from './roles';
import { BYTES_PER_SAMPLE, decodeAsciiWaveform, decodeBinaryWaveform, describeBytes, scalingFrom, type DecodedWaveform, type WaveformScaling } from './waveform-decode';

export class ProfileScope implements ScopeControl {
  readonly divisions: number;
  readonly verticalDivisions: number;
  private readonly runner: OperationRunner;
  private secondsPerRecord = 0;
  /**
   * Scaling per channel, kept until a setting changes: it depends only on
   * settings this control makes, and refetching it costs a round trip per
   * channel per point. Data whose length disagrees refetches it.
   */
  private scalings = new Map<ScopeChannel, WaveformScaling>();
  measureAmplitudeVpp?: (channel: ScopeChannel) => Promise<Reading>;
  measurePhaseDeg?: () => Promise<Reading>;
  setRecordPoints?: (points: number) => Promise<void>;

  constructor(
    private readonly session: ScpiSession,
    private readonly profile: ScopeProfile,
  ) {
    this.runner = new OperationRunner(session, profile);
    this.divisions = profile.scope.divisions;
    this.verticalDivisions = profile.scope.verticalDivisions;
    // Optional measurements exist only when the profile has them, so callers can feature-test.
    if (this.runner.has('measureAmplitudeVpp')) {
      this.measureAmplitudeVpp = async (channel) => parseReading(await this.runner.queryText('measureAmplitudeVpp', { channel: checkChannel(channel) }), this.runner.describe('measureAmplitudeVpp', { channel }));
    }
    if (this.runner.has('recordPoints')) {
      this.setRecordPoints = async (points) => {
        if (!(Number.isInteger(points) && points > 0)) throw new ValidationError('record points', `${points} is not a whole number of samples`);
        await this.runner.set('recordPoints', { points });
        this.scalings.clear();
        await this.runner.flush();
      };
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
      this.scalings.clear();
      await this.sendVerticalScale(channel, voltsPerDiv[channel]);
    }
    await this.runner.flush();
  }

  async setTimebase(secondsPerRecord: number): Promise<void> {
    if (!(secondsPerRecord > 0) || !Number.isFinite(secondsPerRecord)) throw new ValidationError('secondsPerRecord', `${secondsPerRecord} is not a positive number of seconds`);
    await this.runner.set('timebase', { secondsPerRecord, secondsPerDiv: secondsPerRecord / this.divisions });
    this.scalings.clear();
    this.secondsPerRecord = secondsPerRecord;
    await this.runner.flush();
  }

  private async sendVerticalScale(channel: ScopeChannel, voltsPerDiv: number): Promise<void> {
    if (!(voltsPerDiv > 0) || !Number.isFinite(voltsPerDiv)) throw new ValidationError('voltsPerDiv', `${voltsPerDiv} is not a positive number`);
    const rangeVpp = voltsPerDiv * this.profile.scope.verticalDivisions;
    await this.runner.set('verticalScale', { channel: checkChannel(channel), voltsPerDiv, rangeVpp, rangeV: rangeVpp / 2 });
    this.scalings.clear();
  }

  async acquire(): Promise<void> {
    // The acquisition lasts one record; allow for it on top of the link's own timeout.
    const timeoutS = this.profile.timeoutS + this.secondsPerRecord;
    const complete = this.profile.scope.acquisitionComplete;
    if (complete.method === 'opc') {
      // *OPC? in the same message as the start: one write, answered when the record is complete (IEEE 488.2 §10.19, recalled).
      const reply = await this.runner.setThenQuery('acquire', '*OPC?', {}, timeoutS);
      if (reply.trim() === '') throw new ValidationError('acquire', 'the scope returned an empty reply to *OPC?');
      return;
    }
    await this.runner.set('acquire');
    await this.runner.flush();
    const deadlineMs = performance.now() + timeoutS * 1000;
    for (;;) {
      const reply = await this.session.query(complete.query, { timeoutS: this.profile.timeoutS });
      const [value] = parseNumberList(reply, complete.query);
      if (pollConditionMet(value, complete.until)) return;
      if (performance.now() > deadlineMs) throw new ScpiTimeoutError(`${complete.query} (waiting for ${describeCondition(complete.until)})`, timeoutS, this.session.link);
      await new Promise((resolve) => setTimeout(resolve, complete.intervalS * 1000));
    }
  }

  async fetchWaveform(channel: ScopeChannel): Promise<Waveform> {
    checkChannel(channel);
    const command = this.runner.describe('waveformData', { channel });
    const dataUnit: ResponseUnit =
      this.profile.scope.data.format === 'binary'
        ? { kind: 'block', bytes: await this.runner.queryBlock('waveformData', { channel }) }
        : { kind: 'text', text: await this.runner.queryText('waveformData', { channel }) };
    let scaling = this.scalings.get(channel) ?? (await this.fetchScaling(channel));
    // A cached scaling whose point count disagrees with the data belongs to settings since changed.
    if (scaling.points !== undefined && scaling.points !== this.sampleCount(dataUnit)) scaling = await this.fetchScaling(channel);
    return { channel, sampleIntervalS: scaling.sampleIntervalS, ...this.decode(dataUnit, scaling, command) };
  }

  async fetchBoth(): Promise<{ 1: Waveform; 2: Waveform }> {
    if (!this.runner.has('waveformBoth')) return { 1: await this.fetchWaveform(1), 2: await this.fetchWaveform(2) };
    const command = this.runner.describe('waveformBoth');
    const units = await this.runner.queryUnits('waveformBoth');
    const withScaling = this.profile.scope.scaling.fields.length > 0;
    const dataKind = this.profile.scope.data.format === 'binary' ? 'block' : 'text';
    const perChannel = withScaling ? ['text', dataKind] : [dataKind];
    const expected = [...perChannel, ...perChannel].join(';');
    const layout = units.map((u) => u.kind).join(';');
    if (layout !== expected) {
      const description = withScaling ? 'channel 1 scaling; channel 1 data; channel 2 scaling; channel 2 data' : 'channel 1 data; channel 2 data';
      throw new ScpiMalformedReplyError(command, `<${layout || 'nothing'}>`, `${expected} (${description})`);
    }
    const waveform = (channel: ScopeChannel, scalingUnit: ResponseUnit | undefined, data: ResponseUnit): Waveform => {
      // Read with the data, the scaling is always that of this record.
      const scaling = scalingFrom(this.profile.scope.scaling, scalingUnit?.kind === 'text' ? scalingUnit.text : undefined, command);
      this.scalings.set(channel, scaling);
      return { channel, sampleIntervalS: scaling.sampleIntervalS, ...this.decode(data, scaling, command) };
    };
    const step = perChannel.length;
    const scalingAt = (i: number) => (withScaling ? units[i] : undefined);
    return { 1: waveform(1, scalingAt(0), units[step - 1]), 2: waveform(2, scalingAt(step), units[2 * step - 1]) };
  }

  private sampleCount(unit: ResponseUnit): number | undefined {
    const data = this.profile.scope.data;
    if (unit.kind === 'block') return data.format === 'binary' ? unit.bytes.length / BYTES_PER_SAMPLE[data.sample] : undefined;
    return unit.text.trim() === '' ? 0 : unit.text.split(',').length;
  }

  private decode(unit: ResponseUnit, scaling: WaveformScaling, command: string): DecodedWaveform {
    const data = this.profile.scope.data;
    if (data.format === 'binary') {
      if (unit.kind !== 'block') throw new ScpiMalformedReplyError(command, unit.text.slice(0, 200), 'a definite-length block (#<digits><length><bytes>)');
      return decodeBinaryWaveform(unit.bytes, data, scaling, command);
    }
    if (unit.kind !== 'text') throw new ScpiMalformedReplyError(command, describeBytes(unit.bytes), 'ASCII numbers separated by commas');
    return decodeAsciiWaveform(unit.text, scaling, command);
  }

  private async fetchScaling(channel: ScopeChannel): Promise<WaveformScaling> {
    const source = this.profile.scope.scaling;
    if (source.fields.length === 0) {
      const fixed = scalingFrom(source, undefined, 'scope.scaling.fixed');
      this.scalings.set(channel, fixed);
      return fixed;
    }
    const command = this.runner.describe('waveformScaling', { channel });
    const scaling = scalingFrom(source, await this.runner.queryText('waveformScaling', { channel }), command);
    this.scalings.set(channel, scaling);
    return scaling;
  }
}

export function pollConditionMet(value: number, until: PollCondition): boolean {
  if ('equals' in until) return value === until.equals;
  if ('bitsClear' in until) return (value & until.bitsClear) === 0;
  return (value & until.bitsSet) === until.bitsSet;
}

function describeCondition(until: PollCondition): string {
  if ('equals' in until) return `the value ${until.equals}`;
  if ('bitsClear' in until) return `bits ${until.bitsClear} clear`;
  return `bits ${until.bitsSet} set`;
}

function checkChannel(channel: number): ScopeChannel {
  if (channel !== 1 && channel !== 2) throw new ValidationError('channel', `${channel} is not 1 or 2`);
  return channel;
}
