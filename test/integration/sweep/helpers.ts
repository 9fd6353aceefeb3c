/** Shared set-up for the sweep integration tests: a temp database and designs from the templates. */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
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

const BIN = resolve(__dirname, '../../../app/cli/bin.mjs');

/** The inverting low-pass template's design, written to `folder`/lowpass.json: the path. */
export function writeLowpassDesign(folder: string): string {
  const designPath = join(folder, 'lowpass.json');
  writeFileSync(designPath, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
  return designPath;
}

export interface CliSweep {
  child: ChildProcess;
  /** The signal that ended it (null when it exited by itself). */
  exited: Promise<NodeJS.Signals | null>;
  stderr(): string;
  /** Resolves once the newest run in the database has `count` points (default 1); fails after 60 s with what the sweep printed. */
  pointsStored(count?: number): Promise<void>;
}

/**
 * `rolloff sweep` of a design on the simulated bench in a process of its own, into a SQLite file. The
 * defaults sweep 36 points from 3 Hz at time scale 0.2 (slower than real time: at least 42 s), so what a
 * test does meanwhile (processes of its own, seconds each on a loaded machine) happens while it measures.
 */
export function startCliSweep(options: { dbPath: string; designPath: string; label: string; timeScale?: number; fromHz?: number; extra?: string[] }): CliSweep {
  const { dbPath, designPath, label, timeScale = 0.2, fromHz = 3, extra = [] } = options;
  const child = spawn(process.execPath, [BIN, 'sweep', '--design', designPath, '--label', label, '--simulated', '--time-scale', String(timeScale),
    '--max-stimulus', '1', '--db', dbPath, '--from', String(fromHz), '--to', '10k', '--per-decade', '10', ...extra], { stdio: ['ignore', 'ignore', 'pipe'] });
  let stderr = '';
  child.stderr!.on('data', (chunk) => (stderr += chunk));
  const exited = new Promise<NodeJS.Signals | null>((done) => child.on('exit', (_code, signal) => done(signal)));
  return {
    child,
    exited,
    stderr: () => stderr,
    async pointsStored(count = 1) {
      const deadline = Date.now() + 60_000;
      while ((await pointsOfLatestRun(dbPath)) < count) {
        if (Date.now() > deadline) throw new Error(`the sweep "${label}" stored fewer than ${count} points in 60 s: ${stderr}`);
        await new Promise((r) => setTimeout(r, 50));
      }
    },
  };
}
