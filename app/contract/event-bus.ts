/**
 * The one typed event bus for service events, used by the service (to push
 * them to every host) and by the window (to fan them out to its views).
 * Synchronous; a throwing listener cannot break the others, nor a sweep.
 */
import type { ServiceEventName, ServiceEvents } from './events';

type Listener<E extends ServiceEventName> = (payload: ServiceEvents[E]) => void;

export class ServiceEventBus {
  private readonly listeners = new Map<ServiceEventName, Set<Listener<ServiceEventName>>>();
  private readonly anyListeners = new Set<(event: ServiceEventName, payload: unknown) => void>();

  /** `onListenerError` hears what a listener threw; by default it is dropped (a broken window must not stop a measurement). */
  constructor(private readonly onListenerError: (event: ServiceEventName, error: unknown) => void = () => {}) {}

  on<E extends ServiceEventName>(event: E, listener: Listener<E>): () => void {
    let set = this.listeners.get(event);
    if (!set) this.listeners.set(event, (set = new Set()));
    set.add(listener as Listener<ServiceEventName>);
    return () => set!.delete(listener as Listener<ServiceEventName>);
  }

  /** Every event, for hosts that forward them all (IPC, WebSocket). */
  onAny(listener: (event: ServiceEventName, payload: unknown) => void): () => void {
    this.anyListeners.add(listener);
    return () => this.anyListeners.delete(listener);
  }

  emit<E extends ServiceEventName>(event: E, payload: ServiceEvents[E]): void {
    for (const listener of this.listeners.get(event) ?? []) this.safely(event, () => listener(payload));
    for (const listener of this.anyListeners) this.safely(event, () => listener(event, payload));
  }

  private safely(event: ServiceEventName, call: () => void): void {
    try {
      call();
    } catch (error) {
      this.onListenerError(event, error);
    }
  }
}
