/**
 * IPC wiring with a fake ipcMain (Electron's binary is not available here):
 * every call is validated before the service sees it, errors keep message and
 * hint, untrusted frames are refused, events reach open windows only.
 * Expected behaviour: the contract (app/contract/contract.ts) — common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { registerIpc, type CallReply, type IpcInvokeEventLike, type IpcMainLike } from '../../../main/ipc';
import { CALL_CHANNEL, EVENT_CHANNEL } from '../../../main/channels';
import { UserError } from '../../../app/errors';
import type { RolloffApi } from '../../../app/contract/contract';

class FakeIpcMain implements IpcMainLike {
  readonly handlers = new Map<string, (event: IpcInvokeEventLike, ...args: unknown[]) => unknown>();
  handle(channel: string, listener: (event: IpcInvokeEventLike, ...args: unknown[]) => unknown): void {
    if (this.handlers.has(channel)) throw new Error(`second handler for ${channel}`);
    this.handlers.set(channel, listener);
  }
  removeHandler(channel: string): void {
    this.handlers.delete(channel);
  }
  invoke(url: string, ...args: unknown[]): Promise<CallReply> {
    const handler = this.handlers.get(CALL_CHANNEL);
    if (!handler) throw new Error('no handler');
    return Promise.resolve(handler({ senderFrame: { url } }, ...args)) as Promise<CallReply>;
  }
}

const APP_URL = 'file:///opt/rolloff/out/electron/renderer/index.html';

/** Records what reaches the service; any method not listed here would throw if called. */
function recordingApi() {
  const calls: Array<[string, unknown[]]> = [];
  const api = {
    async getRun(...args: unknown[]) {
      calls.push(['getRun', args]);
      return { id: args[0] };
    },
    async stopRun(...args: unknown[]) {
      calls.push(['stopRun', args]);
      throw new UserError('Run 9 is not running.', 'Only a running or paused run can be stopped.');
    },
    async pauseRun(...args: unknown[]) {
      calls.push(['pauseRun', args]);
      throw new TypeError('cannot read properties of undefined');
    },
    async disconnect(...args: unknown[]) {
      calls.push(['disconnect', args]);
    },
  } as unknown as RolloffApi;
  return { api, calls };
}

function setup() {
  const ipcMain = new FakeIpcMain();
  const { api, calls } = recordingApi();
  const sent: unknown[][] = [];
  const logged: string[] = [];
  const windows = [
    { destroyed: false, send: (...args: unknown[]) => sent.push(args), isDestroyed() { return this.destroyed; } },
    { destroyed: true, send: () => { throw new Error('sent to a destroyed window'); }, isDestroyed() { return this.destroyed; } },
  ];
  const wiring = registerIpc({ ipcMain, api, windows: () => windows, isTrustedSender: (url) => url === APP_URL, log: (line) => logged.push(line) });
  return { ipcMain, calls, sent, logged, wiring };
}

describe('IPC handlers', () => {
  it('pass a valid call through and return its result', async () => {
    const { ipcMain, calls } = setup();
    expect(await ipcMain.invoke(APP_URL, 'getRun', [4])).toEqual({ ok: true, result: { id: 4 } });
    expect(await ipcMain.invoke(APP_URL, 'disconnect', ['meter'])).toEqual({ ok: true, result: null });
    expect(calls).toEqual([['getRun', [4]], ['disconnect', ['meter']]]);
  });

  it('refuse bad arguments with a clear error and never call the service', async () => {
    const { ipcMain, calls } = setup();
    const bad: Array<[unknown, unknown, RegExp]> = [
      ['getRun', ['4'], /getRun\(runId\): must be a finite number/],
      ['getRun', [0], /positive whole number/],
      ['getRun', [], /getRun\(runId\): is missing/],
      ['getRun', 'x', /must be a JSON array/],
      ['disconnect', ['everything'], /must be one of generator, meter, scope/],
      ['eval', ['1+1'], /"eval" is not a Rolloff API method/],
      ['stopRun', [1, { force: true }], /takes 1 argument/],
    ];
    for (const [method, args, message] of bad) {
      const reply = await ipcMain.invoke(APP_URL, method, args);
      expect(reply.ok, JSON.stringify([method, args])).toBe(false);
      if (!reply.ok) {
        expect(reply.error.message).toMatch(message);
        expect(reply.error.name).toBe('ValidationError');
        expect(reply.error.user).toBe(true);
      }
    }
    expect(calls).toEqual([]);
  });

  it('keep the message and hint of a service refusal, and hide the details of a bug', async () => {
    const { ipcMain, logged } = setup();
    const refusal = await ipcMain.invoke(APP_URL, 'stopRun', [9]);
    expect(refusal).toEqual({ ok: false, error: { name: 'UserError', message: 'Run 9 is not running.', hint: 'Only a running or paused run can be stopped.', user: true } });
    const bug = await ipcMain.invoke(APP_URL, 'pauseRun', [9]);
    expect(bug.ok).toBe(false);
    if (!bug.ok) {
      expect(bug.error.user).toBe(false);
      expect(bug.error.message).not.toMatch(/undefined/);
    }
    expect(logged.join('\n')).toMatch(/pauseRun failed: TypeError: cannot read properties of undefined/);
  });

  it('refuse calls from a frame that is not the Rolloff renderer', async () => {
    const { ipcMain, calls } = setup();
    const reply = await ipcMain.invoke('https://example.invalid/', 'getRun', [1]);
    expect(reply.ok).toBe(false);
    if (!reply.ok) expect(reply.error.message).toMatch(/refused/);
    expect(calls).toEqual([]);
  });

  it('forward events to open windows only, and unregister on dispose', () => {
    const { ipcMain, sent, wiring } = setup();
    wiring.forward('progress', { runId: 1, step: 2, total: 10, etaS: 4, status: 'running' });
    expect(sent).toEqual([[EVENT_CHANNEL, 'progress', { runId: 1, step: 2, total: 10, etaS: 4, status: 'running' }]]);
    wiring.dispose();
    expect(ipcMain.handlers.has(CALL_CHANNEL)).toBe(false);
  });
});
