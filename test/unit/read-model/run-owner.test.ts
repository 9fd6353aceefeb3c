/**
 * Who drives a run, as the read model and the wording show it: only a running
 * or paused run has a driver; a finished one (done, stopped, failed) has none,
 * even when an owner is still recorded with it (a run stored before finished
 * runs were released). Expected wording: app/contract/run-owner-text.ts's own
 * phrases — common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { summaryOf } from '../../../app/read-model/run-detail';
import { runStateText } from '../../../app/contract/run-owner-text';
import { RUN_STATUSES, type RunStatus } from '../../../app/contract/contract';
import type { RunOwnership, StoredRunSummary } from '../../../app/store';

const ownership: RunOwnership = { ownerId: 'lab-3:4711:ab', pid: 4711, host: 'lab-3', label: 'rolloff serve', since: '2026-03-04T10:00:00.000Z', heartbeatAt: '2026-03-04T10:00:05.000Z' };
const liveJudge = (o: RunOwnership) => ({ label: o.label, pid: o.pid, host: o.host, since: o.since, heartbeatAt: o.heartbeatAt, heartbeatAgeS: 1, live: true });

function stored(status: RunStatus): StoredRunSummary {
  return {
    id: 7, uid: '6f1c1b9e-3c55-4c0e-9a57-3f0f5f0e2a11', buildId: 1, buildLabel: 'board 1', designName: 'inverting ×10 (demo, invented)', kind: 'ac', status,
    startedAt: '2026-03-04T10:00:00.000Z', endedAt: null, pointCount: 3, plannedCount: 41, simulated: true, benchName: 'lab-3', owner: ownership,
  };
}

describe('the driver of a run', () => {
  it('is shown for running and paused runs only; a finished run stored with an owner shows none', () => {
    const shown = Object.fromEntries(RUN_STATUSES.map((status) => [status, summaryOf(stored(status), liveJudge).owner?.pid ?? null]));
    expect(shown).toEqual({ planned: 4711, running: 4711, paused: 4711, done: null, stopped: null, failed: null });
  });

  it('is worded "driven by …" only while running or paused', () => {
    const owner = liveJudge(ownership);
    expect(runStateText({ status: 'running', owner })).toBe('running, driven by rolloff serve pid 4711 on lab-3, heartbeat 1 s ago');
    expect(runStateText({ status: 'paused', owner })).toBe('paused, driven by rolloff serve pid 4711 on lab-3, heartbeat 1 s ago');
    for (const status of ['done', 'stopped', 'failed'] as const) expect(runStateText({ status, owner })).toBeUndefined();
  });
});
