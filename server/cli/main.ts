import { isInputError } from '../../shared/errors.ts';
import { EXIT_BAD_INPUT, EXIT_INTERNAL, processIo, type CliIo } from './io.ts';
import { type CommandEntry, commands } from './commands/index.ts';

const SAFETY_LINE =
  'Caution: resonant coils make high voltage and RF that can burn, injure or kill; follow local codes and licensed practice.';

function helpText(): string {
  const lines = ['coilcue: fit music to an audio-modulated resonant coil and keep its transistors alive', '', 'Commands:'];
  for (const [name, c] of Object.entries(commands)) lines.push(`  ${name.padEnd(9)} ${c.summary}`);
  lines.push('', 'Run `coilcue <command> --help` for its options.', SAFETY_LINE, '');
  return lines.join('\n');
}

/** Runs one command line; returns the exit code. Never throws, never exits the process. */
export async function main(argv: string[], io: CliIo = processIo()): Promise<number> {
  const [name, ...rest] = argv;
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    io.out(helpText());
    return name ? 0 : EXIT_BAD_INPUT;
  }
  const entry: CommandEntry | undefined = Object.hasOwn(commands, name) ? commands[name] : undefined;
  if (!entry) {
    io.err(`coilcue: unknown command "${name}"; known: ${Object.keys(commands).join(', ')}\n`);
    return EXIT_BAD_INPUT;
  }
  const wantsHelp = rest.includes('--help') || rest.includes('-h');
  try {
    if (!wantsHelp) entry.prestart?.();
    const command = await entry.load();
    if (wantsHelp) {
      io.out(`${entry.summary}\nUsage: ${command.usage}\n${SAFETY_LINE}\n`);
      return 0;
    }
    return await command.run(rest, io);
  } catch (e) {
    if (isInputError(e)) {
      io.err(`coilcue ${name}: ${e.message.replace(/\s*\n\s*/g, ' ')}\n`);
      return EXIT_BAD_INPUT;
    }
    const msg = e instanceof Error ? e.message : String(e);
    io.err(`coilcue ${name}: internal error: ${msg.split('\n')[0]} (this is a bug; please report it with the input that caused it)\n`);
    return EXIT_INTERNAL;
  }
}
