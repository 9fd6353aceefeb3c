/**
 * The real service as the window hosts (web host, Electron main) use it:
 * the RolloffApi, one subscription for every event, and a clean close.
 */
import { RolloffService, type RolloffServiceOptions } from '../service/service';
import type { RolloffApi, ServiceEventName } from '../contract/contract';

export interface HostedService {
  api: RolloffApi;
  subscribe(listener: (event: ServiceEventName, payload: unknown) => void): () => void;
  close(): Promise<void>;
  service: RolloffService;
}

export function openHostedService(options: RolloffServiceOptions): HostedService {
  const service = new RolloffService(options);
  return {
    api: service,
    subscribe: (listener) => service.events.onAny(listener),
    close: () => service.close(),
    service,
  };
}
