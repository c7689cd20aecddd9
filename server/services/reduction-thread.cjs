// Entry of the thread that reduces a stream of samples beside the main thread (Welch's spectrum of
// a clip being decoded, the closed loop's reductions of a render being written; see
// reduction-thread.ts). CommonJS with tsx's CommonJS hook, as server/analysis/worker-entry.cjs
// explains.
'use strict';
const { parentPort } = require('node:worker_threads');
require('tsx/cjs/api').register();
require('../typebox-bundle.cjs').install(); // TypeBox from one file (the file says why)
const { serveReductions } = require('./reduction-serve.ts');

serveReductions(parentPort);
