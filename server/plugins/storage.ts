/**
 * Storage: the database (server/storage/store.ts) and the files beside it under DATA_DIR
 * (server/storage/files.ts), opened, migrated and swept at start, closed last.
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import type { FastifyInstance } from 'fastify';
import fp from 'fastify-plugin';
import type { ServerConfig } from '../config.ts';
import { type DataPaths, dataPaths, ensureDirs, sweep } from '../storage/files.ts';
import { readReductions } from '../storage/reductions.ts';
import { Store } from '../storage/store.ts';
import type { StoredReductions } from '../services/stored-plan.ts';

declare module 'fastify' {
  interface FastifyInstance {
    config: ServerConfig;
    store: Store;
    paths: DataPaths;
    /** An analysis's reductions by its file name, from a small cache (re-evaluations come in bursts). */
    reductions(file: string): Promise<StoredReductions>;
  }
}

const CACHE_SIZE = 4;

async function createStorage(app: FastifyInstance, config: ServerConfig): Promise<void> {
  const paths = dataPaths(config.dataDir);
  await ensureDirs(paths);
  const store = new Store(paths.db);
  // Rows first, then files: a row without its file is dropped, a file without a row removed.
  const dropped = store.dropRowsWithoutFiles((folder, name) => existsSync(join(paths[folder], name)));
  if (dropped.length) app.log.warn({ dropped }, 'rows whose file was missing were dropped');
  const removed = await sweep(paths, store.referencedFiles());
  if (removed.length) app.log.info({ removed }, 'start-up sweep removed files no row names');
  const cache = new Map<string, Promise<StoredReductions>>();
  app.decorate('config', config);
  app.decorate('store', store);
  app.decorate('paths', paths);
  app.decorate('reductions', (file: string) => {
    let p = cache.get(file);
    if (p) {
      cache.delete(file);
    } else {
      p = readReductions<StoredReductions>(join(paths.analyses, file));
      p.catch(() => cache.delete(file));
    }
    cache.set(file, p);
    while (cache.size > CACHE_SIZE) cache.delete(cache.keys().next().value as string);
    return p;
  });
  app.addHook('onClose', async () => store.close());
}

export default fp(async (app: FastifyInstance, opts: { config: ServerConfig }) => createStorage(app, opts.config), { name: 'storage' });
