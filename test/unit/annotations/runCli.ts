/** The CLI run in-process for tests: its exit code and everything it printed. */
import { main } from '../../../src/cli/main';
import type { CliIO } from '../../../src/cli/io';

export interface CliRun {
  code: number;
  out: string;
  err: string;
}

export async function cli(...argv: string[]): Promise<CliRun> {
  let out = '';
  let err = '';
  const io: CliIO = { out: (t) => (out += t + '\n'), err: (t) => (err += t + '\n') };
  const code = await main(argv, io);
  return { code, out, err };
}
