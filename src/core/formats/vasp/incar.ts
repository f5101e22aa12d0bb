/** The few INCAR tags that change how eigenvalues are read: spin-orbit / non-collinear runs. */
import type { InputFile } from '../../io/fileAccessor';
import { decodeText } from '../textScanner';

export interface IncarFlags {
  noncollinear: boolean | null;
}

export function readIncarFlags(file: InputFile): IncarFlags {
  const text = decodeText(file.bytes);
  let noncollinear: boolean | null = null;
  for (const raw of text.split(/\r?\n/)) {
    for (const stmt of raw.replace(/[#!].*$/, '').split(';')) {
      const m = /^\s*(LSORBIT|LNONCOLLINEAR)\s*=\s*\.?([TtFf])/i.exec(stmt);
      if (m) noncollinear = (noncollinear ?? false) || /t/i.test(m[2]!);
    }
  }
  return { noncollinear };
}
