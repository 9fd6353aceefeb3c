/** A one-line progress bar on stderr, only when stderr is a terminal (pipes and logs stay clean). */
import type { RunProgress } from '../../contract/contract';
import { formatDuration } from '../../units';

export interface ProgressBar {
  update(progress: RunProgress): void;
  done(): void;
}

const WIDTH = 30;

export function terminalProgressBar(stream: NodeJS.WriteStream = process.stderr): ProgressBar {
  if (!stream.isTTY) return { update() {}, done() {} };
  let drawn = false;
  return {
    update(progress) {
      const fraction = progress.total > 0 ? Math.min(1, progress.step / progress.total) : 0;
      const filled = Math.round(fraction * WIDTH);
      const eta = progress.etaS > 0 ? ` ETA ${formatDuration(progress.etaS)}` : '';
      stream.write(`\r[${'#'.repeat(filled)}${'.'.repeat(WIDTH - filled)}] ${progress.step}/${progress.total}${eta}   `);
      drawn = true;
    },
    done() {
      if (drawn) stream.write('\n');
      drawn = false;
    },
  };
}

