// Preloaded (node -r) by scripts/bench/meshRunProcess.mjs: writes the process's CPU time (user + system, every
// thread, microseconds, from the runtime's own counters) to standard error as the process exits, finer than the
// hundredths of a second /usr/bin/time prints (a JSON.parse process takes about 0.05 s).
process.on('exit', () => {
  const u = process.cpuUsage();
  process.stderr.write(`\ncpu-us ${u.user + u.system}\n`);
});
