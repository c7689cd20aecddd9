#!/usr/bin/env node
// Entry for `npx coilcue …`: loads the TypeScript command line through tsx (a runtime dependency),
// so a fresh `npm install` is all a user needs.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('../server/cli/main.ts');
process.exitCode = await main(process.argv.slice(2));
