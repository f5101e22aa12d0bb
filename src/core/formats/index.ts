/**
 * The registry of readers. Each format lives in its own file and registers here; detection is by content.
 */
import type { FormatReader } from './types';
import { vaspEigenvalReader } from './vasp/eigenval';
import { vasprunReader } from './vasp/vasprun';
import { qeXmlReader } from './qe/qeXml';
import { bandsxReader } from './qe/bandsx';
import { wannier90BandReader } from './wannier90';
import { bxsfReader } from './bxsf';
import { castepBandsReader } from './castep';

export const READERS: FormatReader[] = [
  vaspEigenvalReader,
  vasprunReader,
  qeXmlReader,
  bandsxReader,
  wannier90BandReader,
  bxsfReader,
  castepBandsReader,
];

/** Bytes of the head of a file that detection looks at. */
export const DETECT_HEAD_BYTES = 8192;

export interface Detection {
  reader: FormatReader;
  confidence: number;
}

/** The reader that recognises this content best, or null. */
export function detectFormat(head: Uint8Array, name: string): Detection | null {
  let best: Detection | null = null;
  for (const reader of READERS) {
    let c = 0;
    try {
      c = reader.detect(head, name);
    } catch {
      c = 0;
    }
    if (c > 0 && (!best || c > best.confidence)) best = { reader, confidence: c };
  }
  return best;
}

export function readerById(id: string): FormatReader | undefined {
  return READERS.find((r) => r.id === id);
}
