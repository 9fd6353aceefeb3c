/** Raw TCP socket transport (SCPI over port 5025 is the common convention). */
import { Socket } from 'node:net';
import { TransportListeners, type Transport } from './transport';

export interface TcpSettings {
  host: string;
  port: number;
  /** Connection attempt limit in seconds. */
  connectTimeoutS?: number;
}

export class TcpTransport extends TransportListeners implements Transport {
  readonly description: string;
  private socket: Socket | undefined;

  constructor(private readonly settings: TcpSettings) {
    super();
    this.description = `tcp ${settings.host}:${settings.port}`;
  }

  get isOpen(): boolean {
    return this.socket !== undefined && !this.socket.destroyed && !this.closeReported;
  }

  open(): Promise<void> {
    return new Promise((resolve, reject) => {
      const socket = new Socket();
      socket.setNoDelay(true); // small commands; Nagle would add a round trip of delay per query
      const timeoutMs = (this.settings.connectTimeoutS ?? 5) * 1000;
      const timer = setTimeout(() => {
        socket.destroy();
        reject(new Error(`no connection to ${this.settings.host}:${this.settings.port} within ${timeoutMs / 1000} s`));
      }, timeoutMs);
      socket.once('error', (error) => {
        clearTimeout(timer);
        reject(error);
      });
      socket.connect(this.settings.port, this.settings.host, () => {
        clearTimeout(timer);
        socket.removeAllListeners('error');
        socket.on('error', (error) => this.reportClose(error.message));
        socket.on('close', () => this.reportClose('connection closed'));
        socket.on('end', () => this.reportClose('peer ended the connection'));
        socket.on('data', (chunk: Buffer) => {
          const bytes = new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength);
          this.emitData(bytes);
        });
        this.socket = socket;
        resolve();
      });
    });
  }

  write(bytes: Uint8Array): Promise<void> {
    const socket = this.socket;
    if (!socket || !this.isOpen) return Promise.reject(new Error('connection is not open'));
    return new Promise((resolve, reject) => {
      socket.write(bytes, (error) => (error ? reject(error) : resolve()));
    });
  }

  async close(): Promise<void> {
    const socket = this.socket;
    if (!socket) return;
    await new Promise<void>((resolve) => {
      if (socket.destroyed) return resolve();
      socket.once('close', () => resolve());
      socket.end();
      socket.destroy();
    });
    this.reportClose('closed by the application');
  }
}
