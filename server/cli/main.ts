import { isInputError } from '../../shared/errors.ts';
import { EXIT_BAD_INPUT, EXIT_INTERNAL, processIo, type CliIo } from './io.ts';
import { type CommandEntry, commands } from './commands/index.ts';
import { checkInputFiles, helpText as commandHelp, nearest, parseOptions } from './options.ts';

const SAFETY_LINE =
  'Caution: resonant coils make high voltage and RF that can burn, injure or kill; follow local codes and licensed practice.';

const EXIT_CODES = 'Exit codes: 0 success, 1 internal fault (a bug), 2 bad input (one line on stderr says what to fix), 3 unsafe render (a promised limit breaks on the re-plan), 130 interrupted.';

function helpText(): string {
  const lines = ['coilcue: fit music to an audio-modulated resonant coil and keep its transistors alive', '', 'Commands:'];
  for (const [name, c] of Object.entries(commands)) lines.push(`  ${name.padEnd(9)} ${c.summary}`);
  lines.push('', 'Run `coilcue <command> --help` for its options.', EXIT_CODES, SAFETY_LINE, '');
  return lines.join('\n');
}

function errorLine(io: CliIo, name: string, e: unknown): number {
  if (isInputError(e)) {
    io.err(`coilcue ${name}: ${e.message.replace(/\s*\n\s*/g, ' ')}\n`);
    return EXIT_BAD_INPUT;
  }
  const msg = e instanceof Error ? e.message : String(e);
  io.err(`coilcue ${name}: internal error: ${msg.split('\n')[0]} (this is a bug; please report it with the input that caused it)\n`);
  return EXIT_INTERNAL;
}

/**
 * Runs one command line; returns the exit code. Never throws, never exits the process.
 * Order: the options are parsed and validated against the command's table first (a bad option
 * costs no thread, no file and no module load); only then does the command's prestart (the
 * analysis worker) begin and its module load; whatever prestart began and the command did not
 * take is released on every exit path.
 */
export async function main(argv: string[], io: CliIo = processIo()): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.out(helpText());
    return name ? 0 : EXIT_BAD_INPUT;
  }
  const entry: CommandEntry | undefined = Object.hasOwn(commands, name) ? commands[name] : undefined;
  if (!entry) {
    const near = nearest(name, Object.keys(commands));
    io.err(`coilcue: unknown command "${name}"${near ? ` (did you mean ${near}?)` : ''}; known: ${Object.keys(commands).join(', ')}\n`);
    return EXIT_BAD_INPUT;
  }
  const dashes = rest.indexOf('--');
  const flags = dashes >= 0 ? rest.slice(0, dashes) : rest;
  if (flags.includes('--help') || flags.includes('-h')) {
    io.out(`${commandHelp(entry.options, entry.summary)}${EXIT_CODES}\n${SAFETY_LINE}\n`);
    return 0;
  }
  let parsed;
  try {
    parsed = parseOptions(rest, entry.options);
    await checkInputFiles(entry.options, parsed, io.cwd);
  } catch (e) {
    return errorLine(io, name, e);
  }
  try {
    entry.prestart?.();
    const command = await entry.load();
    return await command.run(parsed, io);
  } catch (e) {
    return errorLine(io, name, e);
  } finally {
    await entry.release?.().catch(() => undefined);
  }
}
