/**
 * The work a job thread does (server/jobs/job-worker.cjs loads this file in each thread of the
 * pool): decoding and analysing a clip, a plan's gain search, a set plan, a render or a preview.
 * Every task takes plain data and file paths and returns plain data; progress goes out on the
 * MessagePort the task carries. Files are written under tmp/ and renamed to their final name
 * here, so the main thread writes a row only for a file that is complete.
 */
import type { MessagePort } from 'node:worker_threads';
import { planSettings } from '../../shared/plan/evaluate.ts';
import type { CoilProfile } from '../../shared/schemas/coil.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import { isInputError } from '../../shared/errors.ts';
import type { ModulationChannel } from '../../shared/audio/clip.ts';
import type { WavSampleFormat } from '../audio/wav.ts';
import { prestartAnalysisWorker } from '../analysis/worker-handle.ts';
import { releaseMemory } from './release-memory.ts';
import { analysisDocument, loadAndAnalyze } from '../services/analysis.ts';
import { prepareLoadedJob } from '../services/plan.ts';
import { coilReportFor } from '../services/profiles.ts';
import { type PreviewSummary, type RenderSummary, previewJob, renderJob } from '../services/render.ts';
import { StagedFile, writeStaged } from '../render/staged-file.ts';
import { gainSearchOf } from '../../shared/plan/advise.ts';
import { type PlanSettingsInput, type StoredReductions, planStoredSet, storedPlanDocument } from '../services/stored-plan.ts';
import { commitFile, removeQuietly } from '../storage/files.ts';
import { readReductions, writeReductions } from '../storage/reductions.ts';

export type Task =
  | { kind: 'analysis'; clipPath: string; channel: ModulationChannel; frameS: number; tmpPath: string; finalPath: string; port?: MessagePort }
  | { kind: 'plan'; reductionsPath: string; name: string; coil: CoilProfile; driver: DriverProfile; settings: PlanSettingsInput; gainDb: number | null; port?: MessagePort }
  | {
      kind: 'render' | 'preview';
      clipPath: string;
      clipName: string;
      coil: CoilProfile;
      driver: DriverProfile;
      settings: PlanSettingsInput;
      channel: ModulationChannel;
      gainDb: number | null;
      format: WavSampleFormat;
      preEmphasisDb?: number;
      ceilingDbfs: number;
      tmpPath: string;
      finalPath: string;
      port?: MessagePort;
    }
  | {
      kind: 'set-plan';
      items: { reductionsPath: string; name: string; gapAfterS: number; gainDb: number | null }[];
      coil: CoilProfile;
      driver: DriverProfile;
      settings: PlanSettingsInput;
      commonGain: boolean;
      port?: MessagePort;
    };

/** A task's answer: its result, or an input error to show the person (other errors are thrown). */
export type TaskResult = { ok: true; value: unknown } | { ok: false; code: string; detail: string; field?: string };

/** Progress message on a task's port. */
export interface ProgressMessage {
  fraction: number;
  stage: string;
}

function reporter(port: MessagePort | undefined) {
  let last = -1;
  let lastStage = '';
  return (fraction: number, stage: string) => {
    if (!port) return;
    if (stage === lastStage && fraction - last < 0.01) return;
    last = fraction;
    lastStage = stage;
    port.postMessage({ fraction, stage } satisfies ProgressMessage);
  };
}

async function run(task: Task): Promise<unknown> {
  const progress = reporter(task.port);
  switch (task.kind) {
    case 'analysis': {
      const { analysis, pulseEvents } = await loadAndAnalyze(task.clipPath, {
        channel: task.channel,
        frameS: task.frameS,
        onProgress: (f, s) => progress(0.97 * f, s === 'done' ? 'analysed' : s),
      });
      progress(0.98, 'storing');
      try {
        await writeReductions(task.tmpPath, { analysis, pulseEvents } satisfies StoredReductions);
        await commitFile(task.tmpPath, task.finalPath);
      } catch (e) {
        await removeQuietly(task.tmpPath);
        throw e;
      }
      // The next analysis in this thread finds its second thread loaded (~0.3 s of start-up here).
      prestartAnalysisWorker();
      return { summary: analysisDocument(analysis) };
    }
    case 'plan': {
      const r = await readReductions<StoredReductions>(task.reductionsPath);
      const { document, settings, advice } = storedPlanDocument(r, task.name, task.coil, task.driver, task.settings, task.gainDb);
      return { document, settings, search: 'atAdvised' in advice ? gainSearchOf(advice) : advice };
    }
    case 'render':
    case 'preview': {
      // The preview reads no spectrum; the render's pre-emphasis advice does.
      const job = await prepareLoadedJob('/', task.clipPath, coilReportFor(task.coil, task.driver), task.driver, task.channel, (f, s) => progress(0.6 * f, s), {
        spectrum: task.kind === 'render',
      });
      let summary: RenderSummary | PreviewSummary;
      try {
        job.settings = planSettings(task.driver, task.settings);
        progress(0.6, task.kind === 'render' ? 'rendering' : 'previewing');
        const suffix = task.kind === 'render' ? '-coil.wav' : '-arcs.wav';
        const names = { clip: task.clipName, out: `${task.clipName.replace(/\.[A-Za-z0-9]+$/, '')}${suffix}` };
        const gainDb = task.gainDb ?? undefined;
        // Written under tmp/ as it is made, renamed to its final name once complete (a render that
        // breaks its plan is kept too, and marked so below).
        summary = await writeStaged(StagedFile.create(task.finalPath, task.tmpPath, { fileSystemErrors: 'as-is' }), async (out) => {
          const made =
            task.kind === 'render'
              ? (await renderJob(job, { names, gainDb, format: task.format, preEmphasisDb: task.preEmphasisDb, ceilingDbfs: task.ceilingDbfs }, out)).summary
              : previewJob(job, { names, gainDb, format: task.format }, out).summary;
          progress(0.95, 'storing');
          return made;
        });
      } finally {
        job.source.close();
      }
      const safe = 'closedLoop' in summary ? summary.closedLoop.ok && summary.closedLoop.promiseKept : true;
      return { summary, safe };
    }
    case 'set-plan': {
      const items = [];
      for (const [k, it] of task.items.entries()) {
        progress((0.5 * k) / task.items.length, 'loading');
        items.push({ reductions: await readReductions<StoredReductions>(it.reductionsPath), name: it.name, gapAfterS: it.gapAfterS, gainDb: it.gainDb });
      }
      progress(0.5, 'planning');
      return planStoredSet(items, task.coil, task.driver, task.settings, task.commonGain);
    }
  }
}

/** Runs one task; an InputError becomes a result the main thread shows as is. */
export async function runTask(task: Task): Promise<TaskResult> {
  try {
    return { ok: true, value: await run(task) };
  } catch (e) {
    if (isInputError(e)) return { ok: false, code: e.code, detail: e.message, ...(e.field ? { field: e.field } : {}) };
    throw e;
  } finally {
    task.port?.close();
    // Once the result has gone back: a job thread idles after a job, and the clip it held would
    // stay resident until the next job's allocations made V8 collect it (release-memory.ts).
    setImmediate(releaseMemory);
  }
}
