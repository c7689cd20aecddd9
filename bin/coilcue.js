#!/usr/bin/env node
// Entry for `npx coilcue …`: runs the TypeScript command line through tsx (a runtime dependency),
// so a fresh `npm install` is all a user needs. tsx's CommonJS hook compiles in this thread; its
// ESM hooks would start a loader thread of their own (~28 MiB more resident memory, measured).
import { createRequire } from 'node:module';

const require = createRequire(import.meta.url);
require('tsx/cjs/api').register();
const { main } = require('../server/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
