import type { Command } from '../io.ts';

/** Every command of the command line, by the name typed after `coilcue`. */
export const commands: Record<string, Command> = {};
