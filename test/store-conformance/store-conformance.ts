/**
 * The store conformance suite: what every RolloffStore implementation must do,
 * written against the interface only (app/store/store-interface.ts). SQLite runs
 * it in test/store-conformance/sqlite.test.ts; the PostgreSQL store runs the same
 * checks unchanged. broken-stores.test.ts shows the checks fail a store that
 * stores a point twice, loses the step order, or half-applies a batch.
 *
 * Use: describeStoreConformance('my store', (options) => openAnEmptyStore(options)).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { ValidationError } from '../../app/errors';
import { DuplicateStepError, RecordNotFoundError, RunTakenOverError, type RolloffStore, type StoreOpenOptions, type StoredRun } from '../../app/store';
import { newNoiseRun, newRun, noisePlan, noiseRecord, noiseRequest, plan, point, request, seedRun } from './fixtures';
import { benchKey } from '../../app/bench/bench-key';

/** Opens a new, empty store; `now` (when given) is the clock for every timestamp the store writes. */
export type OpenFreshStore = (options?: Pick<StoreOpenOptions, 'now'>) => Promise<RolloffStore>;

export interface ConformanceCheck {
  name: string;
  run(open: OpenFreshStore): Promise<void>;
}

/** RFC 4122 §4.4 version 4 (random) UUID text: version nibble 4, variant bits 10. */
const UUID_V4 = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

/** A fresh store on a clock the check moves (advanceMs), one seeded run, and two claimants on two hosts. */
async function ownedRunSetting(open: OpenFreshStore) {
  let nowMs = Date.UTC(2026, 0, 1, 12, 0, 0);
  const store = await open({ now: () => new Date(nowMs).toISOString() });
  const { run } = await seedRun(store);
  const first = { ownerId: 'host-a:100:x', pid: 100, host: 'host-a', label: 'rolloff (command line)' };
  const second = { ownerId: 'host-b:200:y', pid: 200, host: 'host-b', label: 'rolloff serve' };
  return { store, run, first, second, advanceMs: (ms: number) => void (nowMs += ms) };
}

/** Every check, in order. Each opens its own fresh store(s). */
export const STORE_CONFORMANCE_CHECKS: readonly ConformanceCheck[] = [
  {
    name: 'round-trips points as columns in step order, with NaN for missing values',
    async run(open) {
      const store = await open();
      const { run } = await seedRun(store);
      for (const step of [2, 0, 1]) await store.insertPoint(run.id, point(step, step === 1 ? { gainDb: Number.NaN, flags: 1 | 4 } : {}));
      const columns = await store.loadPoints(run.id);
      expect(columns.step).toEqual([0, 1, 2]);
      expect(columns.stimulus[2]).toBeCloseTo(10 * 10 ** 0.2, 12);
      expect(Number.isNaN(columns.gainDb[1])).toBe(true);
      expect(columns.gainDb[2]).toBeCloseTo(19.8, 12);
      expect(columns.flags).toEqual([0, 5, 0]);
      expect(columns.outputV.every(Number.isNaN)).toBe(true);
      expect(columns.measuredAt[1]).toBe('2026-01-01T00:00:01.000Z');
      // Times are kept as UTC instants: an offset given on the way in comes back as Z (ISO 8601 equivalence).
      await store.insertPoint(run.id, point(3, { measuredAt: '2026-01-01T02:00:00+02:00' }));
      expect((await store.loadPoints(run.id)).measuredAt[3]).toBe('2026-01-01T00:00:00.000Z');
      expect((await store.listRuns())[0].pointCount).toBe(4);
      expect(await store.nextStep(run.id)).toBe(4);
    },
  },
  {
    name: 'returns points in step order whatever order they were stored in, each column aligned with its step',
    async run(open) {
      const store = await open();
      const { run } = await seedRun(store);
      // A fixed permutation of 0..40 (multiplying by 17 modulo 41, a prime, visits every step once).
      const order = Array.from({ length: 41 }, (_, i) => (i * 17) % 41);
      for (const step of order.slice(0, 20)) await store.insertPoint(run.id, point(step));
      await store.insertPoints(run.id, order.slice(20).map((step) => point(step)));
      const columns = await store.loadPoints(run.id);
      expect(columns.step).toEqual(Array.from({ length: 41 }, (_, i) => i));
      for (let i = 0; i < 41; i++) {
        expect(columns.gainDb[i]).toBeCloseTo(point(i).gainDb, 12);
        expect(columns.phaseDeg[i]).toBeCloseTo(point(i).phaseDeg, 12);
      }
      expect(await store.nextStep(run.id)).toBe(41);
    },
  },
  {
    name: 'refuses a duplicate step with DuplicateStepError and stores it only once',
    async run(open) {
      const store = await open();
      const { run } = await seedRun(store);
      expect(await store.nextStep(run.id)).toBe(0);
      await store.insertPoint(run.id, point(0));
      await store.insertPoint(run.id, point(1));
      await expect(store.insertPoint(run.id, point(1, { gainDb: 99 }))).rejects.toThrow(DuplicateStepError);
      const columns = await store.loadPoints(run.id);
      expect(columns.step).toEqual([0, 1]);
      expect(columns.gainDb[1]).toBeCloseTo(19.9, 12);
      expect((await store.getRun(run.id)).pointCount).toBe(2);
      expect(await store.nextStep(run.id)).toBe(2);
      // A batch containing a stored step is refused whole.
      await expect(store.insertPoints(run.id, [point(2), point(1)])).rejects.toThrow(DuplicateStepError);
      expect((await store.loadPoints(run.id)).step).toEqual([0, 1]);
      expect((await store.getRun(run.id)).pointCount).toBe(2);
    },
  },
  {
    name: 'applies bulk work all or nothing: createRuns and insertPointsOfRuns',
    async run(open) {
      const store = await open();
      const { build } = await seedRun(store);
      const runs = await store.createRuns([newRun(build.id, { notes: 'bulk a' }), newRun(build.id, { notes: 'bulk b' })]);
      expect(runs.map((r) => r.notes)).toEqual(['bulk a', 'bulk b']);
      expect(runs[1].id).toBeGreaterThan(runs[0].id);
      await expect(store.createRuns([newRun(build.id, { notes: 'never' }), newRun(999)])).rejects.toThrow(RecordNotFoundError);
      expect((await store.listRuns({ search: 'never' }))).toEqual([]);

      const [a, b] = runs;
      await store.insertPointsOfRuns([
        { runId: a.id, points: [point(0), point(1)] },
        { runId: b.id, points: [point(0)] },
      ]);
      // The second batch repeats a stored step: nothing of the call is stored, the first batch included.
      await expect(store.insertPointsOfRuns([
        { runId: b.id, points: [point(1), point(2)] },
        { runId: a.id, points: [point(1)] },
      ])).rejects.toThrow(DuplicateStepError);
      expect((await store.loadPoints(a.id)).step).toEqual([0, 1]);
      expect((await store.loadPoints(b.id)).step).toEqual([0]);
      expect((await store.getRun(a.id)).pointCount).toBe(2);
      expect((await store.getRun(b.id)).pointCount).toBe(1);
    },
  },
  {
    name: 'refuses bad points and unknown runs with the place named',
    async run(open) {
      const store = await open();
      const { run } = await seedRun(store);
      await expect(store.insertPoint(run.id, point(-1))).rejects.toThrow(/point.step/);
      await expect(store.insertPoint(run.id, point(0, { stimulus: Number.NaN }))).rejects.toThrow(/point.stimulus/);
      await expect(store.insertPoint(run.id, point(0, { flags: 1.5 }))).rejects.toThrow(ValidationError);
      await expect(store.insertPoint(run.id, point(0, { measuredAt: 'yesterday' }))).rejects.toThrow(/point.measuredAt/);
      await expect(store.insertPoint(999, point(0))).rejects.toThrow(RecordNotFoundError);
      // In a list, the point refused is named by its place, and nothing of the list is stored.
      await expect(store.insertPoints(run.id, [point(0), point(1), point(2, { amplitudeVpp: Number.POSITIVE_INFINITY })])).rejects.toThrow(/^points\[2\]\.amplitudeVpp: Infinity is not a finite number/);
      await expect(store.insertPointsOfRuns([
        { runId: run.id, points: [point(0)] },
        { runId: run.id, points: [point(1), point(2, { step: 2.5 })] },
      ])).rejects.toThrow(/^batches\[1\]\.points\[1\]\.step: 2\.5 is not a whole number/);
      await expect(store.insertPointsOfRuns([{ runId: run.id, points: [point(0, { measuredAt: 'soon' })] }])).rejects.toThrow(/^batches\[0\]\.points\[0\]\.measuredAt: "soon" is not a date and time/);
      await expect(store.loadPoints(999)).rejects.toThrow(/run 999 does not exist/);
      await expect(store.nextStep(999)).rejects.toThrow(RecordNotFoundError);
      await expect(store.nextStep(0)).rejects.toThrow(/runId/);
      expect((await store.loadPoints(run.id)).step).toEqual([]);
    },
  },
  {
    name: 'stores designs and builds and converts rows to contract records',
    async run(open) {
      const store = await open({ now: () => '2026-02-03T04:05:06.000Z' });
      const { design, build } = await seedRun(store);
      expect(design).toEqual({ id: design.id, uid: expect.stringMatching(UUID_V4), name: 'inverting ×10 (demo, invented)', design: { parts: [{ id: 'R1', value: 1e3 }] }, createdAt: '2026-02-03T04:05:06.000Z' });
      expect(build.uid).toMatch(UUID_V4);
      expect(await store.getDesign(design.id)).toEqual(design);
      expect(await store.getBuild(build.id)).toEqual(build);
      expect(await store.listBuilds(design.id)).toEqual([build]);
      expect(build).toMatchObject({ designId: design.id, label: 'board 1', notes: 'hand soldered', actualValues: { R1: 998.2 } });
      expect(await store.listDesigns()).toHaveLength(1);
      await expect(store.getDesign(42)).rejects.toThrow(RecordNotFoundError);
      await expect(store.getBuild(42)).rejects.toThrow(RecordNotFoundError);
      await expect(store.createBuild({ designId: 42, label: 'x', notes: '', actualValues: {} })).rejects.toThrow(/design 42/);
      await expect(store.createBuild({ designId: design.id, label: '  ', notes: '', actualValues: {} })).rejects.toThrow(/build.label/);
      await expect(store.createBuild({ designId: design.id, label: 'x', notes: '', actualValues: { R1: Number.NaN } })).rejects.toThrow(/build.actualValues.R1/);
      await expect(store.saveDesign({ name: '', design: {} })).rejects.toThrow(/design.name/);
    },
  },
  {
    name: 'moves runs through their statuses with start and end times, and stores results',
    async run(open) {
      let clock = 0;
      const store = await open({ now: () => new Date(Date.UTC(2026, 0, 1, 0, 0, clock++)).toISOString() });
      const { run } = await seedRun(store);
      expect(run.status).toBe('planned');
      expect(run.plannedCount).toBe(41);
      expect(run.simulated).toBe(true);
      expect(run.plan).toEqual(plan);
      expect(run.startedAt).toBeNull();
      const started = await store.updateRunStatus(run.id, 'running');
      expect(started.startedAt).not.toBeNull();
      const paused = await store.updateRunStatus(run.id, 'paused');
      expect(paused.startedAt).toBe(started.startedAt);
      expect((await store.findInterruptedRuns(10_000)).map((r) => r.id)).toEqual([run.id]);
      await store.updateRunStatus(run.id, 'running');
      const done = await store.updateRunStatus(run.id, 'done');
      expect(done.startedAt).toBe(started.startedAt);
      expect(done.endedAt).not.toBeNull();
      expect(await store.findInterruptedRuns(10_000)).toEqual([]);
      const withResults = await store.setRunResults(run.id, { minus3dbHz: [15.9e3], passbandGainDb: 19.98 }, { pass: true, reasons: [] });
      expect(withResults.figures).toEqual({ minus3dbHz: [15.9e3], passbandGainDb: 19.98 });
      expect(withResults.verdict).toEqual({ pass: true, reasons: [] });
      expect(withResults.kind !== 'noise' && withResults.request.from).toBe(10);
      expect(await store.getRun(run.id)).toEqual(withResults);
      await expect(store.updateRunStatus(run.id, 'exploded' as never)).rejects.toThrow(/not a run status/);
      await expect(store.updateRunStatus(77, 'done')).rejects.toThrow(RecordNotFoundError);
      await expect(store.getRun(77)).rejects.toThrow(RecordNotFoundError);
    },
  },
  {
    name: 'lists runs newest first, filtered by text, status and build',
    async run(open) {
      const store = await open();
      const a = await seedRun(store, 'board 1', 'first light');
      const b = await seedRun(store, 'board 2 (100% reflowed)', 'after rework');
      await store.updateRunStatus(b.run.id, 'running');
      expect((await store.listRuns()).map((r) => r.id)).toEqual([b.run.id, a.run.id]);
      expect((await store.listRuns({ search: 'rework' })).map((r) => r.id)).toEqual([b.run.id]);
      expect((await store.listRuns({ search: 'BOARD 1' })).map((r) => r.id)).toEqual([a.run.id]);
      expect(await store.listRuns({ search: 'inverting' })).toHaveLength(2);
      expect((await store.listRuns({ search: '100%' })).map((r) => r.id)).toEqual([b.run.id]); // % is literal, not a wildcard
      expect(await store.listRuns({ search: '1%' })).toHaveLength(0);
      expect((await store.listRuns({ status: 'running' })).map((r) => r.id)).toEqual([b.run.id]);
      expect((await store.listRuns({ buildId: a.build.id })).map((r) => r.id)).toEqual([a.run.id]);
      expect(await store.listRuns({ limit: 1 })).toHaveLength(1);
      expect((await store.listRuns())[0]).toMatchObject({ buildLabel: 'board 2 (100% reflowed)', designName: 'inverting ×10 (demo, invented)', kind: 'ac' });
      await expect(store.listRuns({ limit: 0 })).rejects.toThrow(/filter.limit/);
    },
  },
  {
    name: 'appends and lists run events in order, records instruments, calibrations and schedules',
    async run(open) {
      const store = await open();
      const { run, build } = await seedRun(store);
      await store.appendEvent(run.id, 'info', 'sweep started', '2026-01-01T00:00:00.000Z');
      await store.appendEvent(run.id, 'warning', 'step 3 retried');
      await store.appendEvent(run.id, 'info', 'sweep finished', '2025-12-31T00:00:00.000Z'); // an earlier stamp still lists last: append order
      expect((await store.listEvents(run.id)).map((e) => e.message)).toEqual(['sweep started', 'step 3 retried', 'sweep finished']);
      expect((await store.listEvents(run.id)).map((e) => e.level)).toEqual(['info', 'warning', 'info']);
      await expect(store.appendEvent(run.id, 'loud' as never, 'x')).rejects.toThrow(/event.level/);
      await expect(store.appendEvent(555, 'info', 'x')).rejects.toThrow(RecordNotFoundError);

      const identity = { manufacturer: 'Rolloff simulated bench', model: 'generator (simulated)', serialNumber: '0001', firmware: '1.0' };
      const first = await store.recordInstrument({ role: 'generator', identity, address: 'tcp://127.0.0.1:5025', at: '2026-01-01T00:00:00.000Z' });
      const later = await store.recordInstrument({ role: 'generator', identity, address: 'tcp://127.0.0.1:5025', at: '2026-01-02T00:00:00.000Z' });
      expect(later.id).toBe(first.id);
      expect(later.firstSeenAt).toBe('2026-01-01T00:00:00.000Z');
      expect(later.lastSeenAt).toBe('2026-01-02T00:00:00.000Z');
      expect(await store.listInstruments()).toHaveLength(1);

      expect(await store.latestCalibration('generator=a;meter=b')).toBeUndefined();
      await store.saveCalibration({ instrumentPairKey: 'generator=a;meter=b', bench: [], frequencyHz: [10, 100], gainDb: [0.01, 0.02], phaseDeg: [0, -0.1] });
      const newest = await store.saveCalibration({ instrumentPairKey: 'generator=a;meter=b', bench: [], frequencyHz: [10, 100], gainDb: [0.03, 0.04], phaseDeg: [0, -0.2] });
      expect(await store.latestCalibration('generator=a;meter=b')).toEqual(newest);
      expect(await store.latestCalibration('generator=c;meter=b')).toBeUndefined();
      await expect(store.saveCalibration({ instrumentPairKey: 'generator=c;meter=d', bench: [], frequencyHz: [10, 100], gainDb: [0], phaseDeg: [0, 0] })).rejects.toThrow(/gainDb has 1/);

      const schedule = await store.createSchedule({ buildId: build.id, request, everyMinutes: 30, count: 16 });
      expect(await store.getSchedule(schedule.id)).toMatchObject({ buildId: build.id, everyMinutes: 30, count: 16, until: null });
      await expect(store.getSchedule(999)).rejects.toThrow(RecordNotFoundError);
      await expect(store.createSchedule({ buildId: build.id, request, everyMinutes: 30 })).rejects.toThrow(/neither a run count nor an end time/);
      await expect(store.createSchedule({ buildId: build.id, request, everyMinutes: 0, count: 1 })).rejects.toThrow(/everyMinutes/);
      await expect(store.createSchedule({ buildId: build.id, request, everyMinutes: 5, until: 'tomorrow-ish' })).rejects.toThrow(/schedule.until/);
      const scheduled = await store.createRun(newRun(build.id, { kind: 'dc', request, scheduleId: schedule.id, simulated: false }));
      expect(scheduled.scheduleId).toBe(schedule.id);
      expect(scheduled.simulated).toBe(false);
      await expect(store.createRun(newRun(build.id, { kind: 'xx' as never }))).rejects.toThrow(/run.kind/);
    },
  },
  {
    name: 'records the bench that drove each run and lists the runs of one bench',
    async run(open) {
      const store = await open();
      const { build, run: unnamed } = await seedRun(store);
      const three = await store.createRun(newRun(build.id, { benchName: ' bench 3 ' }));
      const seven = await store.createRun(newRun(build.id, { benchName: 'bench 7' }));
      expect(unnamed.benchName).toBe(''); // not known: stored before benches had names, or by a caller that does not say
      expect(three.benchName).toBe('bench 3');
      expect((await store.getRun(seven.id)).benchName).toBe('bench 7');
      expect((await store.listRuns({ bench: 'bench 3' })).map((r) => [r.id, r.benchName])).toEqual([[three.id, 'bench 3']]); // the summary names its bench
      expect((await store.listRuns({ bench: 'bench' })).map((r) => r.id)).toEqual([]); // exact name, not a substring
      expect(await store.listRuns()).toHaveLength(3);
      await expect(store.createRun(newRun(build.id, { benchName: 'x'.repeat(65) }))).rejects.toThrow(/run.benchName/);
      await expect(store.createRun(newRun(build.id, { benchName: 'bench\u00073' }))).rejects.toThrow(/control characters/);
    },
  },
  {
    name: 'keeps settings per bench, replaced whole on save; the simulated and real benches of one name and two names are four benches',
    async run(open) {
      let now = '2026-03-04T05:06:07.000Z';
      const store = await open({ now: () => now });
      const real = benchKey({ name: 'bench A', simulated: false });
      const simulated = benchKey({ name: 'bench A', simulated: true });
      const otherReal = benchKey({ name: 'bench B', simulated: false });
      expect(await store.getBenchSettings(real)).toBeUndefined();
      const saved = await store.saveBenchSettings(simulated, { maxStimulusVpp: 20 });
      expect(saved).toEqual({ benchKey: simulated, maxStimulusVpp: 20, updatedAt: '2026-03-04T05:06:07.000Z' });
      expect(await store.getBenchSettings(simulated)).toEqual(saved);
      // Neither the real instruments of the same bench nor another bench inherit anything.
      expect(await store.getBenchSettings(real)).toBeUndefined();
      expect(await store.getBenchSettings(otherReal)).toBeUndefined();
      now = '2026-03-05T00:00:00.000Z';
      await store.saveBenchSettings(real, { maxStimulusVpp: 0.5 });
      await store.saveBenchSettings(otherReal, { maxStimulusVpp: 1 });
      expect((await store.getBenchSettings(simulated))?.maxStimulusVpp).toBe(20);
      expect(await store.getBenchSettings(real)).toEqual({ benchKey: real, maxStimulusVpp: 0.5, updatedAt: '2026-03-05T00:00:00.000Z' });
      expect((await store.getBenchSettings(otherReal))?.maxStimulusVpp).toBe(1);
      now = '2026-03-06T00:00:00.000Z';
      expect(await store.saveBenchSettings(real, { maxStimulusVpp: null })).toEqual({ benchKey: real, maxStimulusVpp: null, updatedAt: '2026-03-06T00:00:00.000Z' });
      await expect(store.saveBenchSettings(real, { maxStimulusVpp: -1 })).rejects.toThrow(/maxStimulusVpp/);
      await expect(store.saveBenchSettings(real, { maxStimulusVpp: Number.NaN })).rejects.toThrow(/maxStimulusVpp/);
      await expect(store.saveBenchSettings('', { maxStimulusVpp: 1 })).rejects.toThrow(/benchKey/);
      expect((await store.getBenchSettings(real))?.maxStimulusVpp).toBeNull(); // the refused saves changed nothing
      expect((await store.getBenchSettings(simulated))?.maxStimulusVpp).toBe(20);
    },
  },
  {
    name: 'run ownership: one owner at a time, heartbeat renewed, stale owner taken over, release; interrupted means no live owner',
    async run(open) {
      let nowMs = Date.UTC(2026, 0, 1, 12, 0, 0);
      const store = await open({ now: () => new Date(nowMs).toISOString() });
      const { run } = await seedRun(store);
      const first = { ownerId: 'host-a:100:x', pid: 100, host: 'host-a', label: 'rolloff sweep' };
      const second = { ownerId: 'host-b:200:y', pid: 200, host: 'host-b', label: 'the desktop window' };
      expect(await store.getRunOwnership(run.id)).toBeUndefined();
      const taken = await store.claimRun(run.id, first, 10_000);
      expect(taken).toEqual({ claimed: true, ownership: { ...first, since: '2026-01-01T12:00:00.000Z', heartbeatAt: '2026-01-01T12:00:00.000Z' } });
      await store.updateRunStatus(run.id, 'running');
      nowMs += 3_000;
      expect(await store.renewRunHeartbeat(run.id, first.ownerId)).toBe(true);
      expect(await store.renewRunHeartbeat(run.id, second.ownerId)).toBe(false); // not the owner: nothing renewed
      nowMs += 9_000; // 9 s after the last heartbeat: still live
      const refused = await store.claimRun(run.id, second, 10_000);
      expect(refused.claimed).toBe(false);
      expect(refused.ownership).toMatchObject({ ...first, heartbeatAt: '2026-01-01T12:00:03.000Z' });
      expect(await store.findInterruptedRuns(10_000)).toEqual([]); // running and live: not interrupted
      nowMs += 2_000; // 11 s since the heartbeat: stale
      expect((await store.findInterruptedRuns(10_000)).map((r) => r.id)).toEqual([run.id]);
      const takeOver = await store.claimRun(run.id, second, 10_000);
      expect(takeOver).toEqual({ claimed: true, ownership: { ...second, since: '2026-01-01T12:00:14.000Z', heartbeatAt: '2026-01-01T12:00:14.000Z' } });
      expect(await store.renewRunHeartbeat(run.id, first.ownerId)).toBe(false); // the old owner learns it lost the run
      expect(await store.findInterruptedRuns(10_000)).toEqual([]);
      nowMs += 1_000;
      const again = await store.claimRun(run.id, second, 10_000); // re-claiming one's own run keeps since
      expect(again.ownership.since).toBe('2026-01-01T12:00:14.000Z');
      expect(again.ownership.heartbeatAt).toBe('2026-01-01T12:00:15.000Z');
      await store.releaseRun(run.id, first.ownerId); // not the owner: no-op
      expect((await store.getRunOwnership(run.id))?.ownerId).toBe(second.ownerId);
      await store.releaseRun(run.id, second.ownerId);
      expect(await store.getRunOwnership(run.id)).toBeUndefined();
      expect((await store.findInterruptedRuns(10_000)).map((r) => r.id)).toEqual([run.id]); // running, nobody drives it
      await expect(store.claimRun(77, first, 10_000)).rejects.toThrow(RecordNotFoundError);
      await expect(store.getRunOwnership(77)).rejects.toThrow(RecordNotFoundError);
      await expect(store.claimRun(run.id, { ...first, pid: 0 }, 10_000)).rejects.toThrow(/claimant.pid/);
      await expect(store.claimRun(run.id, { ...first, ownerId: ' ' }, 10_000)).rejects.toThrow(/claimant.ownerId/);
      await expect(store.claimRun(run.id, first, 0)).rejects.toThrow(/staleAfterMs/);
    },
  },
  {
    name: 'run ownership: listRuns and getRun carry the recorded owner (who, since, heartbeat) while claimed, null once released',
    async run(open) {
      let nowMs = Date.UTC(2026, 0, 1, 12, 0, 0);
      const store = await open({ now: () => new Date(nowMs).toISOString() });
      const { run, build } = await seedRun(store);
      const other = await store.createRun(newRun(build.id));
      const claimant = { ownerId: 'host-a:100:x', pid: 100, host: 'host-a', label: 'rolloff serve' };
      expect((await store.listRuns()).map((r) => r.owner)).toEqual([null, null]);
      expect((await store.getRun(run.id)).owner).toBeNull();
      await store.claimRun(run.id, claimant, 10_000);
      nowMs += 2_500;
      await store.renewRunHeartbeat(run.id, claimant.ownerId);
      const expected = { ...claimant, since: '2026-01-01T12:00:00.000Z', heartbeatAt: '2026-01-01T12:00:02.500Z' };
      const listed = await store.listRuns();
      expect(listed.find((r) => r.id === run.id)?.owner).toEqual(expected);
      expect(listed.find((r) => r.id === other.id)?.owner).toBeNull(); // only the claimed run
      expect((await store.getRun(run.id)).owner).toEqual(expected);
      expect((await store.listRuns({ status: 'planned' })).map((r) => r.owner?.ownerId ?? null).sort()).toEqual([claimant.ownerId, null].sort());
      await store.releaseRun(run.id, claimant.ownerId);
      expect((await store.getRun(run.id)).owner).toBeNull();
      expect((await store.listRuns()).map((r) => r.owner)).toEqual([null, null]);
    },
  },
  {
    name: 'run ownership: an owner\'s status and point writes apply only while it owns the run; after a take-over or release they are refused and change nothing',
    async run(open) {
      const { store, run, first, second, advanceMs } = await ownedRunSetting(open);
      // Not claimed yet: an owner's write is refused; an unconditional one (a store without owners in mind) is not.
      await expect(store.updateRunStatus(run.id, 'running', undefined, { asOwner: first.ownerId })).rejects.toThrow(RunTakenOverError);
      await store.claimRun(run.id, first, 10_000);
      expect((await store.updateRunStatus(run.id, 'running', undefined, { asOwner: first.ownerId })).status).toBe('running');
      await store.insertPoint(run.id, point(0), { asOwner: first.ownerId });
      advanceMs(11_000); // first's heartbeat is stale: second takes the run over and drives it
      expect((await store.claimRun(run.id, second, 10_000)).claimed).toBe(true);
      await store.insertPoint(run.id, point(1), { asOwner: second.ownerId });

      // The old owner wakes up: its pause and its next point are refused, naming who drives the run now.
      const pause = store.updateRunStatus(run.id, 'paused', undefined, { asOwner: first.ownerId });
      await expect(pause).rejects.toThrow(RunTakenOverError);
      await expect(pause).rejects.toThrow(/run \d+ was taken over by rolloff serve pid 200 on host-b/);
      await expect(pause).rejects.toMatchObject({ nowOwnedBy: { pid: 200, host: 'host-b', label: 'rolloff serve' } });
      await expect(store.insertPoint(run.id, point(2), { asOwner: first.ownerId })).rejects.toThrow(RunTakenOverError);
      const after = await store.getRun(run.id);
      expect(after.status).toBe('running');
      expect(after.endedAt).toBeNull();
      expect(after.pointCount).toBe(2);
      expect((await store.loadPoints(run.id)).step).toEqual([0, 1]);
      expect(after.owner?.ownerId).toBe(second.ownerId);

      // The new owner's writes go through; once it releases the run, its own writes are refused too.
      expect((await store.updateRunStatus(run.id, 'done', undefined, { asOwner: second.ownerId })).status).toBe('done');
      await store.releaseRun(run.id, second.ownerId);
      await expect(store.updateRunStatus(run.id, 'failed', undefined, { asOwner: second.ownerId })).rejects.toMatchObject({ nowOwnedBy: undefined });
      await expect(store.insertPoint(run.id, point(2), { asOwner: second.ownerId })).rejects.toThrow(RunTakenOverError);
      expect((await store.getRun(run.id)).status).toBe('done');
      expect((await store.loadPoints(run.id)).step).toEqual([0, 1]);

      // Unknown runs are still RecordNotFoundError; an empty owner id is a ValidationError naming the field.
      await expect(store.updateRunStatus(777, 'running', undefined, { asOwner: first.ownerId })).rejects.toThrow(RecordNotFoundError);
      await expect(store.insertPoint(777, point(0), { asOwner: first.ownerId })).rejects.toThrow(RecordNotFoundError);
      await expect(store.insertPoint(777, point(0))).rejects.toThrow(RecordNotFoundError);
      await expect(store.updateRunStatus(run.id, 'running', undefined, { asOwner: '' })).rejects.toThrow(/condition.asOwner/);
    },
  },
  {
    name: 'run ownership: an owner\'s event lines are added only while it owns the run; after a take-over or release they are refused and add nothing',
    async run(open) {
      const { store, run, first, second, advanceMs } = await ownedRunSetting(open);
      await expect(store.appendEvent(run.id, 'info', 'before any claim', undefined, { asOwner: first.ownerId })).rejects.toThrow(RunTakenOverError);
      await store.claimRun(run.id, first, 10_000);
      expect(await store.appendEvent(run.id, 'info', 'sweep started', '2026-01-01T12:00:00.500Z', { asOwner: first.ownerId }))
        .toEqual({ at: '2026-01-01T12:00:00.500Z', level: 'info', message: 'sweep started' });
      advanceMs(11_000); // first's heartbeat is stale: second takes the run over
      expect((await store.claimRun(run.id, second, 10_000)).claimed).toBe(true);
      await store.appendEvent(run.id, 'info', 'sweep continued at step 1', undefined, { asOwner: second.ownerId });

      // The old owner wakes up: its line is refused, naming who drives the run now, and is not stored.
      const late = store.appendEvent(run.id, 'warning', 'link lost; reconnecting', undefined, { asOwner: first.ownerId });
      await expect(late).rejects.toThrow(RunTakenOverError);
      await expect(late).rejects.toMatchObject({ nowOwnedBy: { pid: 200, host: 'host-b', label: 'rolloff serve' } });
      await store.releaseRun(run.id, second.ownerId);
      await expect(store.appendEvent(run.id, 'info', 'after release', undefined, { asOwner: second.ownerId })).rejects.toMatchObject({ nowOwnedBy: undefined });
      await store.appendEvent(run.id, 'info', 'a line with no owner in mind'); // unconditional, as before
      expect((await store.listEvents(run.id)).map((e) => e.message)).toEqual(['sweep started', 'sweep continued at step 1', 'a line with no owner in mind']);

      await expect(store.appendEvent(777, 'info', 'x', undefined, { asOwner: first.ownerId })).rejects.toThrow(RecordNotFoundError);
      await expect(store.appendEvent(777, 'info', 'x')).rejects.toThrow(RecordNotFoundError);
      await expect(store.appendEvent(run.id, 'info', 'x', undefined, { asOwner: ' ' })).rejects.toThrow(/condition.asOwner/);
    },
  },
  {
    name: 'run ownership: of many claimants racing for one stale run at the same instant, exactly one wins',
    async run(open) {
      let nowMs = Date.UTC(2026, 0, 1, 12, 0, 0);
      const store = await open({ now: () => new Date(nowMs).toISOString() });
      const { run } = await seedRun(store);
      await store.claimRun(run.id, { ownerId: 'gone', pid: 1, host: 'h', label: 'crashed' }, 10_000);
      nowMs += 60_000; // the first owner died a minute ago; every claimant sees the same millisecond
      const claimants = Array.from({ length: 8 }, (_, i) => ({ ownerId: `claimant-${i}`, pid: 1000 + i, host: 'h', label: `claimant ${i}` }));
      const results = await Promise.all(claimants.map((c) => store.claimRun(run.id, c, 10_000)));
      const winners = results.filter((r) => r.claimed);
      expect(winners).toHaveLength(1);
      const owner = await store.getRunOwnership(run.id);
      expect(owner?.ownerId).toBe(winners[0].ownership.ownerId);
      for (const loser of results.filter((r) => !r.claimed)) expect(loser.ownership.ownerId).toBe(owner?.ownerId);
    },
  },
  {
    name: 'bench reservation: of many starts racing on one bench exactly one creates its run, owned; a live owner holds the bench until release or a stale heartbeat; other benches are free',
    async run(open) {
      let nowMs = Date.UTC(2026, 0, 1, 12, 0, 0);
      const store = await open({ now: () => new Date(nowMs).toISOString() });
      const { build } = await seedRun(store);
      const claimants = Array.from({ length: 8 }, (_, i) => ({ ownerId: `start-${i}`, pid: 3000 + i, host: 'h', label: `start ${i}` }));
      const onBench = (benchName: string, notes = '') => newRun(build.id, { benchName, notes });
      // As many reads at once first, so a store with a connection pool has its connections open and the starts truly overlap.
      await Promise.all(claimants.map(() => store.listRuns()));
      // Eight starts on one bench in the same millisecond, each from its own claimant (as from eight processes).
      const results = await Promise.all(claimants.map((c, i) => store.createOwnedRun(onBench('bench 3', `start ${i}`), c, 10_000)));
      const created = results.flatMap((r) => (r.created ? [r] : []));
      expect(created).toHaveLength(1);
      const [winner] = created;
      const winnerClaimant = claimants.find((c) => c.ownerId === winner.ownership.ownerId)!;
      expect(winner.ownership).toEqual({ ...winnerClaimant, since: '2026-01-01T12:00:00.000Z', heartbeatAt: '2026-01-01T12:00:00.000Z' });
      expect(winner.run).toMatchObject({ status: 'planned', benchName: 'bench 3', notes: `start ${claimants.indexOf(winnerClaimant)}`, plannedCount: 41 });
      expect(await store.getRunOwnership(winner.run.id)).toEqual(winner.ownership);
      for (const refused of results.filter((r) => !r.created)) expect(refused).toEqual({ created: false, benchHeldBy: { runId: winner.run.id, ownership: winner.ownership } });
      expect((await store.listRuns({ bench: 'bench 3' })).map((r) => r.id)).toEqual([winner.run.id]); // a refused start creates nothing

      // The owner's own live run holds the bench too (a second start from the same service).
      expect((await store.createOwnedRun(onBench('bench 3'), winnerClaimant, 10_000)).created).toBe(false);
      // Another bench is not held.
      const elsewhere = await store.createOwnedRun(onBench('bench 7'), claimants[0], 10_000);
      expect(elsewhere.created && elsewhere.run.benchName).toBe('bench 7');

      nowMs += 5_000;
      expect(await store.renewRunHeartbeat(winner.run.id, winnerClaimant.ownerId)).toBe(true);
      nowMs += 9_000; // 9 s after the renewal: live, still held
      expect((await store.createOwnedRun(onBench('bench 3'), claimants[1], 10_000)).created).toBe(false);
      nowMs += 2_000; // 11 s: stale, the bench is free (the stale run keeps its owner until taken over)
      const afterStale = await store.createOwnedRun(onBench('bench 3'), claimants[1], 10_000);
      expect(afterStale.created).toBe(true);
      if (!afterStale.created) return;
      expect((await store.getRunOwnership(winner.run.id))?.ownerId).toBe(winnerClaimant.ownerId);
      await store.releaseRun(afterStale.run.id, claimants[1].ownerId);
      const afterRelease = await store.createOwnedRun(onBench('bench 3'), claimants[2], 10_000);
      expect(afterRelease.created).toBe(true);

      await expect(store.createOwnedRun(newRun(build.id), claimants[3], 10_000)).rejects.toThrow(/run.benchName/); // a bench must be named
      await expect(store.createOwnedRun(onBench('bench 9'), { ...claimants[3], pid: 0 }, 10_000)).rejects.toThrow(/claimant.pid/);
      await expect(store.createOwnedRun(onBench('bench 9'), claimants[3], 0)).rejects.toThrow(/staleAfterMs/);
      await expect(store.createOwnedRun(newRun(999, { benchName: 'bench 9' }), claimants[3], 10_000)).rejects.toThrow(RecordNotFoundError);
      expect((await store.createOwnedRun(onBench('bench 9'), claimants[3], 10_000)).created).toBe(true); // the refused one held nothing
    },
  },
  {
    name: 'bench reservation on resume: claimRunOnFreeBench claims a run only while no other run of its bench has a live owner, checked with the claim; of resumes racing on one bench exactly one claims',
    async run(open) {
      let nowMs = Date.UTC(2026, 0, 1, 12, 0, 0);
      const store = await open({ now: () => new Date(nowMs).toISOString() });
      const { build, run: unnamed } = await seedRun(store);
      const claimants = Array.from({ length: 8 }, (_, i) => ({ ownerId: `resume-${i}`, pid: 4000 + i, host: 'h', label: `resume ${i}` }));
      const crashed = { ownerId: 'crashed', pid: 1, host: 'h', label: 'crashed sweep' };
      const onBench = (benchName: string) => store.createRun(newRun(build.id, { benchName }));
      // Two interrupted runs of bench 3 (their owner crashed a minute ago) and one of bench 7.
      const [left1, left2, left7] = [await onBench('bench 3'), await onBench('bench 3'), await onBench('bench 7')];
      for (const run of [left1, left2, left7]) await store.claimRun(run.id, crashed, 10_000);
      nowMs += 60_000;
      // Many resumes at once, each of either run of bench 3 and from its own claimant: the bench lets exactly one claim.
      await Promise.all(claimants.map(() => store.listRuns()));
      const racing = await Promise.all(claimants.map((c, i) => store.claimRunOnFreeBench(i % 2 === 0 ? left1.id : left2.id, c, 10_000, 'bench 9')));
      const won = racing.flatMap((r, i) => (r.claimed ? [{ result: r, claimant: claimants[i], runId: i % 2 === 0 ? left1.id : left2.id }] : []));
      expect(won).toHaveLength(1);
      const [{ result: winner, claimant: winnerClaimant, runId: heldRun }] = won;
      const otherRun = heldRun === left1.id ? left2.id : left1.id;
      expect(winner.ownership).toEqual({ ...winnerClaimant, since: '2026-01-01T12:01:00.000Z', heartbeatAt: '2026-01-01T12:01:00.000Z' });
      for (const [i, refused] of racing.entries()) {
        if (refused.claimed) continue;
        // Refused for the bench (the other run of bench 3) or for the run itself (its winner), never claimed.
        const runId = i % 2 === 0 ? left1.id : left2.id;
        if (runId === heldRun) expect(refused).toEqual({ claimed: false, ownership: winner.ownership });
        else expect(refused).toEqual({ claimed: false, benchHeldBy: { runId: heldRun, ownership: winner.ownership } });
      }
      expect((await store.getRunOwnership(otherRun))?.ownerId).toBe('crashed'); // a refused resume changes nothing

      // The claimant's own live run holds the bench too; another bench's run is free.
      expect(await store.claimRunOnFreeBench(otherRun, winnerClaimant, 10_000, 'bench 9')).toEqual({ claimed: false, benchHeldBy: { runId: heldRun, ownership: winner.ownership } });
      expect((await store.claimRunOnFreeBench(left7.id, claimants[0], 10_000, 'bench 9')).claimed).toBe(true);
      // A run's own live owner is named first, as claimRun names it (to a claimant that is not the winner: the race picks it).
      const loser = claimants.find((c) => c !== winnerClaimant)!;
      expect(await store.claimRunOnFreeBench(heldRun, loser, 10_000, 'bench 9')).toEqual({ claimed: false, ownership: winner.ownership });

      nowMs += 11_000; // the winner's heartbeat is stale: the bench is free again
      const afterStale = await store.claimRunOnFreeBench(otherRun, claimants[2], 10_000, 'bench 9');
      expect(afterStale).toEqual({ claimed: true, ownership: { ...claimants[2], since: '2026-01-01T12:01:11.000Z', heartbeatAt: '2026-01-01T12:01:11.000Z' } });
      await store.releaseRun(otherRun, claimants[2].ownerId);
      expect((await store.claimRunOnFreeBench(otherRun, claimants[3], 10_000, 'bench 9')).claimed).toBe(true); // released: free

      // A run stored before benches had names is of the bench given for it: held by a live run there, then recorded as that bench's.
      const live5 = await store.createOwnedRun(newRun(build.id, { benchName: 'bench 5' }), claimants[4], 10_000);
      expect(live5.created).toBe(true);
      if (!live5.created) return;
      expect(await store.claimRunOnFreeBench(unnamed.id, claimants[5], 10_000, 'bench 5')).toEqual({ claimed: false, benchHeldBy: { runId: live5.run.id, ownership: live5.ownership } });
      expect((await store.getRun(unnamed.id)).benchName).toBe('');
      await store.releaseRun(live5.run.id, claimants[4].ownerId);
      expect((await store.claimRunOnFreeBench(unnamed.id, claimants[5], 10_000, 'bench 5')).claimed).toBe(true);
      expect((await store.getRun(unnamed.id)).benchName).toBe('bench 5');
      expect((await store.createOwnedRun(newRun(build.id, { benchName: 'bench 5' }), claimants[6], 10_000)).created).toBe(false); // it holds bench 5 now

      await expect(store.claimRunOnFreeBench(999, claimants[6], 10_000, 'bench 9')).rejects.toThrow(RecordNotFoundError);
      await expect(store.claimRunOnFreeBench(left7.id, { ...claimants[6], pid: 0 }, 10_000, 'bench 9')).rejects.toThrow(/claimant.pid/);
      await expect(store.claimRunOnFreeBench(left7.id, claimants[6], 0, 'bench 9')).rejects.toThrow(/staleAfterMs/);
      await expect(store.claimRunOnFreeBench(left7.id, claimants[6], 10_000, '')).rejects.toThrow(/benchName/);
    },
  },
  {
    name: 'gives every design, build and run its own stable id (uid), found again by idsOfUids',
    async run(open) {
      const store = await open();
      const { design, build, run } = await seedRun(store);
      const second = await store.createRun(newRun(build.id));
      expect(run.uid).toMatch(UUID_V4);
      expect(second.uid).not.toBe(run.uid);
      expect((await store.listRuns()).map((r) => r.uid)).toEqual([second.uid, run.uid]);
      expect(await store.idsOfUids('run', [run.uid, second.uid, '00000000-0000-4000-8000-000000000000'])).toEqual(new Map([[run.uid, run.id], [second.uid, second.id]]));
      expect(await store.idsOfUids('design', [design.uid])).toEqual(new Map([[design.uid, design.id]]));
      expect(await store.idsOfUids('build', [build.uid])).toEqual(new Map([[build.uid, build.id]]));
      await expect(store.idsOfUids('run', ['run 7'])).rejects.toThrow(/not a UUID/);
    },
  },
  {
    name: 'records offline periods with the run, oldest first, the same period only once',
    async run(open) {
      const store = await open();
      const { run } = await seedRun(store);
      expect((await store.getRun(run.id)).offlinePeriods).toEqual([]);
      const later = { from: '2026-01-01T00:10:00.000Z', to: '2026-01-01T00:12:30.500Z' };
      const earlier = { from: '2026-01-01T00:01:00.000Z', to: '2026-01-01T00:01:05.000Z' };
      await store.recordOfflinePeriod(run.id, later);
      await store.recordOfflinePeriod(run.id, earlier);
      await store.recordOfflinePeriod(run.id, later); // a replay after a crash
      expect((await store.getRun(run.id)).offlinePeriods).toEqual([earlier, later]);
      await expect(store.recordOfflinePeriod(run.id, { from: later.to, to: later.from })).rejects.toThrow(/before it begins/);
      await expect(store.recordOfflinePeriod(999, earlier)).rejects.toThrow(RecordNotFoundError);
    },
  },
  {
    name: 'exports a run whole and imports it into another store unchanged but for its ids',
    async run(open) {
      let clock = 0;
      const source = await open({ now: () => new Date(Date.UTC(2026, 0, 1, 0, 0, clock++)).toISOString() });
      const { design, build, run } = await seedRun(source);
      await source.updateRunStatus(run.id, 'running');
      await source.insertPoint(run.id, point(0, { inputReading: 0.5, outputReading: 4.75 }));
      await source.insertPoint(run.id, point(1, { gainDb: Number.NaN }));
      await source.appendEvent(run.id, 'warning', 'invented warning');
      await source.recordOfflinePeriod(run.id, { from: '2026-01-01T00:00:03.000Z', to: '2026-01-01T00:00:04.000Z' });
      await source.updateRunStatus(run.id, 'done');
      await source.setRunResults(run.id, { minus3dbHz: [1234.5] }, { pass: true, reasons: [] });
      const exported = await source.exportRun(run.id);
      expect(exported.points[0]).toMatchObject({ step: 0, inputReading: 0.5, outputReading: 4.75 });
      expect(Number.isNaN(exported.points[1].gainDb)).toBe(true);

      const target = await open();
      await target.saveDesign({ name: 'taken first, so the ids differ', design: {} });
      const designId = await target.importDesign(design);
      const buildId = await target.importBuild({ ...build, designId });
      const [runId] = await target.importRuns([{ ...exported, run: { ...exported.run, buildId, request: { ...exported.run.request, buildId } } as StoredRun }]);
      expect(designId).not.toBe(design.id);
      const copied = await target.exportRun(runId);
      const { id: _a, buildId: _b, request: requestCopied, ...runCopied } = copied.run;
      const { id: _c, buildId: _d, request: requestSource, ...runSource } = exported.run;
      expect(runCopied).toEqual(runSource);
      expect({ ...requestCopied, buildId: 0 }).toEqual({ ...requestSource, buildId: 0 });
      expect(copied.points).toEqual(exported.points);
      expect(copied.events).toEqual(exported.events);
      expect(await target.getDesign(designId)).toEqual({ ...design, id: designId });
      expect(await target.getBuild(buildId)).toEqual({ ...build, id: buildId, designId });
      expect(await target.getRunOwnership(runId)).toBeUndefined();
      expect(await target.integrityProblems()).toEqual([]);
      // The same run again is refused whole (its uid is taken), nothing half-stored.
      await expect(target.importRuns([{ ...exported, run: { ...exported.run, buildId } }])).rejects.toThrow();
      expect(await target.listRuns()).toHaveLength(1);
    },
  },
  {
    name: 'stores a noise run with its request and plan, and its records in step order with every PSD bit for bit, counted as the run\'s points',
    async run(open) {
      const store = await open();
      const { build } = await seedRun(store);
      const run = await store.createRun(newNoiseRun(build.id));
      expect(run.kind).toBe('noise');
      expect(run.request).toEqual({ ...noiseRequest, buildId: build.id });
      expect(run.plan).toEqual(noisePlan);
      expect(run.plannedCount).toBe(8);
      for (const step of [1, 0, 2]) await store.insertNoiseRecord(run.id, noiseRecord(step));
      // A meter reading: no spectrum, no sample rate.
      await store.insertNoiseRecord(run.id, noiseRecord(3, { psdV2PerHz: undefined, sampleRateHz: Number.NaN, segments: 0, degreesOfFreedom: 0, meanV: Number.NaN, flags: 2 }));
      const records = await store.loadNoiseRecords(run.id);
      expect(records.step).toEqual([0, 1, 2, 3]);
      for (const step of [0, 1, 2]) {
        expect(Array.from(records.psdV2PerHz[step]!)).toEqual(Array.from(noiseRecord(step).psdV2PerHz!));
        expect(records.degreesOfFreedom[step]).toBe(13.2);
        expect(records.rmsV[step]).toBe(noiseRecord(step).rmsV);
      }
      expect(records.psdV2PerHz[3]).toBeNull();
      expect(Number.isNaN(records.sampleRateHz[3])).toBe(true);
      expect(Number.isNaN(records.meanV[3])).toBe(true);
      expect(records.flags).toEqual([0, 0, 0, 2]);
      expect(records.measuredAt[1]).toBe('2026-01-01T00:01:01.000Z');
      expect((await store.getRun(run.id)).pointCount).toBe(4);
      expect((await store.listRuns())[0]).toMatchObject({ id: run.id, kind: 'noise', pointCount: 4, plannedCount: 8 });
      expect(await store.nextStep(run.id)).toBe(4);
      expect((await store.loadPoints(run.id)).step).toEqual([]);
      expect(await store.integrityProblems()).toEqual([]);
    },
  },
  {
    name: 'refuses a second noise record for a step, bad records, an unknown run, and a noise run without a noise request',
    async run(open) {
      const store = await open();
      const { build } = await seedRun(store);
      const run = await store.createRun(newNoiseRun(build.id));
      await store.insertNoiseRecord(run.id, noiseRecord(0));
      await expect(store.insertNoiseRecord(run.id, noiseRecord(0, { rmsV: 1 }))).rejects.toThrow(DuplicateStepError);
      const records = await store.loadNoiseRecords(run.id);
      expect(records.step).toEqual([0]);
      expect(records.rmsV[0]).toBe(noiseRecord(0).rmsV);
      expect((await store.getRun(run.id)).pointCount).toBe(1);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(-1))).rejects.toThrow(/noiseRecord.step/);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(1, { psdV2PerHz: [1e-16, Number.NaN] }))).rejects.toThrow(/noiseRecord.psdV2PerHz\[1\]/);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(1, { psdV2PerHz: [-1e-16] }))).rejects.toThrow(/power density/);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(1, { segments: 1.5 }))).rejects.toThrow(/noiseRecord.segments/);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(1, { measuredAt: 'soon' }))).rejects.toThrow(/noiseRecord.measuredAt/);
      await expect(store.insertNoiseRecord(999, noiseRecord(0))).rejects.toThrow(RecordNotFoundError);
      await expect(store.loadNoiseRecords(999)).rejects.toThrow(RecordNotFoundError);
      expect(await store.nextStep(run.id)).toBe(1);
      await expect(store.createRun(newNoiseRun(build.id, { request } as never))).rejects.toThrow(/run.request.kind/);
      await expect(store.createRun(newRun(build.id, { request: noiseRequest } as never))).rejects.toThrow(/run.request.kind/);
      expect((await store.listRuns({ buildId: build.id })).map((r) => r.kind)).toEqual(['noise', 'ac']);
    },
  },
  {
    name: 'run ownership: an owner\'s noise records are stored only while it owns the run; after a take-over or release they are refused and change nothing',
    async run(open) {
      const { store, run: sweep, first, second, advanceMs } = await ownedRunSetting(open);
      const run = await store.createRun(newNoiseRun(sweep.buildId));
      await expect(store.insertNoiseRecord(run.id, noiseRecord(0), { asOwner: first.ownerId })).rejects.toThrow(RunTakenOverError);
      await store.claimRun(run.id, first, 10_000);
      await store.insertNoiseRecord(run.id, noiseRecord(0), { asOwner: first.ownerId });
      advanceMs(11_000); // first's heartbeat is stale: second takes the run over
      expect((await store.claimRun(run.id, second, 10_000)).claimed).toBe(true);
      await store.insertNoiseRecord(run.id, noiseRecord(1), { asOwner: second.ownerId });
      const late = store.insertNoiseRecord(run.id, noiseRecord(2), { asOwner: first.ownerId });
      await expect(late).rejects.toThrow(RunTakenOverError);
      await expect(late).rejects.toMatchObject({ nowOwnedBy: { pid: 200, host: 'host-b', label: 'rolloff serve' } });
      await store.releaseRun(run.id, second.ownerId);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(2), { asOwner: second.ownerId })).rejects.toMatchObject({ nowOwnedBy: undefined });
      expect((await store.loadNoiseRecords(run.id)).step).toEqual([0, 1]);
      expect((await store.getRun(run.id)).pointCount).toBe(2);
      expect(await store.nextStep(run.id)).toBe(2);
      await expect(store.insertNoiseRecord(777, noiseRecord(0), { asOwner: first.ownerId })).rejects.toThrow(RecordNotFoundError);
      await expect(store.insertNoiseRecord(run.id, noiseRecord(2), { asOwner: '' })).rejects.toThrow(/condition.asOwner/);
      expect(await store.integrityProblems()).toEqual([]);
    },
  },
  {
    name: 'exports a noise run with its records, spectra bit for bit, and imports it into another store unchanged but for its ids',
    async run(open) {
      const source = await open();
      const { design, build } = await seedRun(source);
      const run = await source.createRun(newNoiseRun(build.id));
      for (const step of [0, 1, 2]) await source.insertNoiseRecord(run.id, noiseRecord(step));
      const exported = await source.exportRun(run.id);
      expect(exported.points).toEqual([]);
      expect(exported.noiseRecords?.step).toEqual([0, 1, 2]);
      const target = await open();
      const designId = await target.importDesign(design);
      const buildId = await target.importBuild({ ...build, designId });
      const [runId] = await target.importRuns([{ ...exported, run: { ...exported.run, buildId, request: { ...exported.run.request, buildId } } as StoredRun }]);
      const copied = await target.exportRun(runId);
      expect(copied.run).toMatchObject({ kind: 'noise', pointCount: 3, plan: noisePlan, uid: run.uid });
      expect(copied.noiseRecords).toEqual(exported.noiseRecords);
      expect(await target.nextStep(runId)).toBe(3);
      expect(await target.integrityProblems()).toEqual([]);
    },
  },
  {
    name: 'reports its schema version and a clean integrity check, and closes idempotently',
    async run(open) {
      const store = await open();
      expect(await store.schemaVersion()).toBeGreaterThan(0);
      expect(await store.integrityProblems()).toEqual([]);
      expect(typeof store.location).toBe('string');
      await store.close();
      await store.close();
    },
  },
];

/** Registers every check as a test of this implementation. */
export function describeStoreConformance(name: string, openFreshStore: OpenFreshStore): void {
  describe(`store conformance: ${name}`, () => {
    const opened: RolloffStore[] = [];
    const open: OpenFreshStore = async (options) => {
      const store = await openFreshStore(options);
      opened.push(store);
      return store;
    };
    afterEach(async () => {
      for (const store of opened.splice(0)) await store.close();
    });
    for (const check of STORE_CONFORMANCE_CHECKS) it(check.name, () => check.run(open));
  });
}

/** Runs every check outside the test runner and names those that failed (for testing the suite itself). */
export async function failingChecks(openFreshStore: OpenFreshStore): Promise<string[]> {
  const failed: string[] = [];
  for (const check of STORE_CONFORMANCE_CHECKS) {
    const opened: RolloffStore[] = [];
    try {
      await check.run(async (options) => {
        const store = await openFreshStore(options);
        opened.push(store);
        return store;
      });
    } catch {
      failed.push(check.name);
    } finally {
      for (const store of opened) await store.close();
    }
  }
  return failed;
}
