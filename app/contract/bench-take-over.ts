/**
 * A run belongs to its bench: only that bench resumes it by default. Another
 * bench continues it only when the user repeats the run's bench name (CLI
 * --take-over-from NAME, the window's confirmation dialog), so a take-over is
 * never given by accident; the run's event lines record it.
 */
import { UserError } from '../errors';

/** The error's name on the wire (app/host/wire-error.ts): a window asks for the confirmation when it sees it. */
export const TAKE_OVER_NOT_CONFIRMED = 'TakeOverNotConfirmedError';

/** A resume of another bench's run, not confirmed with that bench's name (or confirmed with a wrong one). */
export class TakeOverNotConfirmedError extends UserError {
  /** The bench the run belongs to: the name a confirmation must repeat. */
  readonly runBenchName: string;
  constructor(runId: number, runBenchName: string, thisBenchName: string, given: string | undefined) {
    super(
      given === undefined
        ? `run ${runId} belongs to bench "${runBenchName}", not to this bench "${thisBenchName}"; it is not taken over without confirmation`
        : `run ${runId} belongs to bench "${runBenchName}", not to "${given}"`,
      `If this bench should continue it (bench "${runBenchName}" is gone or silent), confirm with that bench's name: rolloff resume ${runId} --take-over-from ${shellWord(runBenchName)}; the window asks in a dialog.`,
    );
    this.name = TAKE_OVER_NOT_CONFIRMED; // stays so in a minified window bundle too
    this.runBenchName = runBenchName;
  }
}

/**
 * The bench a resume takes the run over from, or undefined when the run is this
 * bench's own (runs stored before benches had names count as this machine's).
 * Throws TakeOverNotConfirmedError unless `confirmation` repeats the run's bench.
 */
export function takeOverFrom(run: { id: number; benchName: string }, thisBenchName: string, confirmation: string | undefined): string | undefined {
  const runBench = run.benchName || thisBenchName;
  if (confirmation !== undefined && confirmation.trim() !== runBench) throw new TakeOverNotConfirmedError(run.id, runBench, thisBenchName, confirmation.trim());
  if (runBench === thisBenchName) return undefined;
  if (confirmation === undefined) throw new TakeOverNotConfirmedError(run.id, runBench, thisBenchName, undefined);
  return runBench;
}

/** The run's event line: "taken over from bench "lab-a" by bench "lab-b"". */
export function takeOverEventText(fromBench: string, toBench: string): string {
  return `taken over from bench "${fromBench}" by bench "${toBench}"`;
}

/** A bench name as one shell word. */
function shellWord(name: string): string {
  return /^[\w.:@+-]+$/.test(name) ? name : `'${name.replace(/'/g, `'\\''`)}'`;
}
