// Preloaded into a benchmark child with `node --require`: when the process exits, writes its peak
// resident memory (KiB, peak-rss.cjs) to the file named by COILCUE_BENCH_RSS_FILE. It adds nothing
// else, so the child runs the executable exactly as a user does.
'use strict';
const { writeFileSync } = require('node:fs');
const { peakRssKiB } = require('./peak-rss.cjs');

process.on('exit', () => {
  const file = process.env.COILCUE_BENCH_RSS_FILE;
  if (file) writeFileSync(file, String(peakRssKiB()));
});
