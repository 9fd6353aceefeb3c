/**
 * The profile checker: connects to an instrument and sends each operation of
 * a profile once, in a harmless order, and reports per operation whether the
 * instrument accepted it, refused it (its SCPI error code and message), did
 * not answer in time, or answered in a form the profile does not expect (with
 * the bytes received), and how long the exchange took.
 *
 * A generator is driven only through ProfileGenerator, the one place the
 * user's maximum stimulus is enforced: output off first, the smallest
 * amplitude the profile allows (never above the user's maximum), and the
 * output switched off again on every way out.
 */
import type { InstrumentIdentity, InstrumentRole, OperationCheck, ProfileCheckReport } from '../contract/contract';
import { ScpiInstrumentError, ScpiMalformedReplyError, ScpiTimeoutError } from '../scpi/errors';
import { parseReading } from '../scpi/reading';
import type { ScpiSession } from '../scpi/session';
import type { InstrumentAddress } from '../scpi/address';
import { ValidationError } from '../errors';
import { ProfileGenerator } from './generator';
import { openProfileSession, type OpenInstrumentOptions } from './open-instrument';
import { programMessage, writeByPolicy } from './operation';
import type { GeneratorProfile, MeterProfile, Profile, ScopeProfile } from './profile';
import { ProfileScope } from './scope';
import { fillTemplate } from './template';
import { decodeAsciiWaveform, decodeBinaryWaveform, scalingFrom, type WaveformScaling } from './waveform-decode';

export interface ProfileCheckOptions extends Pick<OpenInstrumentOptions, 'traffic' | 'transport'> {
  /** The user's maximum stimulus, Vpp; needed for a generator. */
  maxStimulusVpp?: number;
  /** Seconds to wait for each reply, instead of the profile's: a refused query gets none, so this is what it costs. */
  timeoutS?: number;
}

/** Placeholder values for a check: small and ordinary (1 kHz, 1 V/div, a 10 ms record of 2000 samples, 20 ms aperture). */
const CHECK_VALUES: Record<string, number> = { channel: 1, voltsPerDiv: 1, rangeVpp: 10, rangeV: 5, secondsPerRecord: 0.01, secondsPerDiv: 0.001, points: 2000, integrationS: 0.02, powerLineCycles: 1 };
const CHECK_FREQUENCY_HZ = 1000;

export async function checkProfile(address: string | InstrumentAddress, asLoaded: Profile, options: ProfileCheckOptions = {}): Promise<ProfileCheckReport> {
  const profile: Profile = options.timeoutS ? { ...asLoaded, timeoutS: options.timeoutS } : asLoaded;
  if (profile.role === 'generator' && !(options.maxStimulusVpp! > 0)) {
    throw new ValidationError('maxStimulusVpp', 'is required to check a generator profile', 'Set the maximum stimulus (Bench view, or --max-stimulus VPP).');
  }
  const { session, addressText } = await openProfileSession(address, profile.timeoutS, options);
  const checks: OperationCheck[] = [];
  let identity: InstrumentIdentity | undefined;
  try {
    identity = await session.identify();
    await session.clearStatus();
    const probe = new Probe(session, profile, checks);
    for (const [i, command] of profile.init.entries()) await probe.setting(`init[${i}]`, [command]);
    if (profile.role === 'generator') await checkGenerator(session, profile, options.maxStimulusVpp!, probe);
    else if (profile.role === 'meter') await checkMeter(session, profile, probe);
    else await checkScope(session, profile, probe);
  } finally {
    await session.close().catch(() => undefined);
  }
  return { address: addressText, profileId: profile.id, role: profile.role as InstrumentRole, identity: identity!, checks };
}

/** One exchange per operation, timed, with the error queue read after it. */
class Probe {
  constructor(
    private readonly session: ScpiSession,
    private readonly profile: Profile,
    private readonly checks: OperationCheck[],
  ) {}

  /** Settings: sent by the profile's program-message policy, then the error queue is read. */
  setting(operation: string, commands: string[]): Promise<void> {
    return this.run(operation, commands, async () => {
      await writeByPolicy(this.session, this.profile, commands, false);
      return undefined;
    });
  }

  /** A query operation's text to send after its leading commands went out by the policy. */
  async query(commands: string[]): Promise<string> {
    return (await writeByPolicy(this.session, this.profile, commands, true))!;
  }

  /** A query: `read` sends it and parses the reply as the profile expects, returning a short summary. */
  async run(operation: string, commands: string[], read: () => Promise<string | undefined>): Promise<void> {
    const startedMs = performance.now();
    const text = commands.join('; ');
    const took = () => Math.round((performance.now() - startedMs) * 10) / 10;
    try {
      const summary = await read();
      const replyMs = took();
      const [first] = await this.session.drainErrors();
      this.checks.push(first ? { operation, commands: text, outcome: 'refused', errorCode: first.code, errorMessage: first.message, replyMs } : { operation, commands: text, outcome: 'accepted', replyMs, received: summary });
    } catch (error) {
      const replyMs = took();
      this.checks.push(await this.failure(operation, text, error, replyMs));
    }
  }

  /** A failure in a control method (generator), attributed to the operation it names. */
  async failure(operation: string, commands: string, error: unknown, replyMs: number): Promise<OperationCheck> {
    if (error instanceof ScpiInstrumentError) return { operation, commands, outcome: 'refused', errorCode: error.code, errorMessage: error.instrumentMessage, replyMs };
    if (error instanceof ScpiMalformedReplyError) return { operation, commands, outcome: 'unparsed', received: error.reply, detail: error.message, replyMs };
    if (error instanceof ScpiTimeoutError) {
      // A query the instrument did not understand gets no reply; its error queue says why.
      const [first] = await this.session.drainErrors().catch(() => []);
      if (first) return { operation, commands, outcome: 'refused', errorCode: first.code, errorMessage: first.message, replyMs };
      return { operation, commands, outcome: 'timed-out', detail: `no reply within ${error.timeoutS} s`, replyMs };
    }
    throw error;
  }

  record(check: OperationCheck): void {
    this.checks.push(check);
  }
}

function filled(profile: Profile, operation: string, values: Record<string, number> = CHECK_VALUES): string[] {
  return profile.operations[operation].map((template) => fillTemplate(template, values));
}

async function checkMeter(session: ScpiSession, profile: MeterProfile, probe: Probe): Promise<void> {
  const values = { ...CHECK_VALUES, rangeV: 10 };
  for (const name of ['dcRangeAuto', 'acRangeAuto', 'dcRange', 'acRange', 'integration']) await probe.setting(name, filled(profile, name, values));
  for (const name of ['readDc', 'readAcRms']) {
    const commands = filled(profile, name);
    await probe.run(name, commands, async () => {
      const reply = await session.query(await probe.query(commands), { timeoutS: profile.timeoutS + CHECK_VALUES.integrationS });
      const reading = parseReading(reply, commands.join('; '));
      return reading.flag === 'ok' ? reply.trim() : `${reply.trim()} (${reading.flag})`;
    });
  }
}

async function checkScope(session: ScpiSession, profile: ScopeProfile, probe: Probe): Promise<void> {
  for (const channel of [1, 2]) await probe.setting(`channelOn (channel ${channel})`, filled(profile, 'channelOn', { ...CHECK_VALUES, channel }));
  for (const channel of [1, 2]) await probe.setting(`verticalScale (channel ${channel})`, filled(profile, 'verticalScale', { ...CHECK_VALUES, channel }));
  await probe.setting('timebase', filled(profile, 'timebase'));
  if (profile.operations.recordPoints) await probe.setting('recordPoints', filled(profile, 'recordPoints'));
  // The acquisition as a sweep runs it (start plus *OPC? or the status poll).
  const control = new ProfileScope(session, profile);
  await control.setTimebase(CHECK_VALUES.secondsPerRecord).catch(() => undefined);
  const completion = profile.scope.acquisitionComplete.method === 'opc' ? ['*OPC?'] : [`${profile.scope.acquisitionComplete.query} (poll)`];
  await probe.run('acquire', [...filled(profile, 'acquire'), ...completion], async () => {
    await control.acquire();
    return 'complete';
  });
  const scalings = new Map<number, WaveformScaling>();
  for (const channel of [1, 2]) {
    const values = { ...CHECK_VALUES, channel };
    if (profile.operations.waveformScaling) {
      const commands = filled(profile, 'waveformScaling', values);
      await probe.run(`waveformScaling (channel ${channel})`, commands, async () => {
        const reply = await session.query(await probe.query(commands));
        scalings.set(channel, scalingFrom(profile.scope.scaling, reply, commands.join('; ')));
        return reply.trim();
      });
    }
    const commands = filled(profile, 'waveformData', values);
    await probe.run(`waveformData (channel ${channel})`, commands, async () => {
      // Without a scaling (it was refused), the data is still checked for its form, not its length.
      const scaling = scalings.get(channel) ?? { ...safeFixedScaling(profile), points: undefined };
      const data = profile.scope.data;
      const decoded =
        data.format === 'binary'
          ? decodeBinaryWaveform(await session.queryBlock(await probe.query(commands)), data, scaling, commands.join('; '))
          : decodeAsciiWaveform(await session.query(await probe.query(commands)), scaling, commands.join('; '));
      return `${decoded.samplesV.length} samples`;
    });
  }
  if (profile.operations.waveformBoth) {
    await probe.run('waveformBoth', filled(profile, 'waveformBoth'), async () => {
      const both = await control.fetchBoth();
      return `${both[1].samplesV.length} + ${both[2].samplesV.length} samples`;
    });
  }
  for (const channel of [1, 2]) {
    if (!profile.operations.measureAmplitudeVpp) break;
    const commands = filled(profile, 'measureAmplitudeVpp', { ...CHECK_VALUES, channel });
    await probe.run(`measureAmplitudeVpp (channel ${channel})`, commands, async () => {
      const reply = await session.query(await probe.query(commands));
      parseReading(reply, commands.join('; '));
      return reply.trim();
    });
  }
  if (profile.operations.measurePhaseDeg) {
    const commands = filled(profile, 'measurePhaseDeg');
    await probe.run('measurePhaseDeg', commands, async () => {
      const reply = await session.query(await probe.query(commands));
      parseReading(reply, commands.join('; '));
      return reply.trim();
    });
  }
}

/** The fixed part of a profile's scaling, with a stand-in interval when that comes from the (refused) query. */
function safeFixedScaling(profile: ScopeProfile): WaveformScaling {
  return scalingFrom({ fields: [], fixed: { sampleIntervalS: 1, ...profile.scope.scaling.fixed } }, undefined, 'scope.scaling.fixed');
}

/**
 * The generator, in a harmless order, through its control: output off; load
 * high-Z; sine at 1 kHz and the smallest amplitude, no offset; read the
 * frequency back; DC at 0 V and back to sine; the output on at that smallest
 * amplitude and off again, and (with readOutput) its state read back off; the
 * 50 Ω load setting with the output off. Each
 * step's failure is the operation it names; what an earlier refusal kept from
 * being sent is reported as not checked.
 */
async function checkGenerator(session: ScpiSession, profile: GeneratorProfile, maxStimulusVpp: number, probe: Probe): Promise<void> {
  const generator = new ProfileGenerator(session, profile, { maxStimulusVpp });
  const limits = profile.generator.limits;
  const smallestVpp = limits.minAmplitudeVpp > 0 ? limits.minAmplitudeVpp : Math.min(0.01, maxStimulusVpp / 2);
  const frequencyHz = Math.min(limits.maxFrequencyHz, Math.max(limits.minFrequencyHz, CHECK_FREQUENCY_HZ));
  const calibrated = profile.generator.load === 'calibrated';
  const sineValues = { frequencyHz, amplitude: smallestVpp, offsetV: 0 };

  /** Runs one control step; `operations` are the profile operations it sends, in order. */
  const step = async (operations: string[], action: () => Promise<void>): Promise<void> => {
    const startedMs = performance.now();
    try {
      await action();
      const replyMs = Math.round((performance.now() - startedMs) * 10) / 10;
      for (const operation of operations) probe.record({ operation, commands: filled(profile, operation, { ...CHECK_VALUES, ...sineValues }).join('; '), outcome: 'accepted', replyMs });
    } catch (error) {
      const replyMs = Math.round((performance.now() - startedMs) * 10) / 10;
      if (!(error instanceof ScpiInstrumentError || error instanceof ScpiTimeoutError || error instanceof ScpiMalformedReplyError)) {
        for (const operation of operations) probe.record({ operation, commands: '', outcome: 'not-checked', detail: (error as Error).message, replyMs });
        return;
      }
      const failedCommand = error.command;
      const texts = operations.map((operation) => filled(profile, operation, { ...CHECK_VALUES, ...sineValues }).join('; '));
      const failedAt = Math.max(0, texts.findIndex((text) => failedCommand.includes(text)));
      for (const [i, operation] of operations.entries()) {
        if (i < failedAt) probe.record({ operation, commands: texts[i], outcome: 'accepted', replyMs });
        else if (i === failedAt) probe.record(await probe.failure(operation, texts[i], error, replyMs));
        else probe.record({ operation, commands: texts[i], outcome: 'not-checked', detail: `not sent: ${operations[failedAt]} was not accepted`, replyMs: 0 });
      }
    }
  };

  try {
    await step(['outputOff'], () => generator.setOutput(false));
    if (calibrated) await step(['loadHighZ'], () => generator.setLoad('high-z'));
    if (smallestVpp > maxStimulusVpp) {
      for (const operation of ['sineFunction', 'frequency', 'amplitude', 'offset', 'outputOn']) {
        probe.record({ operation, commands: '', outcome: 'not-checked', detail: `the profile's smallest amplitude ${smallestVpp} Vpp is above your maximum of ${maxStimulusVpp} Vpp`, replyMs: 0 });
      }
    } else {
      await step(['sineFunction', 'frequency', 'amplitude', 'offset'], () => generator.configureSine({ frequencyHz, amplitudeVpp: smallestVpp, offsetV: 0 }));
      await probe.run('readFrequency', filled(profile, 'readFrequency'), async () => {
        const reading = await generator.readFrequencyHz();
        return `${reading.value} Hz`;
      });
      await step(['dcFunction'], () => generator.configureDc(0));
      await step(['sineFunction'], () => generator.configureSine({ frequencyHz, amplitudeVpp: smallestVpp, offsetV: 0 }));
      await step(['outputOn'], async () => {
        await generator.setOutput(true);
        await generator.setOutput(false);
      });
      if (profile.operations.readOutput) {
        await probe.run('readOutput', filled(profile, 'readOutput'), async () => {
          // Read with the output just switched off: the quiet state a noise run relies on.
          const check = await generator.holdOff();
          return check === 'read back' ? 'off' : undefined;
        });
      }
    }
    if (calibrated) {
      await step(['load50Ohm'], async () => {
        await generator.setOutput(false);
        await generator.setLoad('50-ohm');
      });
      await generator.setLoad('high-z').catch(() => undefined);
    }
  } finally {
    // Never left on, whatever happened above.
    await generator.setOutput(false).catch(() => writeByPolicy(session, profile, filled(profile, 'outputOff'), false).catch(() => undefined));
  }
}
