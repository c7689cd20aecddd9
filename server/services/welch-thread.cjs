// Entry of the thread that computes Welch's averaged spectrum of a clip as it is decoded (see
// welch-thread.ts). CommonJS with tsx's CommonJS hook, as server/analysis/worker-entry.cjs explains.
'use strict';
const { parentPort, workerData } = require('node:worker_threads');
require('tsx/cjs/api').register();
const { serveWelch } = require('./welch-serve.ts');

serveWelch(parentPort, workerData);
