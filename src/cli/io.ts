/** Where CLI commands write: injectable so tests can capture output without spawning. */
export interface CliIO {
  out(text: string): void;
  err(text: string): void;
  /**
   * A transient status line (progress of a batch). Present only where it can be seen and does no harm: on a
   * terminal's stderr. An empty text clears the line.
   */
  progress?: (text: string) => void;
}

export const processIO: CliIO = {
  out: (t) => process.stdout.write(t.endsWith('\n') ? t : `${t}\n`),
  err: (t) => process.stderr.write(t.endsWith('\n') ? t : `${t}\n`),
  ...(process.stderr.isTTY ? { progress: (t: string) => process.stderr.write(t ? `\r${t}\x1b[K` : '\r\x1b[K') } : {}),
};

/**
 * Wait until everything written to a stream has left the process (a pipe may take it more slowly than we
 * write): exiting before that would cut the output. Ends early when the reader has gone (EPIPE).
 */
export function drained(stream: NodeJS.WriteStream): Promise<void> {
  return new Promise((resolve) => {
    let done = false;
    const finish = (): void => {
      if (done) return;
      done = true;
      stream.off('error', finish);
      resolve();
    };
    stream.on('error', finish);
    const poll = (): void => {
      if (done) return;
      if (stream.destroyed || stream.writableLength === 0) finish();
      else setTimeout(poll, 5);
    };
    // The callback of a write runs after every earlier write has been handed on; then poll what is left.
    if (stream.destroyed) finish();
    else stream.write('', () => poll());
  });
}
