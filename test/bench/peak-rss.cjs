// Peak resident memory of this process, in KiB, for the benchmark children.
//
// Linux's getrusage() ru_maxrss (process.resourceUsage().maxRSS) is not this process's own figure
// after fork and exec: the kernel keeps the larger of it and the high-water mark of the address
// space the process had before exec, a copy of its parent's. A benchmark parent holding the
// generated clip (~230 MiB) would then lift every child's figure to its own. /proc/self/status
// VmHWM is the high-water mark of the current address space only; elsewhere maxRSS is used.
'use strict';
const { readFileSync } = require('node:fs');

function peakRssKiB() {
  try {
    const m = /^VmHWM:\s+(\d+)\s+kB$/m.exec(readFileSync('/proc/self/status', 'utf8'));
    if (m) return Number(m[1]);
  } catch {
    // not Linux
  }
  return process.resourceUsage().maxRSS;
}

module.exports = { peakRssKiB };
