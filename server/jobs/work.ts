/**
 * What each kind of job does with the rows (the executor the JobRunner calls), and the making of
 * a plan from a finished analysis, which both POST /api/plans and an analysis job that was asked
 * for a plan use.
 */
import { join } from 'node:path';
import type { AnalysisSettings, Job } from '../../shared/schemas/api.ts';
import type { GainSearch } from '../../shared/plan/advise.ts';
import type { CoilProfile } from '../../shared/schemas/coil.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import type { WavSampleFormat } from '../audio/wav.ts';
import { engineVersion } from '../services/engine-version.ts';
import type { DataPaths } from '../storage/files.ts';
import type { JobPayload, PlanIntent, StoredPlan, Store } from '../storage/store.ts';
import { type JobExecutor, type JobRunner, TaskFailure } from './runner.ts';

/** The analysis settings a plan uses: the channel asked for, 1 ms frames (the planner's grid). */
export const planAnalysisSettings = (channel: AnalysisSettings['channel'] = 'mix'): AnalysisSettings => ({ channel, frameMs: 1 });

const missing = (what: string, id: string) => new TaskFailure('not-found', `the ${what} ${id} no longer exists; it was deleted while the job waited`);

/** Makes and stores a plan from a finished analysis (the gain search runs in the pool). */
export async function makePlan(store: Store, paths: DataPaths, runner: JobRunner, analysisId: string, intent: PlanIntent): Promise<StoredPlan> {
  const analysis = store.getAnalysis(analysisId);
  const clip = store.getClip(intent.clipId);
  const coil = store.getProfile<CoilProfile>('coil', intent.coilId);
  const driver = store.getProfile<DriverProfile>('driver', intent.driverId);
  if (!analysis?.reductions) throw missing('analysis', analysisId);
  if (!clip) throw missing('clip', intent.clipId);
  if (!coil) throw missing('coil', intent.coilId);
  if (!driver) throw missing('driver', intent.driverId);
  const out = (await runner.run({
    kind: 'plan',
    reductionsPath: join(paths.analyses, analysis.reductions),
    name: clip.name,
    coil: coil.profile,
    driver: driver.profile,
    settings: intent.settings,
    gainDb: intent.gainDb,
  })) as { document: Record<string, unknown>; search: GainSearch };
  return store.insertPlan({
    clipId: clip.id,
    analysisId,
    coilId: coil.id,
    driverId: driver.id,
    coil: coil.profile,
    driver: driver.profile,
    gainDb: intent.gainDb,
    settings: intent.settings,
    document: out.document,
    search: out.search,
  });
}

/**
 * Starts an analysis of a clip (a row and its job); `then` makes a plan once it is done (the
 * job's resultId is then the plan's id). QueueFullError when the queue is full.
 */
export function startAnalysis(store: Store, runner: JobRunner, clipId: string, settings: AnalysisSettings, then?: { plan: PlanIntent }) {
  runner.checkRoom();
  return store.db.transaction(() => {
    const job = store.createJob({ kind: 'analysis', analysisId: '', ...(then ? { then } : {}) });
    const analysis = store.createAnalysis(clipId, settings, engineVersion(), job.id);
    store.db.prepare('UPDATE jobs SET payload = ? WHERE id = ?').run(JSON.stringify({ kind: 'analysis', analysisId: analysis.id, ...(then ? { then } : {}) }), job.id);
    return { analysis, job };
  })();
}

/** The executor of every job kind. */
export function executorFor(store: Store, paths: DataPaths): JobExecutor {
  return async (job: Job, payload: JobPayload, runner: JobRunner) => {
    const progress = (f: number, stage: string) => runner.progress(job.id, f, stage);
    switch (payload.kind) {
      case 'analysis': {
        const a = store.getAnalysis(payload.analysisId);
        if (!a) throw missing('analysis', payload.analysisId);
        const clip = store.getClip(a.clipId);
        if (!clip) throw missing('clip', a.clipId);
        store.setAnalysisState(a.id, 'running');
        const name = `${a.id}.bin`;
        const { tmpPath, finalPath } = runner.files('analyses', name);
        try {
          const out = (await runner.run(
            { kind: 'analysis', clipPath: join(paths.clips, clip.sha256), channel: a.settings.channel, frameS: a.settings.frameMs / 1000, tmpPath, finalPath },
            payload.then ? (f, s) => progress(0.9 * f, s) : progress,
            job.id,
          )) as { summary: unknown };
          if (!store.getAnalysis(a.id)) {
            await runner.removeTemp(finalPath); // its clip was deleted while it ran
            throw missing('clip', a.clipId);
          }
          store.finishAnalysis(a.id, out.summary, name);
        } catch (e) {
          store.setAnalysisState(a.id, 'failed');
          await runner.removeTemp(tmpPath);
          throw e;
        }
        if (payload.then) {
          progress(0.9, 'planning');
          return (await makePlan(store, paths, runner, a.id, payload.then.plan)).id;
        }
        return a.id;
      }
      case 'render':
      case 'preview': {
        const r = store.getRender(payload.renderId);
        if (!r) throw missing('render', payload.renderId);
        const plan = store.getPlan(r.planId);
        if (!plan) throw missing('plan', r.planId);
        const clip = store.getClip(plan.clipId);
        if (!clip) throw missing('clip', plan.clipId);
        store.setRenderState(r.id, 'running');
        const name = `${r.id}.wav`;
        const { tmpPath, finalPath } = runner.files('renders', name);
        const req = r.request as { gainDb?: number | null; format?: WavSampleFormat; preEmphasisDb?: number; ceilingDbfs?: number };
        const analysis = store.getAnalysis(plan.analysisId);
        try {
          const out = (await runner.run(
            {
              kind: r.kind,
              clipPath: join(paths.clips, clip.sha256),
              clipName: clip.name,
              coil: plan.coil as CoilProfile,
              driver: plan.driver,
              settings: plan.settings,
              channel: analysis?.settings.channel ?? 'mix',
              gainDb: req.gainDb ?? plan.gainDb ?? null,
              format: req.format ?? 's16',
              preEmphasisDb: req.preEmphasisDb,
              ceilingDbfs: req.ceilingDbfs ?? 0,
              tmpPath,
              finalPath,
            },
            progress,
            job.id,
          )) as { summary: unknown; safe: boolean };
          if (!store.getRender(r.id)) {
            await runner.removeTemp(finalPath); // its plan or clip was deleted while it ran
            throw missing('render', r.id);
          }
          store.finishRender(r.id, out.summary, out.safe, name);
        } catch (e) {
          store.setRenderState(r.id, 'failed');
          await runner.removeTemp(tmpPath);
          throw e;
        }
        return r.id;
      }
      case 'set-plan': {
        const set = store.getSet(payload.setId);
        if (!set) throw missing('set', payload.setId);
        const coil = store.getProfile<CoilProfile>('coil', set.coilId);
        const driver = store.getProfile<DriverProfile>('driver', set.driverId);
        if (!coil || !driver) throw missing('profile', set.coilId);
        const items = [];
        for (const [k, it] of set.items.entries()) {
          const clip = store.getClip(it.clipId);
          if (!clip) throw missing('clip', it.clipId);
          let a = store.currentAnalysis(clip.id, planAnalysisSettings(), engineVersion());
          if (!a || a.state !== 'done' || !a.reductions) {
            // Analyse it within this job (one thread at a time), recorded like any analysis.
            const row = store.createAnalysis(clip.id, planAnalysisSettings(), engineVersion(), job.id);
            const name = `${row.id}.bin`;
            const { tmpPath, finalPath } = runner.files('analyses', name);
            try {
              const out = (await runner.run(
                { kind: 'analysis', clipPath: join(paths.clips, clip.sha256), channel: 'mix', frameS: 0.001, tmpPath, finalPath },
                (f, s) => progress((0.8 * (k + f)) / set.items.length, `analysing ${clip.name}: ${s}`),
                job.id,
              )) as { summary: unknown };
              store.finishAnalysis(row.id, out.summary, name);
            } catch (e) {
              store.setAnalysisState(row.id, 'failed');
              await runner.removeTemp(tmpPath);
              throw e;
            }
            a = store.getAnalysis(row.id)!;
          }
          items.push({ reductionsPath: join(paths.analyses, a.reductions!), name: clip.name, gapAfterS: it.gapAfterS, gainDb: it.gainDb });
        }
        progress(0.8, 'planning');
        const out = await runner.run({ kind: 'set-plan', items, coil: coil.profile, driver: driver.profile, settings: {}, commonGain: set.commonGain }, (f, s) => progress(0.8 + 0.2 * f, s), job.id);
        store.setSetResult(set.id, out);
        return set.id;
      }
    }
  };
}
