/**
 * The headless web host: the renderer and the RolloffApi contract over HTTP
 * (POST /api/METHOD with a JSON argument list) and WebSocket (/events, one JSON
 * message per service event). Same renderer, same contract, same argument
 * validation as the Electron shell.
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import type { Duplex } from 'node:stream';
import { WebSocketServer, type WebSocket } from 'ws';
import type { RolloffApi, ServiceEventName } from '../contract/contract';
import { callService } from './call-service';
import { ValidationError } from '../errors';
import { createAccessToken, isLoopbackHost, TOKEN_COOKIE, tokenFromRequest, tokenMatches } from './access-token';
import { contentSecurityPolicy } from './content-security-policy';
import type { RendererFiles } from './renderer-bundle';
import { httpStatusFor, serializeError } from './wire-error';

export type EventListener = (event: ServiceEventName, payload: unknown) => void;

export interface WebHostOptions {
  api: RolloffApi;
  /** Registers a listener for every service event; returns the unsubscribe function. */
  subscribe(listener: EventListener): () => void;
  files: RendererFiles;
  host: string;
  /** 0 picks a free port. */
  port: number;
  /** Defaults to true on any non-loopback address; tests force it on a loopback one. */
  requireToken?: boolean;
  /** Where unexpected errors are logged (stack traces stay here, never in replies). */
  log?: (line: string) => void;
}

export interface WebHost {
  /** The address to open, with the token when one is required. */
  url: string;
  host: string;
  port: number;
  token: string | undefined;
  close(): Promise<void>;
}

/** Far above any real call (a design file is a few kB). */
const MAX_BODY_BYTES = 2 * 1024 * 1024;

export async function startWebHost(options: WebHostOptions): Promise<WebHost> {
  const requireToken = options.requireToken ?? !isLoopbackHost(options.host);
  const token = requireToken ? createAccessToken() : undefined;
  const log = options.log ?? ((line: string) => process.stderr.write(line + '\n'));
  const sockets = new Set<WebSocket>();
  const webSockets = new WebSocketServer({ noServer: true, maxPayload: 64 * 1024 });

  const server = createServer((request, response) => {
    handleHttp(request, response).catch((error) => {
      log(`rolloff serve: ${(error as Error)?.stack ?? String(error)}`);
      if (!response.headersSent) sendJson(response, 500, { error: serializeError(error) });
      else response.destroy();
    });
  });

  async function handleHttp(request: IncomingMessage, response: ServerResponse): Promise<void> {
    const url = new URL(request.url ?? '/', 'http://host.invalid');
    const refusal = refuse(request, url);
    if (refusal) {
      sendJson(response, refusal.status, { error: { name: 'AccessRefused', message: refusal.message, hint: refusal.hint, user: true } });
      return;
    }
    if (url.pathname.startsWith('/api/')) {
      if (request.method !== 'POST') {
        response.setHeader('Allow', 'POST');
        sendJson(response, 405, { error: wireValidation('HTTP method', `${request.method} is not allowed on ${url.pathname}`, 'Call API methods with POST.') });
        return;
      }
      let methodName: string;
      try {
        methodName = decodeURIComponent(url.pathname.slice('/api/'.length));
      } catch {
        sendJson(response, 400, { error: wireValidation('path', `${url.pathname.slice(0, 80)} is not a valid method path`) });
        return;
      }
      await handleApiCall(request, response, methodName);
      return;
    }
    if (request.method !== 'GET' && request.method !== 'HEAD') {
      response.setHeader('Allow', 'GET, HEAD');
      sendJson(response, 405, { error: wireValidation('HTTP method', `${request.method} is not allowed on ${url.pathname}`) });
      return;
    }
    const name = url.pathname === '/' ? 'index.html' : url.pathname.slice(1);
    const file = options.files.get(name);
    if (!file) {
      sendJson(response, 404, { error: wireValidation('path', `${url.pathname} does not exist on this host`) });
      return;
    }
    if (token && url.searchParams.get('token')) {
      // The first page load carries the token in the URL; later requests (script, style, API, events) send the cookie.
      response.setHeader('Set-Cookie', `${TOKEN_COOKIE}=${token}; HttpOnly; SameSite=Strict; Path=/`);
    }
    setSecurityHeaders(response);
    response.writeHead(200, { 'Content-Type': file.contentType, 'Content-Length': file.body.length });
    response.end(request.method === 'HEAD' ? undefined : file.body);
  }

  async function handleApiCall(request: IncomingMessage, response: ServerResponse, methodName: string): Promise<void> {
    const contentType = request.headers['content-type'] ?? '';
    if (!contentType.toLowerCase().startsWith('application/json')) {
      // Also keeps a foreign page from posting a "simple" form request without a CORS preflight.
      sendJson(response, 415, { error: wireValidation('Content-Type', `must be application/json, got "${contentType.slice(0, 60)}"`) });
      return;
    }
    let body: string;
    try {
      body = await readBody(request, MAX_BODY_BYTES);
    } catch (error) {
      sendJson(response, 413, { error: serializeError(error) });
      return;
    }
    let args: unknown;
    try {
      args = body.trim() === '' ? [] : JSON.parse(body);
    } catch (error) {
      sendJson(response, 400, { error: wireValidation(`${methodName} request body`, `is not valid JSON (${(error as Error).message})`, 'Send the arguments as a JSON list, e.g. [42].') });
      return;
    }
    const outcome = await callService(options.api, methodName, args, (line) => log(`rolloff serve: ${line}`));
    if (outcome.ok) sendJson(response, 200, { result: outcome.result });
    else sendJson(response, httpStatusFor(outcome.error), { error: serializeError(outcome.error) });
  }

  /** Host and origin checks (DNS rebinding, foreign pages) and the token. */
  function refuse(request: IncomingMessage, url: URL): { status: number; message: string; hint?: string } | undefined {
    if (token) {
      const given = tokenFromRequest(request.headers, url);
      if (given === undefined) {
        return { status: 401, message: 'This host needs its access token.', hint: 'Open the address printed by "rolloff serve", which carries ?token=…' };
      }
      if (!tokenMatches(token, given)) return { status: 403, message: 'The access token is wrong.', hint: 'Use the token printed by "rolloff serve" when it started.' };
    } else {
      const hostHeader = request.headers.host ?? '';
      const hostName = hostHeader.replace(/:\d+$/, '');
      if (!isLoopbackHost(hostName)) {
        return { status: 403, message: `Requests for host "${hostHeader.slice(0, 80)}" are refused on a loopback-only host.`, hint: 'Open the address printed by "rolloff serve".' };
      }
    }
    const origin = request.headers.origin;
    if (origin !== undefined && origin !== 'null') {
      let originHost: string;
      try {
        originHost = new URL(origin).host;
      } catch {
        originHost = '';
      }
      if (originHost !== request.headers.host) return { status: 403, message: `Requests from ${origin.slice(0, 80)} are refused.`, hint: 'Only the Rolloff page served by this host may call it.' };
    }
    return undefined;
  }

  server.on('upgrade', (request: IncomingMessage, socket: Duplex, head: Buffer) => {
    const url = new URL(request.url ?? '/', 'http://host.invalid');
    const refusal = url.pathname === '/events' ? refuse(request, url) : { status: 404, message: 'not found' };
    if (refusal) {
      const reason = refusal.status === 401 ? 'Unauthorized' : refusal.status === 403 ? 'Forbidden' : 'Not Found';
      socket.end(`HTTP/1.1 ${refusal.status} ${reason}\r\nConnection: close\r\nContent-Type: text/plain\r\n\r\n${refusal.message}\n`);
      return;
    }
    webSockets.handleUpgrade(request, socket, head, (ws) => {
      sockets.add(ws);
      ws.on('close', () => sockets.delete(ws));
      ws.on('error', () => sockets.delete(ws));
    });
  });

  const unsubscribe = options.subscribe((event, payload) => {
    if (sockets.size === 0) return;
    const message = JSON.stringify({ event, payload });
    for (const ws of sockets) if (ws.readyState === ws.OPEN) ws.send(message);
  });

  await new Promise<void>((resolvePromise, reject) => {
    server.once('error', reject);
    server.listen(options.port, options.host, () => {
      server.off('error', reject);
      resolvePromise();
    });
  });
  const address = server.address() as AddressInfo;
  const hostForUrl = address.family === 'IPv6' ? `[${address.address}]` : address.address;
  const url = `http://${hostForUrl}:${address.port}/${token ? `?token=${token}` : ''}`;

  return {
    url,
    host: address.address,
    port: address.port,
    token,
    async close() {
      unsubscribe();
      for (const ws of sockets) ws.terminate();
      webSockets.close();
      server.closeAllConnections();
      await new Promise<void>((resolvePromise) => server.close(() => resolvePromise()));
    },
  };
}

function wireValidation(where: string, message: string, hint?: string) {
  return serializeError(new ValidationError(where, message, hint));
}

function setSecurityHeaders(response: ServerResponse): void {
  response.setHeader('Content-Security-Policy', contentSecurityPolicy());
  response.setHeader('X-Content-Type-Options', 'nosniff');
  response.setHeader('Referrer-Policy', 'no-referrer');
  response.setHeader('Cache-Control', 'no-store');
  response.setHeader('Cross-Origin-Opener-Policy', 'same-origin');
}

function sendJson(response: ServerResponse, status: number, body: unknown): void {
  const text = JSON.stringify(body);
  setSecurityHeaders(response);
  response.writeHead(status, { 'Content-Type': 'application/json; charset=utf-8', 'Content-Length': Buffer.byteLength(text) });
  response.end(text);
}

function readBody(request: IncomingMessage, maxBytes: number): Promise<string> {
  return new Promise((resolvePromise, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    request.on('data', (chunk: Buffer) => {
      size += chunk.length;
      // Keep draining (not destroying) past the limit so the 413 reply can still be written.
      if (size <= maxBytes) chunks.push(chunk);
    });
    request.on('end', () => {
      if (size > maxBytes) reject(new ValidationError('request body', `is ${size} bytes; at most ${maxBytes} are accepted`));
      else resolvePromise(Buffer.concat(chunks).toString('utf8'));
    });
    request.on('error', reject);
  });
}
