/**
 * What a command may touch of the outside world, passed in so tests can capture it.
 * Commands never call process.exit or console.*; they write here and return an exit code.
 */
export interface CliIo {
  out(text: string): void;
  err(text: string): void;
  /** True when stderr is an interactive terminal (progress bars only then). */
  errIsTty: boolean;
  /** Directory relative paths are resolved against. */
  cwd: string;
}

export const processIo = (): CliIo => ({
  out: (t) => process.stdout.write(t),
  err: (t) => process.stderr.write(t),
  errIsTty: Boolean(process.stderr.isTTY),
  cwd: process.cwd(),
});

/** Exit codes: 0 success, 1 internal fault (a bug: report it), 2 bad input (the message says what to fix). */
export const EXIT_OK = 0;
export const EXIT_INTERNAL = 1;
export const EXIT_BAD_INPUT = 2;

/** A command: parses its own arguments, writes through io, returns an exit code. */
export type Command = {
  usage: string;
  run(argv: string[], io: CliIo): Promise<number>;
};
