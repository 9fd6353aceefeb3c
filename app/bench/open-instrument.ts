/**
 * Connects one instrument in a role: opens the link, reads *IDN?, runs the
 * profile's init commands and builds the role control. A generator's output
 * is switched off and its load set before anything else, so a session never
 * starts with an unknown output live.
 */
import type { InstrumentRole } from '../contract/contract';
import { connect } from '../scpi/connect';
import type { InstrumentAddress } from '../scpi/address';
import { formatAddress, parseAddress } from '../scpi/address';
import type { TrafficLog } from '../scpi/traffic-log';
import type { Transport } from '../scpi/transport';
import { ScpiSession } from '../scpi/session';
import { ValidationError } from '../errors';
import { ProfileGenerator } from './generator';
import { ProfileMeter } from './meter';
import { ProfileScope } from './scope';
import type { ProfileFor } from './profile';
import { findProfile } from './profile-store';
import type { LoadSetting, OpenedInstrument, RoleControls } from './roles';

export interface OpenInstrumentOptions {
  /** Required for a generator: the user's maximum stimulus, Vpp. */
  maxStimulusVpp?: number;
  /** Generator load setting applied at open (default 'high-z'). */
  load?: LoadSetting;
  traffic?: TrafficLog;
  /** Folder of user profiles when `profile` is given as an id. */
  profileFolder?: string;
  /** Use this already-made transport instead of opening `address` (in-process links, tests). */
  transport?: Transport;
}

export async function openInstrument<R extends InstrumentRole>(
  address: string | InstrumentAddress,
  role: R,
  profile: ProfileFor<R> | string,
  options: OpenInstrumentOptions = {},
): Promise<OpenedInstrument<R>> {
  const resolved = (typeof profile === 'string' ? findProfile(profile, role, options.profileFolder) : profile) as ProfileFor<R>;
  if (resolved.role !== role) throw new ValidationError('profile', `"${resolved.id}" is a ${resolved.role} profile, not a ${role} profile`);
  if (role === 'generator' && options.maxStimulusVpp === undefined) {
    throw new ValidationError('maxStimulusVpp', 'is required to open a generator', 'Set the maximum stimulus (Bench view, or --max-stimulus VPP).');
  }
  const { session, addressText } = await openProfileSession(address, resolved.timeoutS, options);
  try {
    const identity = await session.identify();
    for (const command of resolved.init) await session.write(command);
    if (resolved.checkErrors) await session.throwIfErrors(`init: ${resolved.init.join('; ')}`);
    const control = await makeControl(session, role, resolved, options);
    return { session, identity, control: control as RoleControls[R], profileId: resolved.id, address: addressText, close: () => session.close() };
  } catch (error) {
    await session.close().catch(() => undefined);
    throw error;
  }
}

/** Opens the link for a profile: its timeout, the traffic log, or the given in-process transport. */
export async function openProfileSession(
  address: string | InstrumentAddress,
  timeoutS: number,
  options: Pick<OpenInstrumentOptions, 'traffic' | 'transport'>,
): Promise<{ session: ScpiSession; addressText: string }> {
  // Parsed once here (connect takes the parsed form); an in-process transport's name is kept as given.
  const parsed = options.transport || typeof address !== 'string' ? address : parseAddress(address);
  const addressText = typeof parsed === 'string' ? parsed : formatAddress(parsed);
  const sessionOptions = { timeoutS, traffic: options.traffic };
  if (options.transport) {
    if (!options.transport.isOpen) await options.transport.open();
    return { session: new ScpiSession(options.transport, sessionOptions), addressText };
  }
  return { session: await connect(parsed, sessionOptions), addressText };
}

async function makeControl(session: ScpiSession, role: InstrumentRole, profile: ProfileFor<InstrumentRole>, options: OpenInstrumentOptions): Promise<RoleControls[InstrumentRole]> {
  if (role === 'generator' && profile.role === 'generator') {
    const generator = new ProfileGenerator(session, profile, { maxStimulusVpp: options.maxStimulusVpp! });
    await generator.setOutput(false);
    await generator.setLoad(options.load ?? 'high-z');
    return generator;
  }
  if (role === 'meter' && profile.role === 'meter') return new ProfileMeter(session, profile);
  if (role === 'scope' && profile.role === 'scope') return new ProfileScope(session, profile);
  throw new ValidationError('profile', `"${profile.id}" does not fit role ${role}`);
}
