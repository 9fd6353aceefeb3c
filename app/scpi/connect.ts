/** Opens a session on an address, turning OS-level failures into a clear UserError. */
import { ScpiError } from './errors';
import { formatAddress, parseAddress, type InstrumentAddress } from './address';
import { transportFor } from './open-transport';
import { ScpiSession, type SessionOptions } from './session';

/** The link could not be opened at all (no such port, connection refused, busy). */
export class ConnectError extends ScpiError {
  constructor(address: string, reason: string) {
    super(
      `cannot open ${address}: ${reason}`,
      'Check the address (rolloff ports lists serial ports), that the instrument is on and not held open by another program, and for TCP that host and port are right.',
    );
  }
}

export async function connect(address: string | InstrumentAddress, options: SessionOptions = {}): Promise<ScpiSession> {
  const parsed = typeof address === 'string' ? parseAddress(address) : address;
  const transport = transportFor(parsed);
  try {
    await transport.open();
  } catch (error) {
    if (error instanceof ScpiError) throw error; // named by the transport with its own advice (a USBTMC permission, a VXI-11 refusal)
    throw new ConnectError(formatAddress(parsed), (error as Error).message ?? String(error));
  }
  return new ScpiSession(transport, options);
}
