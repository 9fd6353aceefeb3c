/**
 * Serial-port transport over the `serialport` package. No parser is attached:
 * the session frames replies itself so binary blocks pass through untouched.
 */
import { SerialPort } from 'serialport';
import { TransportListeners, type Transport } from './transport';

export type Parity = 'none' | 'even' | 'odd' | 'mark' | 'space';
export type FlowControl = 'none' | 'rtscts' | 'xonxoff';

export interface SerialSettings {
  path: string;
  baudRate: number;
  dataBits: 5 | 6 | 7 | 8;
  parity: Parity;
  stopBits: 1 | 1.5 | 2;
  flow: FlowControl;
}

export const DEFAULT_SERIAL: Omit<SerialSettings, 'path'> = { baudRate: 9600, dataBits: 8, parity: 'none', stopBits: 1, flow: 'none' };

export function describeSerial(settings: SerialSettings): string {
  const frame = `${settings.dataBits}${settings.parity[0].toUpperCase()}${settings.stopBits}`;
  return `serial ${settings.path} ${settings.baudRate} ${frame}${settings.flow === 'none' ? '' : ` ${settings.flow}`}`;
}

export class SerialTransport extends TransportListeners implements Transport {
  readonly description: string;
  private port: SerialPort | undefined;

  constructor(private readonly settings: SerialSettings) {
    super();
    this.description = describeSerial(settings);
  }

  get isOpen(): boolean {
    return this.port?.isOpen === true && !this.closeReported;
  }

  open(): Promise<void> {
    const settings = this.settings;
    const port = new SerialPort({
      path: settings.path,
      baudRate: settings.baudRate,
      dataBits: settings.dataBits,
      parity: settings.parity,
      stopBits: settings.stopBits,
      rtscts: settings.flow === 'rtscts',
      xon: settings.flow === 'xonxoff',
      xoff: settings.flow === 'xonxoff',
      autoOpen: false,
    });
    return new Promise((resolve, reject) => {
      port.open((error) => {
        if (error) return reject(error);
        port.on('data', (chunk: Buffer) => {
          const bytes = new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength);
          this.emitData(bytes);
        });
        port.on('close', (closeError: (Error & { disconnected?: boolean }) | null) => {
          this.reportClose(closeError?.disconnected ? 'device disconnected' : closeError?.message ?? 'port closed');
        });
        port.on('error', (portError: Error) => this.reportClose(portError.message));
        this.port = port;
        resolve();
      });
    });
  }

  write(bytes: Uint8Array): Promise<void> {
    const port = this.port;
    if (!port || !this.isOpen) return Promise.reject(new Error('port is not open'));
    return new Promise((resolve, reject) => {
      port.write(Buffer.from(bytes), (error) => {
        if (error) return reject(error);
        port.drain((drainError) => (drainError ? reject(drainError) : resolve()));
      });
    });
  }

  async close(): Promise<void> {
    const port = this.port;
    if (port?.isOpen) await new Promise<void>((resolve) => port.close(() => resolve()));
    this.reportClose('closed by the application');
  }
}
