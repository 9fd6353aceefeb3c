import type { InstrumentIdentity } from '../contract/contract';

/** One text per identity, so the same instrument at the same address is one row (and one bench key part). */
export function identityKey(identity: InstrumentIdentity): string {
  return [identity.manufacturer, identity.model, identity.serialNumber, identity.firmware].map((part) => String(part ?? '').trim()).join(',');
}
