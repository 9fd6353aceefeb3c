/**
 * Follows a run in the terminal until it leaves the running state: progress
 * bar on stderr, warnings and errors of the run as they happen, and Ctrl-C
 * pauses the run (resumable) instead of killing it mid-point.
 */
import type { LocalService } from '../../service/local-service';
import type { RunStatus } from '../../contract/contract';
import { terminalProgressBar } from './progress-bar';

export async function followRun(service: LocalService, runId: number): Promise<RunStatus> {
  const bar = terminalProgressBar();
  const offProgress = service.on('progress', (p) => {
    if (p.runId === runId) bar.update(p);
  });
  const offEvents = service.on('runEvent', (e) => {
    if (e.runId !== runId || e.level === 'info') return;
    bar.done();
    process.stderr.write(`${e.level}: ${e.message}\n`);
  });
  const onInterrupt = () => {
    bar.done();
    process.stderr.write(`pausing run ${runId} after the current point…\n`);
    void service.pauseRun(runId);
  };
  process.once('SIGINT', onInterrupt);
  try {
    return await service.waitForRun(runId);
  } finally {
    process.off('SIGINT', onInterrupt);
    offProgress();
    offEvents();
    bar.done();
  }
}
