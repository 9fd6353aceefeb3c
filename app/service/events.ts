/** The service's event bus: typed, synchronous, a throwing listener cannot break a sweep. */
import type { ServiceEventName, ServiceEvents } from '../contract/contract';

type Listener<E extends ServiceEventName> = (payload: ServiceEvents[E]) => void;

export class ServiceEventBus {
  private readonly listeners = new Map<ServiceEventName, Set<Listener<ServiceEventName>>>();
  private readonly anyListeners = new Set<(event: ServiceEventName, payload: unknown) => void>();

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
    for (const listener of this.listeners.get(event) ?? []) safely(() => listener(payload));
    for (const listener of this.anyListeners) safely(() => listener(event, payload));
  }
}

function safely(call: () => void): void {
  try {
    call();
  } catch {
    // A broken window must not stop a measurement.
  }
}
