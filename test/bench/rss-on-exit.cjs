// Preloaded into a benchmark child with `node --require`: when the process exits, writes its peak
// resident memory (KiB, process.resourceUsage().maxRSS) to the file named by COILCUE_BENCH_RSS_FILE.
// It adds nothing else, so the child runs the executable exactly as a user does.
'use strict';
const { writeFileSync } = require('node:fs');

process.on('exit', () => {
  const file = process.env.COILCUE_BENCH_RSS_FILE;
  if (file) writeFileSync(file, String(process.resourceUsage().maxRSS));
});
