/** Shared set-up for the sweep integration tests: a temp database and designs from the templates. */
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import type { SweepRequest } from '../../../app/contract/contract';
import { SqliteStore } from '../../../app/store';

export function tempFolder(): { path: string; remove(): void } {
  const path = mkdtempSync(join(tmpdir(), 'rolloff-sweep-'));
  return { path, remove: () => rmSync(path, { recursive: true, force: true }) };
}

/** Inverting stage, gain −RF/RN = −100, single-pole op-amp A0 = 1e5, GBW = 1 MHz (template defaults otherwise). */
export function invertingGain100(): unknown {
  return makeDesignFromTemplate('inverting-gain', { rn: 1e3, rf: 100e3, gbw: 1e6, a0: 1e5 });
}

export function sweepRequest(buildId: number, overrides: Partial<SweepRequest> = {}): SweepRequest {
  return {
    buildId, kind: 'ac', from: 100, to: 1e6, pointsPerDecade: 5, spacing: 'log',
    amplitude: { mode: 'auto' }, measurement: 'scope', minCycles: 5, averages: 1, refine: true,
    operator: 'integration test', notes: '', ...overrides,
  };
}

/** Points stored so far for the newest run in a SQLite file (read-only; 0 before the file or the run exists). */
export function pointsOfLatestRun(dbPath: string): Promise<number> {
  return stepsOfLatestRun(dbPath, async (store, runId) => (await store.loadPoints(runId)).step.length);
}

/** What `count` finds in the newest run of a SQLite file, read-only; 0 before the file or the run exists. */
export async function stepsOfLatestRun(dbPath: string, count: (store: SqliteStore, runId: number) => Promise<number>): Promise<number> {
  try {
    const store = SqliteStore.open(dbPath, { readonly: true });
    try {
      const [run] = await store.listRuns({ limit: 1 });
      return run ? await count(store, run.id) : 0;
    } finally {
      await store.close();
    }
  } catch {
    return 0; // not created yet
  }
}

/** Everything stored of one run in a SQLite file (read-only): its row (owner included), points and events. */
export async function storedRun(dbPath: string, runId: number) {
  const store = SqliteStore.open(dbPath, { readonly: true });
  try {
    return { run: await store.getRun(runId), points: await store.loadPoints(runId), events: await store.listEvents(runId) };
  } finally {
    await store.close();
  }
}

/** SIGKILL, resolved once the process is gone. */
export function killed(child: ChildProcess): Promise<void> {
  return new Promise((done) => {
    child.on('exit', () => done());
    child.kill('SIGKILL');
  });
}
