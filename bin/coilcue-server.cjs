#!/usr/bin/env node
// Entry for `npm start`: runs the TypeScript server through tsx's CommonJS hook, as bin/coilcue.cjs
// does for the command line (no loader thread; the job threads register the same hook themselves).
'use strict';
require('tsx/cjs/api').register();
require('../server/typebox-bundle.cjs').install(); // TypeBox from one file (the file says why)
require('../server/main.ts');
