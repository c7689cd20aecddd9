// Entry of a job thread of the pool (server/jobs/pool.ts, piscina). CommonJS with tsx's CommonJS
// hook, as server/analysis/worker-entry.cjs explains: Node 20 carries no loader into worker
// threads, and this hook compiles the TypeScript in this thread alone.
'use strict';
// Job threads yield the cores to the event loop: on Linux a nice value set with pid 0 applies to
// the calling thread alone, and threads it starts (the analysis's second thread, the decoder's)
// inherit it, so requests are answered promptly while analyses run. Elsewhere this may apply to
// the whole process or fail; both are harmless.
try {
  require('node:os').setPriority(0, 10);
} catch {
  /* not permitted here */
}
require('tsx/cjs/api').register();
require('../typebox-bundle.cjs').install(); // TypeBox from one file (the file says why)
const { runTask } = require('./tasks.ts');
// The analysis's second thread, loading while this one waits for work (tasks.ts starts the next
// one after each analysis); unreferenced, it never keeps the thread alive.
require('../analysis/worker-handle.ts').prestartAnalysisWorker();

module.exports = runTask;
