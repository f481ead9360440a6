// Peak resident memory of this process, for benchmarks that measure in child processes.
import { readFileSync } from 'node:fs';

/**
 * Peak resident memory of this process in MB. On Linux, VmHWM of /proc/self/status: getrusage's
 * maxRSS also counts the parent's resident memory at fork time (the bench's parent holds the
 * generated workbook), VmHWM starts afresh with the new program (proc(5)).
 */
export function peakResidentMB(): number {
  try {
    const m = /^VmHWM:\s+(\d+) kB/m.exec(readFileSync('/proc/self/status', 'utf8'));
    if (m) return Number(m[1]) / 1024;
  } catch { /* not Linux */ }
  return process.resourceUsage().maxRSS / 1024;
}
