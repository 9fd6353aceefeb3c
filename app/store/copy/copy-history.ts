/**
 * Copies a store's history (designs, builds, their schedules and runs with
 * points, events and offline periods) into another store of either kind:
 * rows get the target's ids, everything else is kept as it was (times,
 * statuses, figures, raw readings, stable ids), so a record exported from the
 * copy has the same digest (app/record/DIGEST.md).
 *
 * A design or build the target already holds (same uid) is reused, not doubled.
 * A run the target already holds is refused (nothing is copied), or with
 * skipExisting left where it is and named in the report. A run some process is
 * driving right now is refused: its points are still coming.
 */
import { UserError } from '../../errors';
import type { RolloffStore } from '../store-interface';
import type { RunImport, RunTransfer, StoredRun } from '../types';

export interface CopyOptions {
  /** Leave runs the target already holds (same uid) where they are and copy the others; default: refuse. */
  skipExisting?: boolean;
  /** Points per target transaction (bulk imports); a run is never split. */
  pointsPerTransaction?: number;
  /** A heartbeat older than this (ms) means nobody drives the run any more (see app/service/run-ownership.ts). */
  staleAfterMs: number;
  /** Called after each committed batch. */
  onProgress?(copiedRuns: number, totalRuns: number): void;
}

export interface SkippedRun {
  uid: string;
  sourceId: number;
  targetId: number;
}

export interface CopyReport {
  copiedRuns: number;
  copiedPoints: number;
  designs: { copied: number; alreadyThere: number };
  builds: { copied: number; alreadyThere: number };
  skippedRuns: SkippedRun[];
  /** Source run id → target run id of every copied run. */
  runIds: Map<number, number>;
}

/** The target holds some of the runs already. */
export class RunsAlreadyInStoreError extends UserError {
  constructor(readonly target: string, readonly existing: SkippedRun[]) {
    const list = existing.slice(0, 5).map((run) => `run ${run.sourceId} (there as run ${run.targetId})`).join(', ');
    super(
      `${target} already holds ${existing.length} of these runs: ${list}${existing.length > 5 ? ', …' : ''}. Nothing was copied.`,
      'Give --skip-existing to copy only the runs it does not hold (the others are left as they are there).',
    );
  }
}

/** A run is being driven by a live process: copying it now would miss its coming points. */
export class RunInProgressError extends UserError {
  constructor(readonly runId: number, owner: string) {
    super(`run ${runId} is being measured right now by ${owner}. Nothing was copied.`, 'Copy after the sweep ends (or pause it first).');
  }
}

const DEFAULT_POINTS_PER_TRANSACTION = 50_000;

export async function copyHistory(source: RolloffStore, target: RolloffStore, options: CopyOptions): Promise<CopyReport> {
  const summaries = (await source.listRuns({ limit: Number.MAX_SAFE_INTEGER })).reverse(); // oldest first, as they were made
  for (const summary of summaries) {
    if (summary.status !== 'running' && summary.status !== 'paused') continue;
    const owner = await source.getRunOwnership(summary.id);
    if (owner && Date.now() - Date.parse(owner.heartbeatAt) <= options.staleAfterMs) throw new RunInProgressError(summary.id, `${owner.label} (process ${owner.pid} on ${owner.host})`);
  }
  const present = await target.idsOfUids('run', summaries.map((run) => run.uid));
  const skippedRuns = summaries.filter((run) => present.has(run.uid)).map((run) => ({ uid: run.uid, sourceId: run.id, targetId: present.get(run.uid)! }));
  if (skippedRuns.length > 0 && !options.skipExisting) throw new RunsAlreadyInStoreError(target.location, skippedRuns);

  const designs = await copyDesigns(source, target);
  const builds = await copyBuilds(source, target, designs.ids);
  const scheduleIds = new Map<number, number>();
  const targetScheduleOf = async (sourceScheduleId: number | null): Promise<number | null> => {
    if (sourceScheduleId === null) return null;
    let id = scheduleIds.get(sourceScheduleId);
    if (id === undefined) {
      const { id: _id, ...schedule } = await source.getSchedule(sourceScheduleId);
      id = await target.importSchedule({ ...schedule, buildId: builds.ids.get(schedule.buildId)! });
      scheduleIds.set(sourceScheduleId, id);
    }
    return id;
  };

  const toCopy = summaries.filter((run) => !present.has(run.uid));
  const limit = options.pointsPerTransaction ?? DEFAULT_POINTS_PER_TRANSACTION;
  const runIds = new Map<number, number>();
  let copiedPoints = 0;
  let batch: Array<{ sourceId: number; run: RunImport }> = [];
  let batchPoints = 0;
  const flush = async () => {
    if (batch.length === 0) return;
    const ids = await target.importRuns(batch.map((entry) => entry.run));
    batch.forEach((entry, i) => runIds.set(entry.sourceId, ids[i]));
    batch = [];
    batchPoints = 0;
    options.onProgress?.(runIds.size, toCopy.length);
  };
  for (const summary of toCopy) {
    const exported = await source.exportRun(summary.id);
    const run = remapped(exported, builds.ids.get(exported.run.buildId)!, await targetScheduleOf(exported.run.scheduleId));
    if (batch.length > 0 && batchPoints + run.points.length > limit) await flush();
    batch.push({ sourceId: summary.id, run });
    batchPoints += run.points.length;
    copiedPoints += run.points.length;
  }
  await flush();
  return { copiedRuns: runIds.size, copiedPoints, designs: designs.counts, builds: builds.counts, skippedRuns, runIds };
}

/** The run with the target's build and schedule ids; the owner is not copied (nobody drives the copy). */
function remapped(exported: RunTransfer, buildId: number, scheduleId: number | null): RunImport {
  // The spread keeps the run's kind with its request, which the type cannot follow through it.
  return { ...exported, run: { ...exported.run, buildId, scheduleId, request: { ...exported.run.request, buildId } } as StoredRun };
}

async function copyDesigns(source: RolloffStore, target: RolloffStore) {
  const all = await source.listDesigns();
  const present = await target.idsOfUids('design', all.map((design) => design.uid));
  const ids = new Map<number, number>();
  for (const { id, ...design } of all) ids.set(id, present.get(design.uid) ?? (await target.importDesign(design)));
  return { ids, counts: { copied: all.length - present.size, alreadyThere: present.size } };
}

async function copyBuilds(source: RolloffStore, target: RolloffStore, designIds: Map<number, number>) {
  const all = await source.listBuilds();
  const present = await target.idsOfUids('build', all.map((build) => build.uid));
  const ids = new Map<number, number>();
  for (const { id, ...build } of all) ids.set(id, present.get(build.uid) ?? (await target.importBuild({ ...build, designId: designIds.get(build.designId)! })));
  return { ids, counts: { copied: all.length - present.size, alreadyThere: present.size } };
}
