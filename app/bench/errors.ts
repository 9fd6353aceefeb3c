/** Named failures of the bench layer. */
import { UserError, ValidationError } from '../errors';

/** A profile file is not valid: names the file and the field. */
export class ProfileError extends ValidationError {
  readonly file: string;
  readonly field: string;
  constructor(file: string, field: string, message: string, hint?: string) {
    super(`profile ${file}, field "${field}"`, message, hint ?? 'Fix the profile file; the shipped profiles in app/bench/profiles/ show every field.');
    this.file = file;
    this.field = field;
  }
}

/**
 * A generator setting would exceed the user's maximum stimulus. Thrown before
 * anything is sent to the instrument.
 */
export class StimulusLimitError extends UserError {
  readonly requestedVpp: number;
  readonly maxStimulusVpp: number;
  constructor(what: string, requestedVpp: number, maxStimulusVpp: number) {
    super(
      `refused: ${what} would put ${requestedVpp.toPrecision(4)} Vpp (open-circuit, offset counted as peak) on the circuit, above the maximum stimulus of ${maxStimulusVpp} Vpp`,
      'Lower the amplitude or offset, or raise the maximum stimulus only if the circuit and its parts can take it.',
    );
    this.requestedVpp = requestedVpp;
    this.maxStimulusVpp = maxStimulusVpp;
  }
}

/** The generator reports its output on after being told to switch it off: nothing that needs a quiet input may go ahead. */
export class GeneratorOutputOnError extends UserError {
  constructor(command: string, reply: string) {
    super(
      `the generator still reports its output on (${command} answered "${reply}") after it was switched off`,
      'Switch the output off at the generator (or unplug its cable and terminate the stage input with a resistor of the generator\'s source resistance), then start again.',
    );
  }
}
