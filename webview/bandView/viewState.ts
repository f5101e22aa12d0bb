/**
 * What the band view keeps across a reload of the window (VS Code's webview state): the run it shows (so the
 * host can reopen it), the view choices, and the fits the user made (so none is lost). The state comes back
 * from storage: every field is checked before use. Pure.
 */
import type { SaveEntry } from '../../src/protocol';

export type ReferenceName = 'vbm' | 'fermi' | 'raw';
export type SpinName = 'up' | 'down' | 'both';

export interface BandViewState {
  /** The run's URI as the host gave it (data-run on the page). */
  run?: string;
  reference?: ReferenceName;
  spin?: SpinName;
  window_meV?: number;
  method?: string;
  /** Fits made, oldest first; the last is the one shown. */
  fits?: SaveEntry[];
}

const MAX_FITS = 200;

function isIndex(x: unknown): x is number {
  return typeof x === 'number' && Number.isInteger(x) && x >= 0 && x < 1e9;
}

function saveEntry(x: unknown): SaveEntry | null {
  if (typeof x !== 'object' || x === null) return null;
  const o = x as Record<string, unknown>;
  if (!isIndex(o.spin) || o.spin > 1 || !isIndex(o.kIndex) || !isIndex(o.band0)) return null;
  if (typeof o.window_meV !== 'number' || !Number.isFinite(o.window_meV) || o.window_meV <= 0 || o.window_meV > 1000) return null;
  if (typeof o.method !== 'string' || o.method.length > 40) return null;
  const e: SaveEntry = { spin: o.spin === 1 ? 1 : 0, kIndex: o.kIndex, band0: o.band0, window_meV: o.window_meV, method: o.method };
  if (typeof o.note === 'string') e.note = o.note.slice(0, 10_000);
  if (typeof o.maximum === 'boolean') e.maximum = o.maximum;
  return e;
}

/** The state read back, with anything malformed left out. */
export function parseViewState(s: unknown): BandViewState {
  if (typeof s !== 'object' || s === null) return {};
  const o = s as Record<string, unknown>;
  const out: BandViewState = {};
  if (typeof o.run === 'string' && o.run.length < 4096) out.run = o.run;
  if (o.reference === 'vbm' || o.reference === 'fermi' || o.reference === 'raw') out.reference = o.reference;
  if (o.spin === 'up' || o.spin === 'down' || o.spin === 'both') out.spin = o.spin;
  if (typeof o.window_meV === 'number' && Number.isFinite(o.window_meV) && o.window_meV >= 1 && o.window_meV <= 300)
    out.window_meV = o.window_meV;
  if (typeof o.method === 'string' && o.method.length <= 40) out.method = o.method;
  if (Array.isArray(o.fits)) {
    const fits = o.fits
      .slice(-MAX_FITS)
      .map(saveEntry)
      .filter((e): e is SaveEntry => e !== null);
    if (fits.length) out.fits = fits;
  }
  return out;
}

/** The fits that still point at a state of this run's data (a run re-read with fewer k-points drops some). */
export function fitsWithin(fits: readonly SaveEntry[], size: { nSpin: number; nk: number; nBands: number }): SaveEntry[] {
  return fits.filter((f) => f.spin < size.nSpin && f.kIndex < size.nk && f.band0 < size.nBands);
}
