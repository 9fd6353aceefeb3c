/**
 * Timestamped record of what went over a link, for the Bench view's traffic
 * console and for diagnosing a run. Bounded so an overnight sweep cannot grow
 * it without limit.
 */
export type TrafficDirection = 'sent' | 'received';

export interface TrafficEntry {
  /** ISO 8601 wall-clock time. */
  at: string;
  direction: TrafficDirection;
  /** The command or reply as text; binary blocks are summarised, not dumped. */
  text: string;
  /** Which link (transport description). */
  link: string;
}

export type TrafficListener = (entry: TrafficEntry) => void;

export class TrafficLog {
  private readonly entries: TrafficEntry[] = [];
  private readonly listeners = new Set<TrafficListener>();

  constructor(private readonly capacity = 2000) {}

  add(direction: TrafficDirection, text: string, link: string): void {
    const entry: TrafficEntry = { at: new Date().toISOString(), direction, text, link };
    this.entries.push(entry);
    if (this.entries.length > this.capacity) this.entries.splice(0, this.entries.length - this.capacity);
    for (const listener of this.listeners) {
      try {
        listener(entry);
      } catch {
        // A broken viewer must not break the instrument link.
      }
    }
  }

  /** Returns an unsubscribe function. */
  subscribe(listener: TrafficListener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  recent(count = this.capacity): TrafficEntry[] {
    return this.entries.slice(-count);
  }
}
