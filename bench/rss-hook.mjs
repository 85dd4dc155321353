// Preloaded into a benchmarked `plenum` process (node --import): at exit it writes the
// process's resource usage (peak resident memory maxRSS in kB, CPU times in µs) as JSON to the
// file named by PLENUM_BENCH_USAGE, so that the benchmark sees a child's peak memory without
// relying on /usr/bin/time. maxRSS covers every thread of the process.
import { writeFileSync } from 'node:fs';

const target = process.env.PLENUM_BENCH_USAGE;
if (target) {
  process.on('exit', () => {
    const u = process.resourceUsage();
    writeFileSync(target, JSON.stringify({ maxRSS: u.maxRSS, userCPUTime: u.userCPUTime, systemCPUTime: u.systemCPUTime }));
  });
}
