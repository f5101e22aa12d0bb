// Benchmark helper (not a test): run a command and sample the CPU time of each of its threads from Linux's
// /proc/<pid>/task/<tid>/stat while it runs, so a benchmark on a shared machine can say how the work was
// spread over threads, whatever else held the cores. Elsewhere than Linux the thread figures are null.
import { spawn } from 'node:child_process';
import { closeSync, existsSync, openSync, readdirSync, readFileSync } from 'node:fs';

/** Clock ticks per second of /proc's utime and stime (USER_HZ, 100 on Linux: getconf CLK_TCK). */
const TICKS_PER_S = 100;

/** utime + stime of one /proc stat line, in seconds (fields 14 and 15; the command name may hold spaces). */
function cpuOfStatLine(line) {
  const rest = line.slice(line.lastIndexOf(')') + 2).split(' ');
  return (Number(rest[11]) + Number(rest[12])) / TICKS_PER_S;
}

function sample(pid, threads) {
  let total = null;
  try {
    total = cpuOfStatLine(readFileSync(`/proc/${pid}/stat`, 'utf8'));
    for (const tid of readdirSync(`/proc/${pid}/task`)) {
      try {
        threads.set(Number(tid), cpuOfStatLine(readFileSync(`/proc/${pid}/task/${tid}/stat`, 'utf8')));
      } catch {
        // the thread ended between the listing and the read
      }
    }
  } catch {
    // the process has ended
  }
  return total;
}

/**
 * Run `command args` with standard output to `outFile`; resolve with the wall time (ms), the exit status, the
 * process's CPU time (s, every thread, from its last sample: within a sampling interval of the end) and the
 * last CPU time seen of each thread: `main` (the thread that started the process) and the others, largest first.
 */
export function runWithThreadCpu(command, args, outFile, intervalMs = 10) {
  const procfs = existsSync('/proc/self/task');
  const fd = openSync(outFile, 'w');
  const t0 = process.hrtime.bigint();
  const child = spawn(command, args, { stdio: ['ignore', fd, 'pipe'] });
  closeSync(fd);
  let stderr = '';
  child.stderr.on('data', (d) => (stderr += d));
  const threads = new Map();
  let total = null;
  const timer = procfs
    ? setInterval(() => {
        const t = sample(child.pid, threads);
        if (t !== null) total = t;
      }, intervalMs)
    : null;
  return new Promise((resolve) => {
    child.on('exit', (status) => {
      const ms = Number(process.hrtime.bigint() - t0) / 1e6;
      if (timer) clearInterval(timer);
      const main = threads.get(child.pid) ?? null;
      const others = [...threads].filter(([tid]) => tid !== child.pid).map(([, s]) => s);
      others.sort((a, b) => b - a);
      resolve({ ms, status, stderr, cpu: procfs ? total : null, main: procfs ? main : null, others: procfs ? others : null });
    });
  });
}
