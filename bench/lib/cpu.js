// Processor time of this process and of the child processes it has waited for (git), in ms.
// Children's time comes from /proc/self/stat (Linux); elsewhere only this process's is counted.
import { readFileSync } from 'node:fs';

const TICK_MS = 10; // USER_HZ is 100 on Linux: /proc times are in hundredths of a second

function childrenMs() {
  try {
    const stat = readFileSync('/proc/self/stat', 'utf8');
    // the fields after the command name (which is in parentheses and may hold spaces)
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(f[13]) + Number(f[14])) * TICK_MS; // cutime, cstime (fields 16 and 17)
  } catch {
    return 0;
  }
}

/** A mark to measure processor time from. */
export function cpuMark() {
  return { own: process.cpuUsage(), children: childrenMs() };
}

/** Processor time (this process and its waited-for children) since `mark`, in ms. */
export function cpuMsSince(mark) {
  const own = process.cpuUsage(mark.own);
  return (own.user + own.system) / 1000 + (childrenMs() - mark.children);
}
