// Entry of the analysis worker thread (see analyze-stream.ts and worker-tasks.ts).
//
// Why a CommonJS file: Node 20 does not carry a loader into worker threads, and tsx's ESM hooks in
// a worker start one more hooks thread (another isolate, measured ~4 MiB more). tsx's CommonJS
// hook (`tsx/cjs/api`) works inside this thread alone: once registered, require() compiles the
// TypeScript of shared/ and server/ (ES module syntax included), under `node bin/coilcue.cjs`,
// `node --import tsx` and Vitest alike. If tsx cannot load, this throws and the main thread falls
// back to analysing alone.
'use strict';
const { parentPort } = require('node:worker_threads');
// The prebuilt worker when the command line runs prebuilt (../prebuilt.cjs), else the sources.
const prebuilt = require('../prebuilt.cjs').prebuiltWorker('analysis-worker.cjs');
if (!prebuilt) require('tsx/cjs/api').register();
const { serveAnalysisJobs } = prebuilt ?? require('./worker-tasks.ts');

serveAnalysisJobs(parentPort);
