/**
 * Errors caused by what a person gave us (a file, a profile, a flag), as opposed to bugs.
 * The command line prints `message` on one line and exits 2; the server maps them to 4xx.
 *
 * `code` is a stable machine-readable reason; `message` says what is wrong AND what to do.
 */
export class InputError extends Error {
  override readonly name = 'InputError';
  constructor(
    readonly code: string,
    message: string,
    /** Dotted path of the offending field in a JSON profile, when there is one. */
    readonly field?: string,
  ) {
    super(message);
  }
}

/** True for errors whose message is fit to show a person as is. */
export const isInputError = (e: unknown): e is InputError => e instanceof InputError;
