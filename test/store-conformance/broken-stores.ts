/**
 * Deliberately broken in-memory stores, to show the conformance suite can fail:
 * each wraps a correct SQLite ':memory:' store and breaks one guarantee.
 */
import { DuplicateStepError, SqliteStore, type NewPoint, type RolloffStore, type StoreOpenOptions } from '../../app/store';
import type { PointColumns } from '../../app/contract/contract';
import { checkBenchToReserve, checkRunClaimant } from '../../app/store/record-checks';

type Overrides = (inner: RolloffStore, options?: Pick<StoreOpenOptions, 'now'>) => Partial<RolloffStore>;

function broken(overrides: Overrides): (options?: Pick<StoreOpenOptions, 'now'>) => Promise<RolloffStore> {
  return async (options) => {
    const inner = SqliteStore.open(':memory:', options);
    const replaced = overrides(inner, options) as Record<PropertyKey, unknown>;
    return new Proxy(inner, {
      get(target, property) {
        if (property in replaced) return replaced[property];
        const value = Reflect.get(target, property, target);
        return typeof value === 'function' ? value.bind(target) : value;
      },
    });
  };
}

const COLUMNS = ['step', 'stimulus', 'amplitudeVpp', 'gainDb', 'gainUncertaintyDb', 'phaseDeg', 'phaseUncertaintyDeg', 'outputV', 'flags', 'measuredAt'] as const;

function reorder(columns: PointColumns, order: number[]): PointColumns {
  const result = {} as Record<string, unknown[]>;
  for (const name of COLUMNS) result[name] = order.map((i) => (columns[name] as unknown[])[i]);
  return result as unknown as PointColumns;
}

/** A correct store behind the same wrapper: the wrapper alone must not fail a check. */
export const unbrokenStore = broken(() => ({}));

/** Accepts a second point for a stored step and returns both. */
export const storesPointTwice = broken((inner) => {
  const extra = new Map<number, NewPoint[]>();
  return {
    async insertPoint(runId, point, condition) {
      try {
        await inner.insertPoint(runId, point, condition);
      } catch (error) {
        if (!(error instanceof DuplicateStepError)) throw error;
        extra.set(runId, [...(extra.get(runId) ?? []), point]);
      }
    },
    async loadPoints(runId) {
      const columns = await inner.loadPoints(runId);
      for (const point of extra.get(runId) ?? []) {
        const at = columns.step.findIndex((step) => step > point.step);
        const index = at < 0 ? columns.step.length : at;
        for (const name of COLUMNS) {
          const value = name === 'measuredAt' ? new Date(point.measuredAt ?? 0).toISOString() : (point[name] as number);
          (columns[name] as unknown[]).splice(index, 0, value);
        }
      }
      return columns;
    },
  };
});

/** Returns points in the order they were stored, not in step order. */
export const dropsStepOrder = broken((inner) => {
  const stored = new Map<number, number[]>();
  const note = (runId: number, steps: number[]) => stored.set(runId, [...(stored.get(runId) ?? []), ...steps]);
  return {
    async insertPoint(runId, point, condition) {
      await inner.insertPoint(runId, point, condition);
      note(runId, [point.step]);
    },
    async insertPoints(runId, points) {
      await inner.insertPoints(runId, points);
      note(runId, points.map((p) => p.step));
    },
    async loadPoints(runId) {
      const columns = await inner.loadPoints(runId);
      const order = (stored.get(runId) ?? []).map((step) => columns.step.indexOf(step));
      return order.length === columns.step.length ? reorder(columns, order) : columns;
    },
  };
});

/** Stores a batch point by point, so a refused point leaves the ones before it stored. */
export const halfAppliesBatches = broken((inner) => ({
  async insertPoints(runId, points) {
    for (const point of points) await inner.insertPoint(runId, point);
  },
  async insertPointsOfRuns(batches) {
    for (const { runId, points } of batches) for (const point of points) await inner.insertPoint(runId, point);
  },
}));

/** Starts a run by looking for a live owner on the bench and then creating and claiming, in separate steps: two starts can both see a free bench. */
export const checksBenchThenCreates = broken((inner, options) => ({
  async createOwnedRun(input, claimant, staleAfterMs) {
    checkRunClaimant(claimant, staleAfterMs);
    const bench = checkBenchToReserve(input.benchName);
    const nowMs = Date.parse(options?.now?.() ?? new Date().toISOString()); // the store's clock, as the real check uses
    for (const summary of await inner.listRuns({ bench })) {
      const ownership = await inner.getRunOwnership(summary.id);
      if (ownership && nowMs - Date.parse(ownership.heartbeatAt) <= staleAfterMs) return { created: false, benchHeldBy: { runId: summary.id, ownership } };
    }
    const run = await inner.createRun(input);
    const claim = await inner.claimRun(run.id, claimant, staleAfterMs);
    return { created: true, run, ownership: claim.ownership };
  },
}));

/** Writes an owner's status and points whether it still owns the run or not (as a store checking ownership apart from the write would, in a race). */
export const ignoresOwnerCondition = broken((inner) => ({
  async updateRunStatus(runId, status, at) {
    return inner.updateRunStatus(runId, status, at);
  },
  async insertPoint(runId, point) {
    await inner.insertPoint(runId, point);
  },
}));

/** Resumes a run by claiming it and checking its bench in separate steps: two resumes on one bench can both see it free. */
export const claimsThenChecksBench = broken((inner, options) => ({
  async claimRunOnFreeBench(runId, claimant, staleAfterMs, benchOfUnnamedRun) {
    checkRunClaimant(claimant, staleAfterMs);
    const unnamedBench = checkBenchToReserve(benchOfUnnamedRun);
    const run = await inner.getRun(runId);
    const bench = run.benchName || unnamedBench;
    const nowMs = Date.parse(options?.now?.() ?? new Date().toISOString()); // the store's clock, as the real check uses
    for (const summary of await inner.listRuns({ bench })) {
      const ownership = summary.id === runId ? undefined : await inner.getRunOwnership(summary.id);
      if (ownership && nowMs - Date.parse(ownership.heartbeatAt) <= staleAfterMs) return { claimed: false, benchHeldBy: { runId: summary.id, ownership } };
    }
    return inner.claimRun(runId, claimant, staleAfterMs);
  },
}));

/** Resumes a run with claimRun alone: the bench is never checked, so a resume can start beside a live run of the same bench. */
export const resumesWithoutBenchCheck = broken((inner) => ({
  async claimRunOnFreeBench(runId, claimant, staleAfterMs) {
    return inner.claimRun(runId, claimant, staleAfterMs);
  },
}));

/** Adds an owner's event lines whether it still owns the run or not. */
export const ignoresOwnerConditionOnEvents = broken((inner) => ({
  async appendEvent(runId, level, message, at) {
    return inner.appendEvent(runId, level, message, at);
  },
}));

/** Stores an owner's noise records whether it still owns the run or not (its points keep the condition). */
export const ignoresOwnerConditionOnNoiseRecords = broken((inner) => ({
  async insertNoiseRecord(runId, record) {
    await inner.insertNoiseRecord(runId, record);
  },
}));

/** Keeps a noise record's spectrum as 32-bit floats: close, but not the numbers measured. */
export const roundsNoiseSpectra = broken((inner) => ({
  async loadNoiseRecords(runId) {
    const records = await inner.loadNoiseRecords(runId);
    return { ...records, psdV2PerHz: records.psdV2PerHz.map((psd) => (psd ? psd.map(Math.fround) : psd)) };
  },
}));
