/**
 * How the driver of a run is named to people: `rolloff runs`, the History view
 * and the run detail say the same words, and so do the refusals that name an owner.
 */
import type { RunOwner, RunStatus, RunSummary } from './contract';
import { instantText } from './bench-text';

/** "rolloff serve pid 1234 on lab-pc". */
export function ownerName(owner: Pick<RunOwner, 'label' | 'pid' | 'host'>): string {
  return `${owner.label || 'another process'} pid ${owner.pid} on ${owner.host}`;
}

/** "driven by rolloff serve pid 1234 on lab-pc, heartbeat 1 s ago". */
export function drivenByText(owner: RunOwner): string {
  return `driven by ${ownerName(owner)}, heartbeat ${owner.heartbeatAgeS} s ago`;
}

/** "rolloff serve pid 1234 on lab-pc (since 2026-03-04 05:06:07 UTC, heartbeat 1 s ago)", for refusals. */
export function ownerWithTimes(owner: RunOwner): string {
  return `${ownerName(owner)} (since ${instantText(owner.since)}, heartbeat ${owner.heartbeatAgeS} s ago)`;
}

/** A run left running with nobody driving it: no owner, or one whose heartbeat is stale or whose process is gone. */
export function isInterrupted(run: Pick<RunSummary, 'status' | 'owner'>): boolean {
  return run.status === 'running' && !run.owner?.live;
}

/** The status to show: 'interrupted' for a running run nobody drives, else the stored one. */
export function shownStatus(run: Pick<RunSummary, 'status' | 'owner'>): RunStatus | 'interrupted' {
  return isInterrupted(run) ? 'interrupted' : run.status;
}

/**
 * How a run stands with its driver, in a line: "running, driven by … heartbeat
 * 1 s ago" (or "paused, …") while a process drives it; "interrupted, last driven
 * by …" or "interrupted, no process drives it" when it is left running; else
 * undefined: a finished run has no driver, whatever owner is recorded with it.
 */
export function runStateText(run: Pick<RunSummary, 'status' | 'owner'>): string | undefined {
  const owner = run.owner;
  if (owner?.live && (run.status === 'running' || run.status === 'paused')) return `${run.status}, ${drivenByText(owner)}`;
  if (!isInterrupted(run)) return undefined;
  return owner ? `interrupted, last ${drivenByText(owner)}` : 'interrupted, no process drives it';
}
