/**
 * The one JSON form of a run on the command line (sweep --json, show --json):
 * the run's JSON record, as `export --format json` writes it, so every key
 * names its quantity and unit (app/record/README.md) rather than the
 * service's internal columns.
 */
import type { LocalService } from '../service/local-service';

export async function runRecordJson(service: Pick<LocalService, 'exportRecord'>, runId: number): Promise<string> {
  return `${(await service.exportRecord([runId], 'json')).content.trimEnd()}\n`;
}

export const RUN_JSON_DESCRIPTION = "the run's JSON record, as export --format json writes it (every key names its quantity and unit)";
