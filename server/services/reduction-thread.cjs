// Entry of the thread that reduces a stream of samples beside the main thread (Welch's spectrum of
// a clip being decoded, the closed loop's reductions of a render being written; see
// reduction-thread.ts). CommonJS with tsx's CommonJS hook, as server/analysis/worker-entry.cjs
// explains.
'use strict';
const { parentPort } = require('node:worker_threads');
// The prebuilt worker when the command line runs prebuilt (../prebuilt.cjs), else the sources.
const prebuilt = require('../prebuilt.cjs').prebuiltWorker('reduction-worker.cjs');
if (!prebuilt) {
  require('tsx/cjs/api').register();
  require('../typebox-bundle.cjs').install(); // TypeBox from one file (the file says why)
}
const { serveReductions } = prebuilt ?? require('./reduction-serve.ts');

serveReductions(parentPort);
