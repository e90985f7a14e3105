import { InputError } from '../src/util/input-error.js';

/**
 * Bad input on the command line itself: an option, a missing argument, an argument that cannot
 * be used. Its message is a sentence that names the option as the command line spells it
 * (`--until must be a positive number`), so it has no field path of its own. The CLI prints it
 * and exits 2, with the usage text after it when `showUsage` says the call's shape was wrong.
 */
export class UsageError extends InputError {
  readonly showUsage: boolean;

  constructor(message: string, options: { showUsage?: boolean } = {}) {
    super('', message);
    this.name = 'UsageError';
    this.showUsage = options.showUsage ?? false;
  }
}

/** A call of the wrong shape (unknown command or option, missing argument): the usage text follows the message. */
export function callError(message: string): UsageError {
  return new UsageError(message, { showUsage: true });
}
