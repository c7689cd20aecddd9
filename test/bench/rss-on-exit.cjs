// Preloaded into a benchmark child with `node --require`: when the process exits, writes its peak
// resident memory (KiB, peak-rss.cjs) and its CPU time (user + system of every thread, s) as JSON
// to the file named by COILCUE_BENCH_RSS_FILE. It adds nothing else, so the child runs the
// executable exactly as a user does.
'use strict';
const { writeFileSync } = require('node:fs');
const { peakRssKiB } = require('./peak-rss.cjs');

process.on('exit', () => {
  const file = process.env.COILCUE_BENCH_RSS_FILE;
  if (!file) return;
  const cpu = process.cpuUsage();
  writeFileSync(file, JSON.stringify({ rssKiB: peakRssKiB(), cpuS: (cpu.user + cpu.system) / 1e6 }));
});
