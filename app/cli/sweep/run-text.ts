/** A finished or stored run as text for the terminal, whatever its kind. */
import type { LocalService } from '../../service/local-service';
import { noiseRunText } from './noise-text';
import { runDetailText } from './summary-text';

export async function runText(service: LocalService, runId: number): Promise<string> {
  const summary = await service.getRunSummary(runId);
  if (summary.kind === 'noise') return noiseRunText(await service.getNoiseRun(runId));
  return runDetailText(await service.getRun(runId), await service.diodeOfRun(runId));
}
