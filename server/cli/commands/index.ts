import { prestartAnalysisWorker, releasePrestartedWorker } from '../../analysis/worker-handle.ts';
import type { Command } from '../io.ts';
import type { CommandOptions } from '../options.ts';
import { ANALYZE_OPTIONS, COIL_OPTIONS, DEMO_OPTIONS, PLAN_OPTIONS, PREVIEW_OPTIONS, RENDER_OPTIONS } from './tables.ts';

/**
 * A command as the command line lists it: its one-line summary, and its module, loaded only when the
 * command runs. Loading every command up front (the renderer's Web Audio package, the planner, the
 * coil model) took ~1.2 s and ~50 MiB before any work began, measured with `coilcue --help`.
 */
export interface CommandEntry {
  summary: string;
  /** The option table: parsed and validated before anything starts or loads. */
  options: CommandOptions;
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  load(): Promise<Command<any>>;
  /**
   * Work to start, once the options are valid, before the module loads: commands that analyse a
   * clip start the analysis worker, so its start-up overlaps the loading and decoding.
   */
  prestart?(): void;
  /** Releases what prestart started and the command did not take; main.ts calls it on every exit path. */
  release?(): Promise<void>;
}

const WORKER = { prestart: prestartAnalysisWorker, release: releasePrestartedWorker };

/**
 * Loads a command module and takes its command: by import() (Vitest, `node --import tsx`), or, where
 * Node refuses to import TypeScript (ERR_UNKNOWN_FILE_EXTENSION: Node 20 under the executable,
 * bin/coilcue.cjs, whose modules are CommonJS compiled by tsx's hook), by that module's `require`,
 * which the hook compiles.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function lazy<M>(viaRequire: () => M, viaImport: () => Promise<M>, take: (m: M) => Command<any>): () => Promise<Command<any>> {
  return async () => {
    try {
      return take(await viaImport());
    } catch (e) {
      if ((e as { code?: unknown }).code !== 'ERR_UNKNOWN_FILE_EXTENSION' || typeof require !== 'function') throw e;
      return take(viaRequire());
    }
  };
}

/** Every command of the command line, by the name typed after `coilcue`. */
export const commands: Record<string, CommandEntry> = {
  analyze: {
    ...WORKER,
    options: ANALYZE_OPTIONS,
    summary: 'measure a clip: levels, true peak, loudness, spectrum, pitch',
    load: lazy(() => require('./analyze.ts') as typeof import('./analyze.ts'), () => import('./analyze.ts'), (m) => m.analyzeCommand),
  },
  coil: {
    options: COIL_OPTIONS,
    summary: 'model a coil: inductance, capacitance, resonance, Q, coupling, voltage bound',
    load: lazy(() => require('./coil.ts') as typeof import('./coil.ts'), () => import('./coil.ts'), (m) => m.coilCommand),
  },
  plan: {
    options: PLAN_OPTIONS,
    summary: 'advise the gain for a clip or a set: junction temperatures, duty budget, binding limit',
    load: lazy(() => require('./plan.ts') as typeof import('./plan.ts'), () => import('./plan.ts'), (m) => m.planCommand),
  },
  demo: {
    options: DEMO_OPTIONS,
    summary: 'write the built-in demo scenario to a folder and run every step on it',
    load: lazy(() => require('./demo.ts') as typeof import('./demo.ts'), () => import('./demo.ts'), (m) => m.demoCommand),
  },
  render: {
    options: RENDER_OPTIONS,
    summary: 'write the coil-ready modulation WAV (gain, pre-emphasis, limiter) and re-check every limit on it',
    load: lazy(() => require('./render.ts') as typeof import('./render.ts'), () => import('./render.ts'), (m) => m.renderCommand),
  },
  preview: {
    options: PREVIEW_OPTIONS,
    summary: 'hear and see beforehand what the coil makes of a clip: arc-sound WAV and modulation preview',
    load: lazy(() => require('./preview.ts') as typeof import('./preview.ts'), () => import('./preview.ts'), (m) => m.previewCommand),
  },
};
