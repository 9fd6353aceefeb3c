/**
 * *IDN? reply: four comma-separated fields — manufacturer, model, serial
 * number, firmware — per IEEE 488.2 §10.14 (clause number recalled from memory).
 * A field the instrument does not report is "0".
 */
import type { InstrumentIdentity } from '../contract/contract';
import { ScpiMalformedReplyError } from './errors';

export function parseIdentity(reply: string): InstrumentIdentity {
  const fields = reply.trim().split(',').map((field) => field.trim());
  if (fields.length !== 4 || fields[0] === '' || fields[1] === '') {
    throw new ScpiMalformedReplyError('*IDN?', reply, 'four comma-separated fields (manufacturer, model, serial number, firmware)');
  }
  const [manufacturer, model, serialNumber, firmware] = fields;
  return { manufacturer, model, serialNumber, firmware };
}

export function formatIdentity(identity: InstrumentIdentity): string {
  return `${identity.manufacturer},${identity.model},${identity.serialNumber},${identity.firmware}`;
}
