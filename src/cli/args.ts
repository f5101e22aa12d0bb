/** A small, strict command-line parser: flags are declared; anything undeclared is an error. */
import { BOHR_ANGSTROM } from '../core/units';

export interface FlagSpec {
  /** Takes a value (`--window 25`) or is a switch (`--json`). */
  value: boolean;
  /** Allowed to repeat (values collected). */
  repeat?: boolean;
}

export interface ParsedArgs {
  positional: string[];
  flags: Map<string, string[]>;
}

export class UsageError extends Error {}

export function parseArgs(argv: string[], spec: Record<string, FlagSpec>): ParsedArgs {
  const positional: string[] = [];
  const flags = new Map<string, string[]>();
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (a === '--') {
      positional.push(...argv.slice(i + 1));
      break;
    }
    if (a.startsWith('--')) {
      const eq = a.indexOf('=');
      const name = eq > 0 ? a.slice(2, eq) : a.slice(2);
      const s = spec[name];
      if (!s) throw new UsageError(`unknown option --${name}`);
      let v = 'true';
      if (s.value) {
        if (eq > 0) v = a.slice(eq + 1);
        else {
          const next = argv[i + 1];
          if (next === undefined) throw new UsageError(`--${name} needs a value`);
          v = next;
          i++;
        }
      } else if (eq > 0) throw new UsageError(`--${name} takes no value`);
      const list = flags.get(name) ?? [];
      if (list.length > 0 && !s.repeat) throw new UsageError(`--${name} given twice`);
      list.push(v);
      flags.set(name, list);
    } else positional.push(a);
  }
  return { positional, flags };
}

export function flag(p: ParsedArgs, name: string): string | undefined {
  return p.flags.get(name)?.[0];
}

export function numberFlag(p: ParsedArgs, name: string, check: (x: number) => boolean, what: string): number | undefined {
  const v = flag(p, name);
  if (v === undefined) return undefined;
  const x = Number(v);
  if (!Number.isFinite(x) || !check(x)) throw new UsageError(`--${name} must be ${what}, got "${v}"`);
  return x;
}

/**
 * `--alat` with its unit: `10.20bohr` (as pw.x writes celldm(1)) or `5.40A` (Å). A bare number is refused:
 * codes write alat in bohr and people copy it, so guessing the unit would silently scale masses by 3.6.
 * Returns Å.
 */
export function alatFlag(p: ParsedArgs): number | undefined {
  const v = flag(p, 'alat');
  if (v === undefined) return undefined;
  const m = /^\s*([+]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(bohr|au|a\.u\.|a0|A|Å|ang|angstrom)?\s*$/i.exec(v);
  if (!m || !m[2]) {
    throw new UsageError(
      `--alat needs a unit: write --alat ${m ? `${m[1]}bohr` : '10.20bohr'} for bohr (the unit pw.x writes celldm(1) and alat in) or --alat ${m ? `${m[1]}A` : '5.40A'} for ångström (Å); got "${v}"`,
    );
  }
  const x = Number(m[1]);
  const bohr = /^(bohr|au|a\.u\.|a0)$/i.test(m[2]);
  const angstrom = bohr ? x * BOHR_ANGSTROM : x;
  if (!(angstrom > 0 && angstrom < 1000)) throw new UsageError(`--alat must be a positive length below 1000 Å, got "${v}"`);
  return angstrom;
}
