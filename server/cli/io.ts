import { type CommandOptions, type OptionTable, type ParsedOptions, parseOptions } from './options.ts';

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

/**
 * Exit codes: 0 success, 1 internal fault (a bug: report it), 2 bad input (the message says what to
 * fix), 3 unsafe result (a render whose re-plan breaks a limit the plan promised; nothing is left
 * under the output name unless --keep-unsafe), 130 interrupted (Ctrl-C).
 */
export const EXIT_OK = 0;
export const EXIT_INTERNAL = 1;
export const EXIT_BAD_INPUT = 2;
export const EXIT_UNSAFE = 3;
export const EXIT_INTERRUPTED = 130;

/**
 * A command: its option table (server/cli/commands/tables.ts), and `run`, which receives the
 * options already parsed and validated against that table, writes through io and returns an exit code.
 */
export type Command<T extends OptionTable = OptionTable> = {
  options: CommandOptions<T>;
  run(parsed: ParsedOptions<T>, io: CliIo): Promise<number>;
};

/** Parses `argv` with the command's table and runs it (the demo runs the other commands this way). */
export function runWithArgs<T extends OptionTable>(command: Command<T>, argv: string[], io: CliIo): Promise<number> {
  return command.run(parseOptions(argv, command.options), io);
}
