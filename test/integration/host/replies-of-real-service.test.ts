/**
 * Every method of the contract, called by the window's own clients on the real
 * service (a temporary SQLite file, the simulated bench over TCP), resolves to
 * what its schema in API_RESULTS says, and every event a real sweep and noise
 * run push passes its event's schema: over the web host (JSON, where NaN
 * arrives as null) and over the desktop shell's IPC (structured clone, where
 * NaN stays NaN). The clients check each reply themselves
 * (renderer/client/contract-proxy.ts); this test checks the recorded replies
 * again with checkResult, so it fails if a method is left out of the drive or
 * a reply does not fit, whatever the clients do.
 * Expected behaviour: the contract (app/contract/contract.ts) — common practice, no source.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { API_RESULTS, FINISHED_RUN_STATUSES, RECORD_FORMATS, SERVICE_EVENT_NAMES, type RolloffClient, type RolloffMethodName, type ServiceEventName, type SweepRequest } from '../../../app/contract/contract';
import { checkEvent, checkResult } from '../../../app/contract/check-reply';
import { tempFolder } from '../sweep/helpers';
import { noiseRequest } from '../noise/helpers';
import { openWindowClient, type Transport, type WindowClient } from './window-clients';

const METHODS = Object.keys(API_RESULTS) as RolloffMethodName[];

/** Every reply a method gave, as the client handed it on. */
type Replies = Map<RolloffMethodName, unknown[]>;

/** The client, with every reply it hands on recorded by method. */
function recorded(client: RolloffClient, replies: Replies): RolloffClient {
  return new Proxy(client, {
    get(target, name) {
      const member = Reflect.get(target, name) as unknown;
      if (name === 'on' || typeof name !== 'string' || typeof member !== 'function') return member;
      return async (...args: unknown[]) => {
        const reply = await (member as (...values: unknown[]) => Promise<unknown>)(...args);
        const method = name as RolloffMethodName;
        replies.set(method, [...(replies.get(method) ?? []), reply]);
        return reply;
      };
    },
  });
}

async function finished(client: RolloffClient, runId: number): Promise<void> {
  const deadline = Date.now() + 45_000;
  while (!FINISHED_RUN_STATUSES.has((await client.getRunSummary(runId)).status)) {
    if (Date.now() > deadline) throw new Error(`run ${runId} did not finish within 45 s`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

async function paused(client: RolloffClient, runId: number): Promise<void> {
  const status = (await client.pauseRun(runId)).status;
  if (status !== 'paused') throw new Error(`run ${runId} was ${status} after pauseRun, not paused: make it longer`);
}

/** Calls every method of the contract at least once, in an order a user could take. */
async function driveEveryMethod(client: RolloffClient, otherStorePath: string): Promise<{ acRunId: number; meterRunId: number }> {
  await client.storeInUse();
  await client.listPorts();
  await client.listProfiles();
  await client.listTemplates();
  const design = await client.makeTemplate('inverting-lowpass', {});
  const saved = await client.saveDesign(design);
  await client.listDesigns();
  const build = await client.createBuild({ designId: saved.id, label: 'replies check', notes: 'every method once', actualValues: { CF: 16e-9 } });
  await client.listBuilds(saved.id);
  await client.startSimulatedBench(saved.id);
  await client.setMaxStimulus(1);
  await client.benchStatus();

  const request: SweepRequest = {
    buildId: build.id, kind: 'ac', from: 300, to: 30e3, pointsPerDecade: 3, spacing: 'log', amplitude: { mode: 'auto' },
    measurement: 'scope', minCycles: 5, averages: 1, refine: false, operator: 'integration test', notes: '', limits: { maxDeviationDb: 3 },
  };
  await client.planSweep(request);
  const ac = await client.startRun(request);
  await finished(client, ac.id);
  // A meter sees no phase: its phase column is NaN in the service.
  const meter = await client.startRun({ ...request, measurement: 'meter' });
  await finished(client, meter.id);
  // Paused at once, resumed, stopped: a run long enough that the pause comes before its end.
  const long = await client.startRun({ ...request, from: 10, to: 100e3, pointsPerDecade: 6 });
  await paused(client, long.id);
  await client.resumeRun(long.id);
  await client.stopRun(long.id);
  await finished(client, long.id);

  const noise = noiseRequest(build.id, { fromHz: 100, toHz: 10e3, records: 2, segmentLength: 1024 });
  await client.planNoiseRun(noise);
  const noiseRun = await client.startNoiseRun(noise);
  await finished(client, noiseRun.id);
  await client.getNoiseRun(noiseRun.id);

  await client.listRuns();
  await client.listRuns({ status: 'stopped' });
  for (const runId of [ac.id, meter.id, long.id]) await client.getRun(runId);
  await client.compareRuns([ac.id, meter.id], 'theory');
  await client.compareRuns([ac.id, meter.id], ac.id);
  for (const format of RECORD_FORMATS) await client.exportRecord([ac.id, meter.id], format);

  // The meter taken off, its profile checked at its address (a connected address is refused), and connected again by address.
  const addresses = (await client.benchStatus()).simulatedBench!.addresses;
  await client.disconnect('meter');
  await client.checkProfile({ address: addresses.meter!, profileId: 'scpi-meter' });
  await client.connect({ role: 'meter', address: addresses.meter!, profileId: 'scpi-meter' });

  await client.chooseStore(otherStorePath);
  return { acRunId: ac.id, meterRunId: meter.id };
}

describe.each<Transport>(['web', 'desktop'])('replies and events of the real service through the %s client', (transport) => {
  const folder = tempFolder();
  const replies: Replies = new Map();
  const events = new Map<ServiceEventName, unknown[]>(SERVICE_EVENT_NAMES.map((name) => [name, []]));
  let window: WindowClient;
  let runs: { acRunId: number; meterRunId: number };

  beforeAll(async () => {
    window = await openWindowClient(transport, join(folder.path, 'replies.sqlite'), { maxStimulusVpp: 1, simulatedBench: { timeScale: 50 } });
    for (const name of SERVICE_EVENT_NAMES) window.client.on(name, (payload) => events.get(name)!.push(payload));
    runs = await driveEveryMethod(recorded(window.client, replies), join(folder.path, 'other.sqlite'));
  }, 180_000);

  afterAll(async () => {
    await window?.close();
    folder.remove();
  });

  it.each(METHODS)('%s was called and every reply fits its schema', (method) => {
    const given = replies.get(method) ?? [];
    expect(given.length, `${method} is not called by driveEveryMethod`).toBeGreaterThan(0);
    for (const reply of given) expect(checkResult(method, reply)).toBe(reply);
  });

  it('every event kind was pushed during the runs, and every payload fits its schema', () => {
    for (const name of SERVICE_EVENT_NAMES) {
      const payloads = events.get(name)!;
      expect(payloads.length, `no ${name} event was heard`).toBeGreaterThan(0);
      for (const payload of payloads) expect(checkEvent(name, payload)).toBe(payload);
    }
    expect(window.refusedEvents).toEqual([]);
    // Each measured point was announced: at least the points the two finished runs stored.
    const points = events.get('point')!.length;
    const stored = (replies.get('getRun') as Array<{ id: number; pointCount: number }>).filter((run) => run.id === runs.acRunId || run.id === runs.meterRunId);
    expect(points).toBeGreaterThanOrEqual(stored.reduce((sum, run) => sum + run.pointCount, 0));
  });

  it(`carries a meter run's missing phase as the ${transport === 'web' ? 'JSON null' : 'NaN of structured clone'}`, () => {
    const meterRun = (replies.get('getRun') as Array<{ id: number; points: { phaseDeg: unknown[] } }>).find((run) => run.id === runs.meterRunId)!;
    expect(meterRun.points.phaseDeg.length).toBeGreaterThan(0);
    for (const phase of meterRun.points.phaseDeg) {
      if (transport === 'web') expect(phase).toBeNull();
      else expect(Number.isNaN(phase)).toBe(true);
    }
  });
});
