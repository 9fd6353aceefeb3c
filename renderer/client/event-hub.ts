/** Fans service events out to the views that subscribed, and tells them when the link drops. */
import { ServiceEventBus } from '../../app/contract/event-bus';

export class EventHub extends ServiceEventBus {
  private readonly connectionListeners = new Set<(connected: boolean) => void>();

  constructor() {
    super((event, error) => console.error(`Rolloff: a ${event} listener failed`, error));
  }

  onConnection(listener: (connected: boolean) => void): void {
    this.connectionListeners.add(listener);
  }

  setConnected(connected: boolean): void {
    for (const listener of this.connectionListeners) listener(connected);
  }
}
