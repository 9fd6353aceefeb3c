/**
 * The real service as the window hosts (web host, Electron main) use it:
 * the RolloffApi, one subscription for every event, and a clean close.
 */
import type { RolloffService, RolloffServiceOptions } from '../service/service';
import { openServiceAt } from '../service/open-service';
import type { RolloffApi, ServiceEventName } from '../contract/contract';

export interface HostedService {
  api: RolloffApi;
  subscribe(listener: (event: ServiceEventName, payload: unknown) => void): () => void;
  close(): Promise<void>;
  service: RolloffService;
}

/** The service over the store at databaseLocation (a SQLite path or a database URL). */
export async function openHostedService(databaseLocation: string, options: RolloffServiceOptions = {}): Promise<HostedService> {
  const service = await openServiceAt(databaseLocation, { followLab: true, ...options });
  return {
    api: service,
    subscribe: (listener) => service.events.onAny(listener),
    close: () => service.close(),
    service,
  };
}
