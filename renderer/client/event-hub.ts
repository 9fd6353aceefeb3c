/** Fans service events out to the views that subscribed. */
import type { ServiceEventName, ServiceEvents } from '../../app/contract/contract';

type AnyListener = (payload: never) => void;

export class EventHub {
  private readonly listeners = new Map<ServiceEventName, Set<AnyListener>>();
  private readonly connectionListeners = new Set<(connected: boolean) => void>();

  on<E extends ServiceEventName>(event: E, listener: (payload: ServiceEvents[E]) => void): () => void {
    let set = this.listeners.get(event);
    if (!set) this.listeners.set(event, (set = new Set()));
    set.add(listener as AnyListener);
    return () => set!.delete(listener as AnyListener);
  }

  emit<E extends ServiceEventName>(event: E, payload: ServiceEvents[E]): void {
    for (const listener of this.listeners.get(event) ?? []) {
      try {
        (listener as (value: ServiceEvents[E]) => void)(payload);
      } catch (error) {
        console.error(`Rolloff: a ${event} listener failed`, error);
      }
    }
  }

  onConnection(listener: (connected: boolean) => void): void {
    this.connectionListeners.add(listener);
  }

  setConnected(connected: boolean): void {
    for (const listener of this.connectionListeners) listener(connected);
  }
}
