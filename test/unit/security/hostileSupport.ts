/**
 * Helpers for the hostile-input suites: a sentinel file whose content must never leak, FIFOs, links, and a
 * runner that calls the CLI in-process with a deadline while sampling the process's resident memory.
 */
import { execFileSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { lstatSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import type { CliIO } from '../../../src/cli/io';

/** A token that appears only in the sentinel file: finding it anywhere else is a leak. */
export const TOKEN = `VS-SENTINEL-${randomBytes(8).toString('hex')}`;

/**
 * The sentinel's text: shaped so that a reader taking it as a POSCAR, KPOINTS, annotations file or eigenvalue
 * file would quote it in an error (the token is on every line, also where a number is expected).
 */
export const SENTINEL_TEXT = `${TOKEN} comment\n${TOKEN}\n${TOKEN} ${TOKEN} ${TOKEN}\n{"${TOKEN}": "${TOKEN}"}\n${TOKEN}=${TOKEN}\n`;

export function mkfifo(path: string): void {
  execFileSync('mkfifo', [path]);
}

export interface Outcome {
  /** Exit code, or 'hung' when the command had not ended by the deadline. */
  code: number | 'hung';
  out: string;
  err: string;
  /** Highest resident memory sampled while it ran, minus the value before, MB. */
  peakGrowthMB: number;
}

/** Deadline for one hostile case: far above what a refusal takes (a few milliseconds). */
export const CASE_DEADLINE_MS = 8000;

export async function runCli(argv: string[]): Promise<Outcome> {
  let out = '';
  let err = '';
  const io: CliIO = { out: (t) => void (out += t + '\n'), err: (t) => void (err += t + '\n') };
  const before = process.memoryUsage().rss;
  let peak = before;
  const sampler = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 2);
  let timer: NodeJS.Timeout | undefined;
  const deadline = new Promise<'hung'>((resolve) => {
    timer = setTimeout(() => resolve('hung'), CASE_DEADLINE_MS);
  });
  try {
    const code = await Promise.race([main(argv, io), deadline]);
    peak = Math.max(peak, process.memoryUsage().rss);
    return { code, out, err, peakGrowthMB: (peak - before) / 1e6 };
  } finally {
    clearInterval(sampler);
    clearTimeout(timer);
  }
}

/**
 * Regular files under `dir` (links not followed, FIFOs and devices never opened) that contain the token;
 * folders named `.git` hold the tests' own planted copies of the sentinel and are not searched.
 */
export function filesContainingToken(dir: string, except: string[] = []): string[] {
  const hits: string[] = [];
  const walk = (d: string): void => {
    for (const name of readdirSync(d)) {
      const p = join(d, name);
      if (except.includes(p)) continue;
      const st = lstatSync(p);
      if (st.isDirectory()) {
        if (name !== '.git') walk(p);
      } else if (st.isFile() && readFileSync(p, 'latin1').includes(TOKEN)) hits.push(p);
    }
  };
  walk(dir);
  return hits;
}
