// Entry of a job thread of the pool (server/jobs/pool.ts, piscina). CommonJS with tsx's CommonJS
// hook, as server/analysis/worker-entry.cjs explains: Node 20 carries no loader into worker
// threads, and this hook compiles the TypeScript in this thread alone.
'use strict';
require('tsx/cjs/api').register();
const { runTask } = require('./tasks.ts');

module.exports = runTask;
