/**
 * INCAR: the tags that change how eigenvalues are read or what they mean. Spin-orbit / noncollinear runs
 * (LSORBIT, LNONCOLLINEAR: one electron per band) and the tags that name the method (see vaspMethod.ts).
 *
 * Layout (VASP's): `TAG = value` statements, several per line separated by `;`, comments after `#` or `!`.
 */
import type { InputFile } from '../../io/fileAccessor';
import { decodeText } from '../textScanner';

/** An INCAR is a few kB; more than this is not read (the tags that matter come long before). */
export const INCAR_READ_LIMIT_BYTES = 256 * 1024;

export interface IncarFlags {
  noncollinear: boolean | null;
}

export interface IncarContent extends IncarFlags {
  /** Tag (upper case) -> value as written (trimmed, quotes removed); the last statement of a tag wins. */
  tags: Map<string, string>;
}

/** A VASP logical as written (`T`, `.TRUE.`, `F`, `.false.`), or null when it is neither. */
export function vaspLogical(value: string | undefined): boolean | null {
  if (value === undefined) return null;
  const t = value.trim().replace(/^\./, '').toUpperCase();
  if (t.startsWith('T')) return true;
  if (t.startsWith('F')) return false;
  return null;
}

export function readIncar(file: InputFile): IncarContent {
  const bytes = file.bytes.length > INCAR_READ_LIMIT_BYTES ? file.bytes.subarray(0, INCAR_READ_LIMIT_BYTES) : file.bytes;
  const text = decodeText(bytes);
  const tags = new Map<string, string>();
  for (const raw of text.split(/\r?\n/)) {
    for (const stmt of raw.replace(/[#!].*$/, '').split(';')) {
      const m = /^\s*([A-Za-z][A-Za-z0-9_]{0,31})\s*=\s*(.*?)\s*$/.exec(stmt);
      if (!m) continue;
      tags.set(m[1]!.toUpperCase(), m[2]!.replace(/^["']|["']$/g, '').trim());
    }
  }
  const so = vaspLogical(tags.get('LSORBIT'));
  const nc = vaspLogical(tags.get('LNONCOLLINEAR'));
  const noncollinear = so === null && nc === null ? null : Boolean(so) || Boolean(nc);
  return { tags, noncollinear };
}

/** Only the spin-orbit / noncollinear switch. */
export function readIncarFlags(file: InputFile): IncarFlags {
  return { noncollinear: readIncar(file).noncollinear };
}
