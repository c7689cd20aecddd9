// Starts a benchmark child the way bin/coilcue.cjs starts the product: tsx's CommonJS hook in this
// thread (no loader thread), then the TypeScript module's main(). Usage: node child.mjs <file.ts> args…
import { createRequire } from 'node:module';
import { resolve } from 'node:path';

const require = createRequire(import.meta.url);
require('tsx/cjs/api').register();
const file = resolve(process.argv[2]);
process.argv.splice(1, 1); // the module sees argv as if run directly: [node, file.ts, args…]
await require(file).main();
