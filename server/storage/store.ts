/**
 * The server's rows: one SQLite database (better-sqlite3, WAL, foreign keys on, full sync so a
 * committed row survives a power cut), migrated at open (migrations.ts). Every method is
 * synchronous and short; rows come back in the API's shapes (shared/schemas/api.ts).
 */
import { randomBytes } from 'node:crypto';
import Sqlite, { type Database } from 'better-sqlite3';
import type { Analysis, AnalysisSettings, Clip, Job, JobKindName, JobStateName, Plan, Render, SetRequest, ShowSet } from '../../shared/schemas/api.ts';
import type { CoilProfile } from '../../shared/schemas/coil.ts';
import type { DriverProfile } from '../../shared/schemas/driver.ts';
import type { GainSearch } from '../../shared/plan/advise.ts';
import { migrate } from './migrations.ts';

/** A new identifier: 12 URL-safe characters (72 random bits). */
export const newId = (): string => randomBytes(9).toString('base64url');
const now = (): string => new Date().toISOString();
const json = (v: unknown): string => JSON.stringify(v, (_k, x) => (typeof x === 'number' && !Number.isFinite(x) ? null : x));
const parse = <T>(s: string | null): T | null => (s === null ? null : (JSON.parse(s) as T));

type Row = Record<string, unknown>;

export interface ProfileRow<P> {
  id: string;
  name: string;
  profile: P;
  createdAt: string;
  updatedAt: string;
}

/** What a job row carries for its runner. */
export type JobPayload =
  | { kind: 'analysis'; analysisId: string; then?: { plan: PlanIntent } }
  | { kind: 'render' | 'preview'; renderId: string }
  | { kind: 'set-plan'; setId: string };

/** A plan to make once its analysis is done. */
export interface PlanIntent {
  clipId: string;
  coilId: string;
  driverId: string;
  gainDb: number | null;
  settings: { marginK?: number; allowedShare?: number; ambientC?: number };
}

export interface StoredAnalysis extends Analysis {
  /** File name under analyses/ (null until done). */
  reductions: string | null;
}

export interface StoredRender extends Render {
  file: string | null;
  request: Record<string, unknown>;
}

export interface StoredPlan extends Plan {
  settings: { marginK?: number; allowedShare?: number; ambientC?: number };
  /** The gain search behind the plan (null for a plan stored before searches were kept). */
  search: GainSearch | null;
}

/** A stored search as written: JSON has no −Infinity, the gain of a driver that fails on silence. */
function searchOf(s: string | null): GainSearch | null {
  const v = parse<GainSearch & { atAdvisedGainDb: number | null }>(s);
  return v === null ? null : { ...v, atAdvisedGainDb: v.atAdvisedGainDb ?? -Infinity };
}

const clipOf = (r: Row): Clip => ({
  id: r.id as string,
  name: r.name as string,
  sha256: r.sha256 as string,
  sizeBytes: r.size_bytes as number,
  format: r.format as Clip['format'],
  sampleRate: r.sample_rate as number,
  channels: r.channels as number,
  durationS: r.duration_s as number,
  createdAt: r.created_at as string,
});
const jobOf = (r: Row): Job => ({
  id: r.id as string,
  kind: r.kind as JobKindName,
  state: r.state as JobStateName,
  progress: r.progress as number,
  stage: r.stage as string,
  error: parse(r.error as string | null),
  resultId: (r.result_id as string | null) ?? null,
  createdAt: r.created_at as string,
  updatedAt: r.updated_at as string,
});
const analysisOf = (r: Row): StoredAnalysis => ({
  id: r.id as string,
  clipId: r.clip_id as string,
  settings: { channel: r.channel as AnalysisSettings['channel'], frameMs: r.frame_ms as number },
  engineVersion: r.engine_version as string,
  state: r.state as JobStateName,
  jobId: (r.job_id as string | null) ?? null,
  summary: parse(r.summary as string | null),
  createdAt: r.created_at as string,
  reductions: (r.reductions as string | null) ?? null,
});
const planOf = (r: Row): StoredPlan => ({
  id: r.id as string,
  clipId: r.clip_id as string,
  analysisId: r.analysis_id as string,
  coilId: r.coil_id as string,
  driverId: r.driver_id as string,
  coil: parse(r.coil as string)!,
  driver: parse(r.driver as string)!,
  gainDb: (r.gain_db as number | null) ?? null,
  settings: parse(r.settings as string)!,
  document: parse(r.document as string)!,
  createdAt: r.created_at as string,
  search: searchOf((r.search as string | null) ?? null),
});
const renderOf = (r: Row): StoredRender => ({
  id: r.id as string,
  planId: r.plan_id as string,
  kind: r.kind as Render['kind'],
  state: r.state as JobStateName,
  jobId: (r.job_id as string | null) ?? null,
  safe: r.safe === null ? null : r.safe === 1,
  summary: parse(r.summary as string | null),
  createdAt: r.created_at as string,
  file: (r.file as string | null) ?? null,
  request: parse(r.request as string)!,
});
const profileOf = <P>(r: Row): ProfileRow<P> => ({
  id: r.id as string,
  name: r.name as string,
  profile: parse<P>(r.profile as string)!,
  createdAt: r.created_at as string,
  updatedAt: r.updated_at as string,
});

/** A foreign-key refusal (a profile a set still uses). */
export class InUseError extends Error {
  override readonly name = 'InUseError';
}

export class Store {
  readonly db: Database;

  /** Opens (creating) the database at `file` and applies the pending migrations. */
  constructor(file: string) {
    this.db = new Sqlite(file, { timeout: 5000 });
    this.db.pragma('journal_mode = WAL');
    this.db.pragma('synchronous = FULL');
    this.db.pragma('foreign_keys = ON');
    migrate(this.db);
  }

  close(): void {
    if (this.db.open) this.db.close();
  }

  /** True when a trivial query answers. */
  reachable(): boolean {
    try {
      return this.db.open && (this.db.prepare('SELECT 1 AS one').get() as Row).one === 1;
    } catch {
      return false;
    }
  }

  getMeta(key: string): string | null {
    return ((this.db.prepare('SELECT value FROM meta WHERE key = ?').get(key) as Row | undefined)?.value as string) ?? null;
  }

  setMeta(key: string, value: string): void {
    this.db.prepare('INSERT INTO meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value').run(key, value);
  }

  /** True when the database holds no clip, profile or set (a fresh data folder). */
  isEmpty(): boolean {
    const n = (t: string) => (this.db.prepare(`SELECT COUNT(*) AS n FROM ${t}`).get() as Row).n as number;
    return n('clips') + n('coils') + n('drivers') + n('sets') === 0;
  }

  // ── clips ──
  insertClip(c: Omit<Clip, 'id' | 'createdAt'>): Clip {
    const clip: Clip = { ...c, id: newId(), createdAt: now() };
    this.db
      .prepare('INSERT INTO clips (id, name, sha256, size_bytes, format, sample_rate, channels, duration_s, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)')
      .run(clip.id, clip.name, clip.sha256, clip.sizeBytes, clip.format, clip.sampleRate, clip.channels, clip.durationS, clip.createdAt);
    return clip;
  }

  getClip(id: string): Clip | null {
    const r = this.db.prepare('SELECT * FROM clips WHERE id = ?').get(id) as Row | undefined;
    return r ? clipOf(r) : null;
  }

  clipBySha(sha256: string): Clip | null {
    const r = this.db.prepare('SELECT * FROM clips WHERE sha256 = ?').get(sha256) as Row | undefined;
    return r ? clipOf(r) : null;
  }

  listClips(): Clip[] {
    return (this.db.prepare('SELECT * FROM clips ORDER BY created_at, id').all() as Row[]).map(clipOf);
  }

  /**
   * Deletes a clip with its analyses, plans, renders and set entries (one transaction). Returns
   * the files that no row names any more (clip bytes unless another row shares them, reductions,
   * renders), for the caller to remove after the commit; null when there was no such clip.
   */
  deleteClip(id: string): { clips: string[]; analyses: string[]; renders: string[] } | null {
    return this.db.transaction(() => {
      const clip = this.getClip(id);
      if (!clip) return null;
      const analyses = (this.db.prepare('SELECT reductions FROM analyses WHERE clip_id = ? AND reductions IS NOT NULL').all(id) as Row[]).map((r) => r.reductions as string);
      const renders = (
        this.db.prepare('SELECT r.file FROM renders r JOIN plans p ON p.id = r.plan_id WHERE p.clip_id = ? AND r.file IS NOT NULL').all(id) as Row[]
      ).map((r) => r.file as string);
      this.db.prepare('DELETE FROM clips WHERE id = ?').run(id);
      const shared = this.db.prepare('SELECT 1 FROM clips WHERE sha256 = ?').get(clip.sha256);
      return { clips: shared ? [] : [clip.sha256], analyses, renders };
    })();
  }

  // ── profiles ──
  private table(kind: 'coil' | 'driver'): string {
    return kind === 'coil' ? 'coils' : 'drivers';
  }

  insertProfile<P extends { name: string }>(kind: 'coil' | 'driver', profile: P, id = newId()): ProfileRow<P> {
    const t = now();
    this.db.prepare(`INSERT INTO ${this.table(kind)} (id, name, profile, created_at, updated_at) VALUES (?, ?, ?, ?, ?)`).run(id, profile.name, json(profile), t, t);
    return { id, name: profile.name, profile, createdAt: t, updatedAt: t };
  }

  getProfile<P>(kind: 'coil' | 'driver', id: string): ProfileRow<P> | null {
    const r = this.db.prepare(`SELECT * FROM ${this.table(kind)} WHERE id = ?`).get(id) as Row | undefined;
    return r ? profileOf<P>(r) : null;
  }

  listProfiles<P>(kind: 'coil' | 'driver'): ProfileRow<P>[] {
    return (this.db.prepare(`SELECT * FROM ${this.table(kind)} ORDER BY created_at, id`).all() as Row[]).map((r) => profileOf<P>(r));
  }

  updateProfile<P extends { name: string }>(kind: 'coil' | 'driver', id: string, profile: P): ProfileRow<P> | null {
    const res = this.db.prepare(`UPDATE ${this.table(kind)} SET name = ?, profile = ?, updated_at = ? WHERE id = ?`).run(profile.name, json(profile), now(), id);
    return res.changes ? this.getProfile<P>(kind, id) : null;
  }

  /** Deletes a profile; false when absent; InUseError while a set uses it. */
  deleteProfile(kind: 'coil' | 'driver', id: string): boolean {
    try {
      return this.db.prepare(`DELETE FROM ${this.table(kind)} WHERE id = ?`).run(id).changes > 0;
    } catch (e) {
      if (String((e as { code?: string }).code).startsWith('SQLITE_CONSTRAINT') || /FOREIGN KEY/.test(String(e))) throw new InUseError(`a set uses this ${kind}`);
      throw e;
    }
  }

  // ── jobs ──
  createJob(payload: JobPayload, state: JobStateName = 'queued'): Job {
    const t = now();
    const id = newId();
    this.db
      .prepare('INSERT INTO jobs (id, kind, state, progress, stage, payload, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)')
      .run(id, payload.kind, state, state === 'done' ? 1 : 0, state, json(payload), t, t);
    return this.getJob(id)!;
  }

  getJob(id: string): Job | null {
    const r = this.db.prepare('SELECT * FROM jobs WHERE id = ?').get(id) as Row | undefined;
    return r ? jobOf(r) : null;
  }

  jobPayload(id: string): JobPayload | null {
    const r = this.db.prepare('SELECT payload FROM jobs WHERE id = ?').get(id) as Row | undefined;
    return r ? (JSON.parse(r.payload as string) as JobPayload) : null;
  }

  updateJob(id: string, f: Partial<Pick<Job, 'state' | 'progress' | 'stage' | 'error' | 'resultId'>>): Job | null {
    const cur = this.getJob(id);
    if (!cur) return null;
    const n = { ...cur, ...f };
    this.db
      .prepare('UPDATE jobs SET state = ?, progress = ?, stage = ?, error = ?, result_id = ?, updated_at = ? WHERE id = ?')
      .run(n.state, n.progress, n.stage, n.error === null ? null : json(n.error), n.resultId, now(), id);
    return this.getJob(id);
  }

  /** Marks a job running and counts the attempt. */
  startJob(id: string): Job | null {
    this.db.prepare("UPDATE jobs SET state = 'running', stage = 'starting', attempts = attempts + 1, updated_at = ? WHERE id = ?").run(now(), id);
    return this.getJob(id);
  }

  queuedJobIds(): string[] {
    return (this.db.prepare("SELECT id FROM jobs WHERE state = 'queued' ORDER BY created_at, rowid").all() as Row[]).map((r) => r.id as string);
  }

  countJobs(state: JobStateName): number {
    return (this.db.prepare('SELECT COUNT(*) AS n FROM jobs WHERE state = ?').get(state) as Row).n as number;
  }

  /**
   * Jobs a stopped server left running: re-queued once; a job interrupted twice is marked failed
   * with the reason (it may be what stops the server). Returns the ids re-queued and failed.
   */
  recoverInterrupted(): { requeued: string[]; failed: string[] } {
    return this.db.transaction(() => {
      const rows = this.db.prepare("SELECT id, attempts FROM jobs WHERE state = 'running'").all() as Row[];
      const requeued: string[] = [];
      const failed: string[] = [];
      for (const r of rows) {
        if ((r.attempts as number) < 2) {
          this.db.prepare("UPDATE jobs SET state = 'queued', stage = 'queued', progress = 0, updated_at = ? WHERE id = ?").run(now(), r.id);
          requeued.push(r.id as string);
        } else {
          const error = { code: 'interrupted', detail: 'the server stopped twice while this job ran; start it again, and if it keeps failing try a shorter clip' };
          this.db.prepare("UPDATE jobs SET state = 'failed', stage = 'failed', error = ?, updated_at = ? WHERE id = ?").run(json(error), now(), r.id);
          failed.push(r.id as string);
        }
      }
      return { requeued, failed };
    })();
  }

  // ── analyses ──
  createAnalysis(clipId: string, s: AnalysisSettings, engineVersion: string, jobId: string): StoredAnalysis {
    const id = newId();
    this.db
      .prepare("INSERT INTO analyses (id, clip_id, channel, frame_ms, engine_version, state, job_id, created_at) VALUES (?, ?, ?, ?, ?, 'queued', ?, ?)")
      .run(id, clipId, s.channel, s.frameMs, engineVersion, jobId, now());
    return this.getAnalysis(id)!;
  }

  getAnalysis(id: string): StoredAnalysis | null {
    const r = this.db.prepare('SELECT * FROM analyses WHERE id = ?').get(id) as Row | undefined;
    return r ? analysisOf(r) : null;
  }

  listAnalyses(clipId: string): StoredAnalysis[] {
    return (this.db.prepare('SELECT * FROM analyses WHERE clip_id = ? ORDER BY created_at, id').all(clipId) as Row[]).map(analysisOf);
  }

  /** The newest analysis of the clip with these settings made by this engine that is not failed, or null. */
  currentAnalysis(clipId: string, s: AnalysisSettings, engineVersion: string): StoredAnalysis | null {
    const r = this.db
      .prepare("SELECT * FROM analyses WHERE clip_id = ? AND channel = ? AND frame_ms = ? AND engine_version = ? AND state != 'failed' ORDER BY created_at DESC, rowid DESC LIMIT 1")
      .get(clipId, s.channel, s.frameMs, engineVersion) as Row | undefined;
    return r ? analysisOf(r) : null;
  }

  setAnalysisState(id: string, state: JobStateName): void {
    this.db.prepare('UPDATE analyses SET state = ? WHERE id = ?').run(state, id);
  }

  /** Records a finished analysis: its summary and the reductions file already committed under analyses/. */
  finishAnalysis(id: string, summary: unknown, reductions: string): void {
    this.db.prepare("UPDATE analyses SET state = 'done', summary = ?, reductions = ? WHERE id = ?").run(json(summary), reductions, id);
  }

  // ── plans ──
  insertPlan(p: Omit<StoredPlan, 'id' | 'createdAt'>): StoredPlan {
    const id = newId();
    this.db
      .prepare('INSERT INTO plans (id, clip_id, analysis_id, coil_id, driver_id, coil, driver, gain_db, settings, document, search, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)')
      .run(id, p.clipId, p.analysisId, p.coilId, p.driverId, json(p.coil), json(p.driver), p.gainDb, json(p.settings), json(p.document), p.search === null ? null : json(p.search), now());
    return this.getPlan(id)!;
  }

  /** Keeps the gain search of a plan stored without one (it depends only on what the plan fixed). */
  setPlanSearch(id: string, search: GainSearch): void {
    this.db.prepare('UPDATE plans SET search = ? WHERE id = ?').run(json(search), id);
  }

  getPlan(id: string): StoredPlan | null {
    const r = this.db.prepare('SELECT * FROM plans WHERE id = ?').get(id) as Row | undefined;
    return r ? planOf(r) : null;
  }

  // ── renders ──
  createRender(planId: string, kind: Render['kind'], request: Record<string, unknown>, jobId: string): StoredRender {
    const id = newId();
    this.db.prepare("INSERT INTO renders (id, plan_id, kind, state, job_id, request, created_at) VALUES (?, ?, ?, 'queued', ?, ?, ?)").run(id, planId, kind, jobId, json(request), now());
    return this.getRender(id)!;
  }

  getRender(id: string): StoredRender | null {
    const r = this.db.prepare('SELECT * FROM renders WHERE id = ?').get(id) as Row | undefined;
    return r ? renderOf(r) : null;
  }

  setRenderState(id: string, state: JobStateName): void {
    this.db.prepare('UPDATE renders SET state = ? WHERE id = ?').run(state, id);
  }

  /** Records a finished render whose WAV is already committed under renders/. */
  finishRender(id: string, summary: unknown, safe: boolean, file: string): void {
    this.db.prepare("UPDATE renders SET state = 'done', summary = ?, safe = ?, file = ? WHERE id = ?").run(json(summary), safe ? 1 : 0, file, id);
  }

  // ── sets ──
  private setOf(r: Row): ShowSet {
    const items = (this.db.prepare('SELECT clip_id, gap_after_s, gain_db FROM set_items WHERE set_id = ? ORDER BY position').all(r.id) as Row[]).map((i) => ({
      clipId: i.clip_id as string,
      gapAfterS: i.gap_after_s as number,
      gainDb: (i.gain_db as number | null) ?? null,
    }));
    return {
      id: r.id as string,
      name: r.name as string,
      coilId: r.coil_id as string,
      driverId: r.driver_id as string,
      items,
      commonGain: r.common_gain === 1,
      createdAt: r.created_at as string,
      updatedAt: r.updated_at as string,
    };
  }

  getSet(id: string): ShowSet | null {
    const r = this.db.prepare('SELECT * FROM sets WHERE id = ?').get(id) as Row | undefined;
    return r ? this.setOf(r) : null;
  }

  listSets(): ShowSet[] {
    return (this.db.prepare('SELECT * FROM sets ORDER BY created_at, id').all() as Row[]).map((r) => this.setOf(r));
  }

  private writeItems(id: string, s: SetRequest): void {
    this.db.prepare('DELETE FROM set_items WHERE set_id = ?').run(id);
    const ins = this.db.prepare('INSERT INTO set_items (set_id, position, clip_id, gap_after_s, gain_db) VALUES (?, ?, ?, ?, ?)');
    s.items.forEach((it, k) => ins.run(id, k, it.clipId, it.gapAfterS, it.gainDb));
  }

  /** Creates a set (the caller has checked its coil, driver and clips exist). */
  insertSet(s: SetRequest): ShowSet {
    const id = newId();
    const t = now();
    this.db.transaction(() => {
      this.db.prepare('INSERT INTO sets (id, name, coil_id, driver_id, common_gain, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?)').run(id, s.name, s.coilId, s.driverId, s.commonGain ? 1 : 0, t, t);
      this.writeItems(id, s);
    })();
    return this.getSet(id)!;
  }

  /** Replaces a set (its stored plan result goes: it described other items). */
  updateSet(id: string, s: SetRequest): ShowSet | null {
    return this.db.transaction(() => {
      const res = this.db.prepare('UPDATE sets SET name = ?, coil_id = ?, driver_id = ?, common_gain = ?, result = NULL, updated_at = ? WHERE id = ?').run(s.name, s.coilId, s.driverId, s.commonGain ? 1 : 0, now(), id);
      if (!res.changes) return null;
      this.writeItems(id, s);
      return this.getSet(id);
    })();
  }

  deleteSet(id: string): boolean {
    return this.db.prepare('DELETE FROM sets WHERE id = ?').run(id).changes > 0;
  }

  setSetResult(id: string, result: unknown): void {
    this.db.prepare('UPDATE sets SET result = ? WHERE id = ?').run(json(result), id);
  }

  getSetResult<T>(id: string): T | null {
    const r = this.db.prepare('SELECT result FROM sets WHERE id = ?').get(id) as Row | undefined;
    return r ? parse<T>(r.result as string | null) : null;
  }

  /** File names every folder's rows name (for the start-up sweep). */
  referencedFiles(): { clips: Set<string>; analyses: Set<string>; renders: Set<string> } {
    const col = (sql: string) => new Set((this.db.prepare(sql).all() as Row[]).map((r) => r.f as string));
    return {
      clips: col('SELECT sha256 AS f FROM clips'),
      analyses: col('SELECT reductions AS f FROM analyses WHERE reductions IS NOT NULL'),
      renders: col('SELECT file AS f FROM renders WHERE file IS NOT NULL'),
    };
  }

  /**
   * Rows whose file is missing (only a damaged or hand-edited data folder has any): finished
   * analyses and renders lose their state so they are made again; clips are deleted.
   */
  dropRowsWithoutFiles(exists: (folder: 'clips' | 'analyses' | 'renders', name: string) => boolean): string[] {
    const dropped: string[] = [];
    for (const c of this.listClips()) if (!exists('clips', c.sha256)) (this.deleteClip(c.id), dropped.push(`clip ${c.id}`));
    for (const r of this.db.prepare('SELECT id, reductions FROM analyses WHERE reductions IS NOT NULL').all() as Row[]) {
      if (!exists('analyses', r.reductions as string)) {
        this.db.prepare("UPDATE analyses SET state = 'failed', reductions = NULL WHERE id = ?").run(r.id);
        dropped.push(`analysis ${r.id}`);
      }
    }
    for (const r of this.db.prepare('SELECT id, file FROM renders WHERE file IS NOT NULL').all() as Row[]) {
      if (!exists('renders', r.file as string)) {
        this.db.prepare("UPDATE renders SET state = 'failed', file = NULL WHERE id = ?").run(r.id);
        dropped.push(`render ${r.id}`);
      }
    }
    return dropped;
  }
}

export type { CoilProfile, DriverProfile };
