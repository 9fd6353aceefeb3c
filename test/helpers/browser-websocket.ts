/**
 * The browser's WebSocket for the window's HTTP client when it runs in Node 20
 * (which has fetch but no WebSocket): the ws package's, which like a browser's
 * fires "error" then "close" when a connection fails, but as an EventEmitter
 * would throw an "error" nobody listens to. A browser never throws there, so
 * neither does this one; the client reconnects on "close" as it does in a page.
 */
import { WebSocket } from 'ws';

class BrowserLikeWebSocket extends WebSocket {
  constructor(...args: ConstructorParameters<typeof WebSocket>) {
    super(...args);
    this.on('error', () => {});
  }
}

/** Puts the stand-in in place of globalThis.WebSocket where there is none. */
export function provideBrowserWebSocket(): void {
  (globalThis as { WebSocket?: unknown }).WebSocket ??= BrowserLikeWebSocket;
}
