/**
 * The window's two clients check what the host sends back, at their one
 * shared place (renderer/client/contract-proxy.ts): the preload bridge client
 * with a planted bridge, and the HTTP client against a small real HTTP and
 * WebSocket server that sends planted replies. A result that does not fit
 * rejects the call with the field's path and the version hint; an event that
 * does not fit never reaches a listener and is reported once.
 * Expected behaviour: the contract (app/contract/check-reply.ts) — common practice, no source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { WebSocketServer } from 'ws';
import { UnexpectedReplyError } from '../../../app/errors';
import type { RolloffClient, RunSummary, ServiceEventName } from '../../../app/contract/contract';
import { REPLY_MISMATCH_HINT } from '../../../app/contract/check-reply';
import { createBridgeClient, type PreloadBridge } from '../../../renderer/client/bridge-client';
import { createHttpClient } from '../../../renderer/client/http-client';
import { acRunDetail } from '../record/fixtures';
import { provideBrowserWebSocket } from '../../helpers/browser-websocket';

const SUMMARY: RunSummary = {
  id: 12, uid: '9a3e2c71-4b8d-4f60-a1c5-000000000012', buildId: 3, buildLabel: 'Board A', designName: 'Inverting low-pass', kind: 'ac',
  status: 'running', startedAt: '2026-11-30T10:00:00.000Z', endedAt: null, pointCount: 4, plannedCount: 41,
  simulated: true, benchName: 'simulated bench 1', owner: null,
};
const POINT = { runId: 12, index: 3, stimulus: 1e3, gainDb: 19.9, phaseDeg: -8.5, outputV: Number.NaN, flags: 0, gainUncertaintyDb: 0.01, phaseUncertaintyDeg: 0.1 };
const { runId: _runId, ...POINT_WITHOUT_RUN_ID } = POINT;

/** A detail whose gain column holds text at one point. */
function detailWithTextGain(): unknown {
  const detail = JSON.parse(JSON.stringify(acRunDetail())) as { points: { gainDb: unknown[] } };
  detail.points.gainDb[2] = 'minus three';
  return detail;
}

async function rejection(call: Promise<unknown>): Promise<UnexpectedReplyError> {
  const error = await call.then(
    (value) => {
      throw new Error(`the call resolved to ${JSON.stringify(value)?.slice(0, 80)}`);
    },
    (reason: unknown) => reason,
  );
  expect(error).toBeInstanceOf(UnexpectedReplyError);
  return error as UnexpectedReplyError;
}

/** What reached the listeners and the reporter. */
function listening(client: RolloffClient) {
  const heard: unknown[] = [];
  const offs = [client.on('point', (payload) => heard.push(payload)), client.on('runEvent', (payload) => heard.push(payload))];
  return { heard, off: () => offs.forEach((off) => off()) };
}

describe('the preload bridge client checks replies (planted bridge)', () => {
  const replies = new Map<string, unknown>();
  const listeners = new Map<string, Set<(payload: unknown) => void>>();
  const bridge: PreloadBridge = {
    async call(method) {
      return { ok: true, result: replies.get(method) };
    },
    on(event, listener) {
      if (!listeners.has(event)) listeners.set(event, new Set());
      listeners.get(event)!.add(listener);
      return () => listeners.get(event)!.delete(listener);
    },
  };
  const push = (event: ServiceEventName, payload: unknown) => listeners.get(event)?.forEach((listener) => listener(payload));
  const reported: Error[] = [];
  const client = createBridgeClient(bridge, (error) => reported.push(error));

  it('passes a fitting result on as it arrived', async () => {
    const detail = acRunDetail({ overrangeIndex: 2 });
    replies.set('getRun', detail);
    expect(await client.getRun(12)).toBe(detail);
    replies.set('disconnect', null);
    expect(await client.disconnect('meter')).toBeNull();
  });

  it('rejects a summary whose status is "exploded", with the path and the hint', async () => {
    replies.set('listRuns', [SUMMARY, { ...SUMMARY, id: 13, status: 'exploded' }]);
    const error = await rejection(client.listRuns());
    expect(error.message).toBe('listRuns() result[1].status: must be one of planned, running, paused, done, stopped, failed, got "exploded"');
    expect(error.hint).toBe(REPLY_MISMATCH_HINT);
  });

  it('rejects a detail whose gain column holds text', async () => {
    replies.set('getRun', detailWithTextGain());
    expect((await rejection(client.getRun(12))).where).toBe('getRun() result.points.gainDb[2]');
  });

  it('does not pass a point without its run id to the listeners, reports it once, and goes on with good events', () => {
    const { heard, off } = listening(client);
    push('point', POINT_WITHOUT_RUN_ID);
    push('point', POINT_WITHOUT_RUN_ID);
    push('point', { ...POINT_WITHOUT_RUN_ID, index: 4 });
    push('point', POINT);
    push('runEvent', { runId: 12, at: '2026-11-30T10:00:00.000Z', level: 'info', message: 'resumed' });
    off();
    expect(heard).toEqual([POINT, { runId: 12, at: '2026-11-30T10:00:00.000Z', level: 'info', message: 'resumed' }]);
    expect(reported.map((error) => error.message)).toEqual(['point event.runId: must be a finite number, got undefined']);
    expect(reported[0]).toBeInstanceOf(UnexpectedReplyError);
    expect((reported[0] as UnexpectedReplyError).hint).toBe(REPLY_MISMATCH_HINT);
  });

  it('reports another field of the same event, once, even as its value changes from point to point', () => {
    const before = reported.length;
    const { heard, off } = listening(client);
    for (const gainDb of ['-3.1', '-3.2', '-3.3']) push('point', { ...POINT, gainDb });
    off();
    expect(heard).toEqual([]);
    expect(reported.slice(before).map((error) => error.message)).toEqual(['point event.gainDb: must be a number (null where it has none), got "-3.1"']);
  });
});

describe('the HTTP client checks replies (a real HTTP and WebSocket server sending planted replies)', () => {
  const replies = new Map<string, unknown>();
  const reported: Error[] = [];
  let server: Server;
  let sockets: WebSocketServer;
  let client: RolloffClient;
  const send = (event: ServiceEventName, payload: unknown) => {
    for (const socket of sockets.clients) socket.send(JSON.stringify({ event, payload }));
  };

  beforeAll(async () => {
    provideBrowserWebSocket();
    server = createServer((request, response) => {
      const method = decodeURIComponent(new URL(request.url ?? '/', 'http://host.invalid').pathname.slice('/api/'.length));
      request.resume();
      request.on('end', () => {
        const body = JSON.stringify({ result: replies.get(method) ?? null });
        response.writeHead(200, { 'Content-Type': 'application/json; charset=utf-8' });
        response.end(body);
      });
    });
    sockets = new WebSocketServer({ server, path: '/events' });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const { port } = server.address() as AddressInfo;
    let connected!: () => void;
    const open = new Promise<void>((resolve) => (connected = resolve));
    client = createHttpClient(new URL(`http://127.0.0.1:${port}/`), (isConnected) => isConnected && connected(), (error) => reported.push(error));
    await open;
  });

  afterAll(async () => {
    for (const socket of sockets.clients) socket.terminate();
    sockets.close();
    server.closeAllConnections();
    await new Promise<void>((resolve) => server.close(() => resolve()));
  });

  it('passes a fitting result on as it arrived over JSON (NaN became null)', async () => {
    const detail = acRunDetail({ overrangeIndex: 2 });
    replies.set('getRun', detail);
    const arrived = await client.getRun(12);
    expect(arrived.points.gainDb[2]).toBeNull();
    expect(arrived).toEqual(JSON.parse(JSON.stringify(detail)));
  });

  it('rejects a summary whose status is "exploded"', async () => {
    replies.set('getRunSummary', { ...SUMMARY, status: 'exploded' });
    const error = await rejection(client.getRunSummary(12));
    expect(error.where).toBe('getRunSummary() result.status');
    expect(error.message).toMatch(/got "exploded"$/);
    expect(error.hint).toBe(REPLY_MISMATCH_HINT);
  });

  it('rejects a detail whose gain column holds text', async () => {
    replies.set('getRun', detailWithTextGain());
    const error = await rejection(client.getRun(12));
    expect(error.message).toBe('getRun() result.points.gainDb[2]: must be a number (null where it has none), got "minus three"');
  });

  it('does not pass a point without its run id to the listeners and reports it once', async () => {
    const { heard, off } = listening(client);
    const before = reported.length;
    send('point', POINT_WITHOUT_RUN_ID);
    send('point', POINT_WITHOUT_RUN_ID);
    send('point', POINT);
    // Messages on one socket arrive in order: once the good point is heard, the bad ones have been handled.
    await expect.poll(() => heard.length).toBe(1);
    off();
    expect(heard).toEqual([JSON.parse(JSON.stringify(POINT))]);
    expect(reported.slice(before).map((error) => error.message)).toEqual(['point event.runId: must be a finite number, got undefined']);
  });
});
