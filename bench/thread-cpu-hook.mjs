// Preloaded into a `plenum` process (node --import): at exit it writes the CPU seconds of each
// of the process's threads still alive (from /proc/self/task/*/stat, Linux only) and the
// process's total as JSON to the file named by PLENUM_THREAD_CPU. A worker thread that ended
// before the process is not listed: its share is the total less the threads listed. The main
// thread comes first; the other threads named `node` are V8's background threads (the
// optimising compiler, the garbage collector's helpers). See docs/performance.md, "Parallel
// speed-up: CPU of each thread".
import { readdirSync, readFileSync, writeFileSync } from 'node:fs';

const target = process.env.PLENUM_THREAD_CPU;
if (target) {
  process.on('exit', () => {
    const ticks = 100; // USER_HZ on Linux
    const threads = [];
    for (const id of readdirSync('/proc/self/task')) {
      try {
        const stat = readFileSync(`/proc/self/task/${id}/stat`, 'utf8');
        const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
        threads.push({ id: Number(id), name: stat.slice(stat.indexOf('(') + 1, stat.lastIndexOf(')')), cpuS: (Number(fields[11]) + Number(fields[12])) / ticks });
      } catch { /* the thread ended meanwhile */ }
    }
    const u = process.resourceUsage();
    writeFileSync(target, JSON.stringify({ totalS: (u.userCPUTime + u.systemCPUTime) / 1e6, threads }));
  });
}
