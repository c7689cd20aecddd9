/** Migrations run on an empty database and on one made by the previous migration, keeping its rows. */
import { join } from 'node:path';
import Sqlite from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';
import { MIGRATIONS, migrate } from '../../../server/storage/migrations.ts';
import { Store } from '../../../server/storage/store.ts';
import { tempDataDir } from '../app/helpers.ts';

describe('migrations', () => {
  const data = tempDataDir();
  afterAll(() => data.cleanup());
  const latest = MIGRATIONS[MIGRATIONS.length - 1].version;

  it('build an empty database up to the latest version and record each', () => {
    const db = new Sqlite(join(data.dir, 'empty.sqlite'));
    expect(migrate(db)).toEqual(MIGRATIONS.map((m) => m.version));
    expect(db.pragma('user_version', { simple: true })).toBe(latest);
    expect((db.prepare('SELECT version FROM schema_migrations ORDER BY version').all() as { version: number }[]).map((r) => r.version)).toEqual(MIGRATIONS.map((m) => m.version));
    expect(migrate(db)).toEqual([]); // idempotent
    db.close();
  });

  it('upgrade a database made by the previous migration without losing its rows', () => {
    const file = join(data.dir, 'previous.sqlite');
    const db = new Sqlite(file);
    migrate(db, latest - 1);
    db.prepare("INSERT INTO clips (id, name, sha256, size_bytes, format, sample_rate, channels, duration_s, created_at) VALUES ('c1', 'old.wav', ?, 10, 'wav', 44100, 2, 1, '2026-01-01T00:00:00Z')").run('a'.repeat(64));
    db.exec(`INSERT INTO analyses (id, clip_id, channel, frame_ms, engine_version, state, created_at) VALUES ('a1', 'c1', 'mix', 1, 'x', 'done', '2026-01-01T00:00:00Z');
      INSERT INTO plans (id, clip_id, analysis_id, coil_id, driver_id, coil, driver, gain_db, settings, document, created_at)
        VALUES ('p1', 'c1', 'a1', 'k', 'd', '{}', '{}', NULL, '{}', '{}', '2026-01-01T00:00:00Z')`);
    db.close();
    const store = new Store(file);
    expect(store.getClip('c1')?.name).toBe('old.wav');
    expect(store.getPlan('p1')?.search).toBeNull(); // made before plans kept their gain search
    expect(store.db.pragma('user_version', { simple: true })).toBe(latest);
    expect(store.db.pragma('foreign_keys', { simple: true })).toBe(1);
    expect(String(store.db.pragma('journal_mode', { simple: true }))).toBe('wal');
    expect(store.db.pragma('integrity_check', { simple: true })).toBe('ok');
    store.close();
  });

  it('refuse a database newer than the code', () => {
    const db = new Sqlite(join(data.dir, 'newer.sqlite'));
    db.pragma(`user_version = ${latest + 1}`);
    expect(() => migrate(db)).toThrow(/newer than this coilcue/);
    db.close();
  });
});
