import type { CliIO } from '../../src/cli/io';

/** A CLI output sink that keeps what the command printed, one line per call, for the tests to read. */
export function capture(): CliIO & { stdout: string; stderr: string } {
  const io = { stdout: '', stderr: '', out: (t: string) => (io.stdout += `${t}\n`), err: (t: string) => (io.stderr += `${t}\n`) };
  return io;
}
