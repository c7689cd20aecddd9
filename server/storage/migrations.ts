/**
 * Versioned migrations of the server's database. Each runs once, in a transaction, and is recorded
 * in `schema_migrations` (version, name, time); `user_version` mirrors the latest. Never edit a
 * migration that has shipped: add the next one.
 */
import type { Database } from 'better-sqlite3';

export interface Migration {
  version: number;
  name: string;
  sql: string;
}

export const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    name: 'clips, profiles and settings',
    sql: `
      CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
      CREATE TABLE clips (
        id TEXT PRIMARY KEY,
        name TEXT NOT NULL,
        sha256 TEXT NOT NULL UNIQUE,
        size_bytes INTEGER NOT NULL,
        format TEXT NOT NULL,
        sample_rate INTEGER NOT NULL,
        channels INTEGER NOT NULL,
        duration_s REAL NOT NULL,
        created_at TEXT NOT NULL
      );
      CREATE TABLE coils (id TEXT PRIMARY KEY, name TEXT NOT NULL, profile TEXT NOT NULL, created_at TEXT NOT NULL, updated_at TEXT NOT NULL);
      CREATE TABLE drivers (id TEXT PRIMARY KEY, name TEXT NOT NULL, profile TEXT NOT NULL, created_at TEXT NOT NULL, updated_at TEXT NOT NULL);
    `,
  },
  {
    version: 2,
    name: 'jobs, analyses, plans, renders and sets',
    sql: `
      CREATE TABLE jobs (
        id TEXT PRIMARY KEY,
        kind TEXT NOT NULL CHECK (kind IN ('analysis', 'set-plan', 'render', 'preview')),
        state TEXT NOT NULL CHECK (state IN ('queued', 'running', 'done', 'failed')),
        progress REAL NOT NULL DEFAULT 0,
        stage TEXT NOT NULL DEFAULT 'queued',
        error TEXT,
        result_id TEXT,
        payload TEXT NOT NULL,
        attempts INTEGER NOT NULL DEFAULT 0,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL
      );
      CREATE INDEX jobs_state ON jobs (state, created_at);
      CREATE TABLE analyses (
        id TEXT PRIMARY KEY,
        clip_id TEXT NOT NULL REFERENCES clips (id) ON DELETE CASCADE,
        channel TEXT NOT NULL,
        frame_ms REAL NOT NULL,
        engine_version TEXT NOT NULL,
        state TEXT NOT NULL,
        job_id TEXT,
        summary TEXT,
        reductions TEXT,
        created_at TEXT NOT NULL
      );
      CREATE INDEX analyses_clip ON analyses (clip_id, channel, frame_ms);
      CREATE TABLE plans (
        id TEXT PRIMARY KEY,
        clip_id TEXT NOT NULL REFERENCES clips (id) ON DELETE CASCADE,
        analysis_id TEXT NOT NULL REFERENCES analyses (id) ON DELETE CASCADE,
        coil_id TEXT NOT NULL,
        driver_id TEXT NOT NULL,
        coil TEXT NOT NULL,
        driver TEXT NOT NULL,
        gain_db REAL,
        settings TEXT NOT NULL,
        document TEXT NOT NULL,
        created_at TEXT NOT NULL
      );
      CREATE TABLE renders (
        id TEXT PRIMARY KEY,
        plan_id TEXT NOT NULL REFERENCES plans (id) ON DELETE CASCADE,
        kind TEXT NOT NULL CHECK (kind IN ('render', 'preview')),
        state TEXT NOT NULL,
        job_id TEXT,
        safe INTEGER,
        summary TEXT,
        request TEXT NOT NULL,
        file TEXT,
        created_at TEXT NOT NULL
      );
      CREATE TABLE sets (
        id TEXT PRIMARY KEY,
        name TEXT NOT NULL,
        coil_id TEXT NOT NULL REFERENCES coils (id) ON DELETE RESTRICT,
        driver_id TEXT NOT NULL REFERENCES drivers (id) ON DELETE RESTRICT,
        common_gain INTEGER NOT NULL DEFAULT 0,
        result TEXT,
        created_at TEXT NOT NULL,
        updated_at TEXT NOT NULL
      );
      CREATE TABLE set_items (
        set_id TEXT NOT NULL REFERENCES sets (id) ON DELETE CASCADE,
        position INTEGER NOT NULL,
        clip_id TEXT NOT NULL REFERENCES clips (id) ON DELETE CASCADE,
        gap_after_s REAL NOT NULL,
        gain_db REAL,
        PRIMARY KEY (set_id, position)
      );
    `,
  },
  {
    version: 3,
    name: 'the gain search a plan found, kept with it',
    // JSON of shared/plan/advise.ts GainSearch (−Infinity written as null); null for plans made
    // before it was kept: the first re-evaluation searches once and stores it.
    sql: `ALTER TABLE plans ADD COLUMN search TEXT;`,
  },
];

/**
 * Applies the migrations above `user_version`, each in its own transaction, up to `upTo`
 * (default all). Returns the versions applied. Throws if the database is newer than this code.
 */
export function migrate(db: Database, upTo = Infinity): number[] {
  db.exec('CREATE TABLE IF NOT EXISTS schema_migrations (version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL)');
  const current = db.pragma('user_version', { simple: true }) as number;
  const latest = MIGRATIONS[MIGRATIONS.length - 1].version;
  if (current > latest) {
    throw new Error(`the database is at schema version ${current}, newer than this coilcue (${latest}); run a newer coilcue or restore a backup`);
  }
  const applied: number[] = [];
  for (const m of MIGRATIONS) {
    if (m.version <= current || m.version > upTo) continue;
    db.transaction(() => {
      db.exec(m.sql);
      db.prepare('INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)').run(m.version, m.name, new Date().toISOString());
      db.pragma(`user_version = ${m.version}`);
    })();
    applied.push(m.version);
  }
  return applied;
}
