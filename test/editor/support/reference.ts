/**
 * What the scenarios compare the editor against, from outside the editor: the command-line twin's
 * `analyze --json` on the same file (the acceptance: the annotations file holds the same numbers as
 * `valleyscope analyze`), and the k-path as written in a VASP line-mode KPOINTS file.
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

export interface CliPoint {
  band: number;
  spin: number;
  k: number[];
  eV: number;
  label: string | null;
}
export interface CliMass {
  towards: string;
  direction: number[];
  mass: number;
  stderr: number;
  points: number;
  window_meV: number;
  method: string;
}
export interface CliExtremum extends CliPoint {
  kind: string;
  masses: CliMass[];
}
export interface CliReport {
  metal: boolean;
  gap: { eV: number; direct: boolean; vbm: CliPoint; cbm: CliPoint } | null;
  extrema: CliExtremum[];
}

/** `node dist/cli.js analyze --json FILE [extra args]` (the built CLI of this checkout). */
export function cliAnalyze(repoRoot: string, file: string, extra: string[] = []): CliReport {
  const out = execFileSync(process.execPath, [join(repoRoot, 'dist', 'cli.js'), 'analyze', '--json', ...extra, file], {
    encoding: 'utf8',
    timeout: 120_000,
  });
  return JSON.parse(out) as CliReport;
}

/**
 * The segments of a VASP line-mode KPOINTS file as "A → B" (common practice of that layout: after four
 * header lines, pairs of end points, each with its label after "!"; "\Gamma", "G", "GAMMA" mean Γ).
 */
export function lineModeSegments(kpointsPath: string): string[] {
  const lines = readFileSync(kpointsPath, 'utf8').split(/\r?\n/).slice(4);
  const labels: string[] = [];
  for (const l of lines) {
    if (!l.trim()) continue;
    const bang = l.indexOf('!');
    if (bang < 0) throw new Error(`KPOINTS line without a label: "${l}"`);
    const raw = l.slice(bang + 1).trim();
    labels.push(/^(\\Gamma|G|GAMMA|Γ)$/i.test(raw) ? 'Γ' : raw);
  }
  const out: string[] = [];
  for (let i = 0; i + 1 < labels.length; i += 2) out.push(`${labels[i]} → ${labels[i + 1]}`);
  return out;
}
