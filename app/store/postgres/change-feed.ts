/**
 * Changes made by other processes to a lab store, as they commit: LISTEN on one
 * channel that every write NOTIFYs (payload: the writer's origin, the kind and
 * the run id — small, the listener loads what it needs), or, when LISTEN is not
 * available (a pooler in transaction mode, a refused LISTEN), polling the runs
 * table for counts and statuses that moved.
 */
import pg from 'pg';
import type { StoreChange, StoreChangeFeed } from '../types';

export const CHANGE_CHANNEL = 'rolloff_changes';

/** The NOTIFY payload: compact JSON; PostgreSQL limits payloads to 8000 bytes, these are a few dozen. */
export function changePayload(origin: string, change: StoreChange): string {
  return JSON.stringify({ o: origin, k: change.kind, r: change.runId });
}

export function parseChangePayload(payload: string | undefined): { origin: string; change: StoreChange } | undefined {
  try {
    const value = JSON.parse(payload ?? '') as { o?: unknown; k?: unknown; r?: unknown };
    if (typeof value.o !== 'string' || !Number.isSafeInteger(value.r)) return undefined;
    if (value.k !== 'points' && value.k !== 'status' && value.k !== 'event') return undefined;
    return { origin: value.o, change: { kind: value.k, runId: value.r as number } };
  } catch {
    return undefined; // another program's note on the channel: not ours to read
  }
}

export interface ChangeFeedOptions {
  /** Connection settings for the dedicated LISTEN connection. */
  config: pg.ClientConfig;
  /** For polling. */
  pool: pg.Pool;
  /** This store's own origin: its own writes are not reported back to it. */
  origin: string;
  /** Poll interval when LISTEN is unavailable; 1 s unless given (common practice, no source). */
  pollIntervalMs?: number;
  /** Tests: do not try LISTEN. */
  forcePolling?: boolean;
}

export async function openChangeFeed(options: ChangeFeedOptions, listener: (change: StoreChange) => void): Promise<StoreChangeFeed> {
  if (!options.forcePolling) {
    const client = new pg.Client(options.config);
    try {
      await client.connect();
      client.on('notification', (message) => {
        const parsed = message.channel === CHANGE_CHANNEL ? parseChangePayload(message.payload) : undefined;
        if (parsed && parsed.origin !== options.origin) listener(parsed.change);
      });
      await client.query(`LISTEN ${CHANGE_CHANNEL}`);
      let stopped = false;
      let fallback: StoreChangeFeed | undefined;
      // The server restarted or the connection dropped: carry on by polling rather than going silent.
      client.on('error', () => {
        if (stopped || fallback) return;
        void pollingFeed(options, listener)
          .then((feed) => {
            if (stopped) void feed.stop();
            else fallback = feed;
          })
          .catch(() => {}); // never an unhandled rejection: a bench cut off from the server keeps sweeping (app/store/outbox/)
      });
      return {
        get mode() {
          return fallback ? 'poll' : 'listen';
        },
        async stop() {
          stopped = true;
          await fallback?.stop();
          await client.end().catch(() => {});
        },
      } as StoreChangeFeed;
    } catch {
      await client.end().catch(() => {});
    }
  }
  return pollingFeed(options, listener);
}

interface RunState {
  status: string;
  pointCount: number;
  eventCount: number;
}

async function pollingFeed(options: ChangeFeedOptions, listener: (change: StoreChange) => void): Promise<StoreChangeFeed> {
  const known = new Map<number, RunState>();
  // Runs not yet finished, and any that were when last seen (to report their end).
  const read = async () => {
    const { rows } = await options.pool.query<{ id: number; status: string; point_count: number; event_count: number }>(
      `SELECT r.id, r.status, r.point_count, (SELECT count(*)::integer FROM run_events e WHERE e.run_id = r.id) AS event_count
       FROM runs r WHERE r.status IN ('planned', 'running', 'paused') OR r.id = ANY($1::bigint[])`,
      [[...known.keys()]],
    );
    return rows;
  };
  const seen = (rows: Awaited<ReturnType<typeof read>>, report: boolean) => {
    for (const row of rows) {
      const before = known.get(row.id);
      if (report && before) {
        if (row.point_count !== before.pointCount) listener({ kind: 'points', runId: row.id });
        if (row.event_count !== before.eventCount) listener({ kind: 'event', runId: row.id });
        if (row.status !== before.status) listener({ kind: 'status', runId: row.id });
      } else if (report) {
        listener({ kind: 'status', runId: row.id }); // a run started since the last look
        if (row.point_count > 0) listener({ kind: 'points', runId: row.id });
      }
      if (row.status === 'planned' || row.status === 'running' || row.status === 'paused') known.set(row.id, { status: row.status, pointCount: row.point_count, eventCount: row.event_count });
      else known.delete(row.id);
    }
  };
  // The server may be away right now (the LISTEN connection just dropped): start empty and catch up at a later tick.
  seen(await read().catch(() => []), false);
  let busy = false;
  const timer = setInterval(() => {
    if (busy) return;
    busy = true;
    read()
      .then((rows) => seen(rows, true))
      .catch(() => {}) // server away for a moment: try again at the next tick
      .finally(() => (busy = false));
  }, options.pollIntervalMs ?? 1000);
  return {
    mode: 'poll',
    async stop() {
      clearInterval(timer);
    },
  };
}
