/** Where CLI commands write: injectable so tests can capture output without spawning. */
export interface CliIO {
  out(text: string): void;
  err(text: string): void;
}

export const processIO: CliIO = {
  out: (t) => process.stdout.write(t.endsWith('\n') ? t : `${t}\n`),
  err: (t) => process.stderr.write(t.endsWith('\n') ? t : `${t}\n`),
};
