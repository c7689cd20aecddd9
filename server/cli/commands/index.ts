import type { Command } from '../io.ts';
import { analyzeCommand } from './analyze.ts';
import { coilCommand } from './coil.ts';
import { demoCommand } from './demo.ts';
import { planCommand } from './plan.ts';
import { previewCommand, renderCommand } from './render.ts';

/** Every command of the command line, by the name typed after `coilcue`. */
export const commands: Record<string, Command> = {
  analyze: analyzeCommand,
  coil: coilCommand,
  plan: planCommand,
  demo: demoCommand,
  render: renderCommand, preview: previewCommand,
};
