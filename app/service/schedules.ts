/**
 * Schedules (CLI): a sweep repeated every so many minutes of bench time (scaled
 * on a simulated bench), a number of times or until a wall-clock time; each
 * repetition is an ordinary run of the same build, started as any other.
 */
import { ValidationError } from '../errors';
import type { BenchClock } from '../bench';
import type { RolloffStore } from '../store';
import { driftSummary, type DriftRow } from '../analysis';
import type { RunFigures, RunStatus, RunSummary, SweepRequest } from '../contract/contract';

/** What a schedule produced: its runs and how their figures drifted. */
export interface ScheduleReport {
  scheduleId: number;
  runs: Array<{ runId: number; status: RunStatus; startedAt: string | null; figures: RunFigures | null }>;
  drift: DriftRow[];
}

export interface ScheduleInput {
  request: SweepRequest;
  everyMinutes: number;
  count?: number;
  until?: string;
}

/** What a schedule uses of the service: the store, the bench clock in force, and starting and awaiting runs. */
export interface ScheduleContext {
  store: Pick<RolloffStore, 'createSchedule' | 'getRun'>;
  clock(): BenchClock;
  startRunWith(request: SweepRequest, extra: { scheduleId?: number }): Promise<RunSummary>;
  waitForRun(runId: number): Promise<RunStatus>;
}

/**
 * Repeats a sweep every `everyMinutes` (bench time: scaled on a simulated bench),
 * `count` times or until the wall-clock time `until`, whichever comes first.
 * Resolves with every run and the drift of the figures across them.
 */
export async function runSchedule(
  context: ScheduleContext,
  input: ScheduleInput,
  /** Called as each repetition starts, with the bench time (s) its slot began. */
  onRun?: (summary: RunSummary, index: number, slotS: number) => void,
): Promise<ScheduleReport> {
  const { request, everyMinutes } = input;
  if (!(Number.isFinite(everyMinutes) && everyMinutes > 0)) throw new ValidationError('every', `${everyMinutes} min is not a positive interval`);
  if (input.count === undefined && input.until === undefined) throw new ValidationError('count/until', 'give a number of runs or an end time', 'e.g. --count 12, or --until 07:30.');
  if (input.count !== undefined && !(Number.isInteger(input.count) && input.count >= 1)) throw new ValidationError('count', `${input.count} is not a whole number ≥ 1`);
  const untilMs = input.until === undefined ? Infinity : Date.parse(input.until);
  if (Number.isNaN(untilMs)) throw new ValidationError('until', `"${input.until}" is not a time`, 'Give an ISO 8601 time, e.g. 2026-12-02T07:30.');
  if (untilMs <= Date.now()) throw new ValidationError('until', `${input.until} is already past`);
  const schedule = await context.store.createSchedule({ buildId: request.buildId, request, everyMinutes, count: input.count ?? null, until: input.until === undefined ? null : new Date(untilMs).toISOString() });
  const runIds: number[] = [];
  const clock = context.clock();
  for (let index = 0; ; index++) {
    const slotS = clock.nowS();
    const run = await context.startRunWith(request, { scheduleId: schedule.id });
    runIds.push(run.id);
    onRun?.(run, index, slotS);
    const status = await context.waitForRun(run.id).catch(() => 'failed' as const);
    if (status === 'paused' || status === 'stopped') break; // the user intervened: end the schedule too
    if (input.count !== undefined && runIds.length >= input.count) break;
    const nextSlotS = slotS + everyMinutes * 60;
    if (Date.now() + ((nextSlotS - clock.nowS()) / clock.timeScale) * 1000 > untilMs) break;
    await clock.sleepS(Math.max(0, nextSlotS - clock.nowS()));
  }
  const runs = await Promise.all(runIds.map((id) => context.store.getRun(id)));
  return {
    scheduleId: schedule.id,
    runs: runs.map((r) => ({ runId: r.id, status: r.status, startedAt: r.startedAt, figures: r.figures })),
    drift: driftSummary(runs.map((r) => r.figures ?? { minus3dbHz: [] })),
  };
}
