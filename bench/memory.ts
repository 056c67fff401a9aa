import { readFileSync } from 'node:fs';

/**
 * Peak resident memory of this process so far, in bytes: VmHWM from
 * /proc/self/status where there is one (Linux), else getrusage's maxRSS.
 * VmHWM first because on Linux a child forked from a large process (the
 * benchmark) inherits the parent's maxRSS high-water mark, so maxRSS would
 * report at least the parent's size; VmHWM belongs to the child's own
 * address space, which starts afresh at exec.
 */
export function peakResidentBytes(): number {
  try {
    const match = /VmHWM:\s+(\d+) kB/.exec(readFileSync('/proc/self/status', 'utf8'));
    if (match) return Number(match[1]) * 1024;
  } catch {
    // No /proc: fall back to getrusage.
  }
  return process.resourceUsage().maxRSS * 1024;
}
