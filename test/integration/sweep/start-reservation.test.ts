/**
 * A bench drives one run at a time, however the starts arrive: two starts in
 * one service at once, or two services (as two processes would) on one store
 * file with the same bench name. Exactly one run starts; the other start is
 * refused naming the run that holds the bench, and creates nothing. A run held
 * by a process that is gone on this host does not keep the bench.
 */
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { hostname } from 'node:os';
import { join } from 'node:path';
import type { RolloffService } from '../../../app/service/service';
import { openServiceAt } from '../../../app/service/open-service';
import { BenchInUseError } from '../../../app/service/run-ownership';
import { SqliteStore } from '../../../app/store';
import { UserError } from '../../../app/errors';
import { newRun } from '../../store-conformance/fixtures';
import { invertingGain100, sweepRequest, tempFolder } from './helpers';

const BENCH = 'bench 1';

describe('starting runs on one bench', () => {
  let folder: ReturnType<typeof tempFolder>;
  let dbPath: string;
  const services: RolloffService[] = [];

  async function serviceOnBench(): Promise<RolloffService> {
    const service = await openServiceAt(dbPath, { maxStimulusVpp: 1, simulatedBench: { timeScale: 50 }, benchName: BENCH });
    services.push(service);
    return service;
  }

  beforeEach(() => {
    folder = tempFolder();
    dbPath = join(folder.path, 'runs.sqlite');
  });

  afterEach(async () => {
    for (const service of services.splice(0)) await service.close();
    folder.remove();
  });

  async function buildOn(service: RolloffService): Promise<number> {
    const design = await service.saveDesign(invertingGain100());
    return (await service.createBuild({ designId: design.id, label: 'board 1', notes: '', actualValues: {} })).id;
  }

  it('two starts at once in one service: one run drives the bench, the other start is refused and creates nothing', async () => {
    const service = await serviceOnBench();
    const buildId = await buildOn(service);
    await service.startSimulatedBenchForBuild(buildId);
    const request = sweepRequest(buildId, { from: 100, to: 10e3, refine: false });
    const [first, second] = await Promise.allSettled([service.startRun(request), service.startRun(request)]);
    const started = [first, second].filter((r) => r.status === 'fulfilled');
    const refused = [first, second].flatMap((r) => (r.status === 'rejected' ? [r.reason] : []));
    expect(started).toHaveLength(1);
    expect(refused).toHaveLength(1);
    expect(refused[0]).toBeInstanceOf(UserError);
    expect((refused[0] as Error).message).toMatch(/being started on this bench|is using the bench/);
    const runId = (started[0] as PromiseFulfilledResult<{ id: number }>).value.id;
    expect(await service.waitForRun(runId)).toBe('done');
    expect((await service.listRuns()).map((r) => r.id)).toEqual([runId]);
  });

  it('two services on one store file with the same bench name: one starts, the other is told which run holds the bench; once it ends the bench is free', async () => {
    const a = await serviceOnBench();
    const b = await serviceOnBench();
    const buildId = await buildOn(a);
    await a.startSimulatedBenchForBuild(buildId);
    await b.startSimulatedBenchForBuild(buildId);
    const request = sweepRequest(buildId, { from: 100, to: 10e3, refine: false });
    const results = await Promise.allSettled([a.startRun(request), b.startRun(request)]);
    const startedBy = results.flatMap((r, i) => (r.status === 'fulfilled' ? [{ service: [a, b][i], runId: r.value.id }] : []));
    const refused = results.flatMap((r) => (r.status === 'rejected' ? [r.reason] : []));
    expect(startedBy).toHaveLength(1);
    expect(refused).toHaveLength(1);
    expect(refused[0]).toBeInstanceOf(BenchInUseError);
    expect((refused[0] as BenchInUseError).runId).toBe(startedBy[0].runId);
    expect((refused[0] as Error).message).toMatch(new RegExp(`bench "${BENCH}" is in use: run ${startedBy[0].runId} is being driven by rolloff pid ${process.pid} on `));
    expect((await a.listRuns({ bench: BENCH })).map((r) => r.id)).toEqual([startedBy[0].runId]);

    expect(await startedBy[0].service.waitForRun(startedBy[0].runId)).toBe('done');
    const other = startedBy[0].service === a ? b : a;
    const next = await other.startRun(request); // the finished run gave the bench back
    expect(await other.waitForRun(next.id)).toBe('done');
  });

  it('a run held by a process that is gone on this host (heartbeat still fresh) does not keep the bench', async () => {
    const service = await serviceOnBench();
    const buildId = await buildOn(service);
    const exited = spawnSync(process.execPath, ['-e', '0']); // a process id that no longer exists
    const store = SqliteStore.open(dbPath);
    const left = await store.createOwnedRun(newRun(buildId, { benchName: BENCH }), { ownerId: `gone:${exited.pid}`, pid: exited.pid!, host: hostname(), label: 'a killed sweep' }, 10_000);
    expect(left.created).toBe(true);
    if (left.created) await store.updateRunStatus(left.run.id, 'running'); // killed mid-sweep
    await store.close();
    await service.startSimulatedBenchForBuild(buildId);
    const run = await service.startRun(sweepRequest(buildId, { from: 100, to: 1e3, refine: false }));
    expect(await service.waitForRun(run.id)).toBe('done');
    if (left.created) expect((await service.interruptedRuns()).map((r) => r.id)).toContain(left.run.id); // offered for resume, not lost
  });
});
