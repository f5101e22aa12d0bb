/**
 * What the host sends the band view to draw: the band data, its marks and the view's environment. Band data
 * travels as compact typed arrays (EncodedArray, ./arrays.ts), never as JSON arrays of numbers.
 *
 * Index conventions: `kIndex` and `band0` are 0-based indices into the band arrays; the Report's BandPoint.band
 * is 1-based (band0 = band − 1). Energies are in eV, path distances in the units named by `distanceUnits`.
 */
import type { ExtremumKind, RejectReason, Report } from '../core/model';
import type { EncodedArray } from './arrays';

/** Fitted curve samples to draw over the data, one per direction of the fit (made by the core). */
export type { FitCurve } from '../core/analysis/fitCurves';

export type ThemeKind = 'light' | 'dark' | 'highContrast' | 'highContrastLight';
export type EnergyReference = 'vbm' | 'fermi' | 'raw';

export interface PathTickData {
  /** Path distance of the tick. */
  distance: number;
  /** Label, Γ spelled 'Γ'; labels meeting at one point are joined as 'K|U'. */
  label: string;
  kIndex: number;
}

export interface PathSegmentData {
  /** First and last k index (inclusive). */
  start: number;
  end: number;
  startLabel: string | null;
  endLabel: string | null;
  /** True when this segment is not connected to the previous one (draw a break). */
  afterJump: boolean;
}

/** An extremum from the Report, located on the arrays so the view can mark it and snap to it. */
export interface ExtremumMark {
  kind: ExtremumKind;
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  eV: number;
  label: string | null;
  /** Index into `report.extrema` of the extremum this mark comes from. */
  reportIndex: number;
}

/**
 * A candidate the analysis set aside (a saddle, a crossing, a path end, rounding), located on the arrays:
 * the view does not offer it as an extremum to fit.
 */
export interface SetAsideMark {
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  reason: RejectReason;
  detail: string;
}

/**
 * A mesh run drawn as its interpolated bands: the run's own mesh points (after symmetry expansion) that lie on
 * the drawn path, with the run's energies there (data, as written), so the view marks where the interpolated
 * lines are pinned to data.
 */
export interface MeshPointsData {
  count: number;
  /** Path distance of each point (same units as `distance`), count values. */
  distance: EncodedArray;
  /** Fractional k of each point as it lies on the path, count × 3. */
  kpoints: EncodedArray;
  /** 1-based number, in the file, of the k-point whose energies hold at each point (by symmetry). */
  fileKpoint: number[];
  /** Bands carried per point (the first `nBands` of the drawn bands). */
  nBands: number;
  /** One array per spin channel, layout [point * nBands + band0], eV (raw, as in the file). */
  energies: EncodedArray[];
  /** Divisions of the mesh, for the read-out. */
  divisions: [number, number, number];
}

/** Fit settings the view starts from (the user's settings). */
export interface FitDefaults {
  window_meV: number;
  method: string;
  /** Fit methods the host accepts. */
  methods: string[];
  energyReference: EnergyReference;
  range_eV: number;
}

export interface BandData {
  /** A name for the title (file name, not a path to trust). */
  title: string;
  format: string;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  /** Path distance per k-point (nk values). */
  distance: EncodedArray;
  distanceUnits: 'inverse-angstrom' | 'fractional' | 'written';
  /** Fractional reciprocal coordinates, nk × 3. */
  kpoints: EncodedArray;
  /** Cartesian k in Å⁻¹ (nk × 3), or null when the lattice is unknown. */
  cartesian: EncodedArray | null;
  /** One array per spin channel, layout [k * nBands + band0], eV (raw, as in the file). */
  energies: EncodedArray[];
  ticks: PathTickData[];
  segments: PathSegmentData[];
  fermiEnergy: number | null;
  /** Energies of the edges, eV, raw; null for a metal or when edges are unknown. */
  vbm_eV: number | null;
  cbm_eV: number | null;
  report: Report;
  marks: ExtremumMark[];
  /** Candidates the analysis set aside (absent from hosts that predate them). */
  setAside?: SetAsideMark[];
  defaults: FitDefaults;
  /** The file ended early (a running job): results are provisional. */
  partial: boolean;
  /** A mesh run shown as interpolated bands: its mesh points on the path (absent otherwise). */
  meshPoints?: MeshPointsData;
}

export interface EnvironmentData {
  theme: ThemeKind;
  /** Restricted (untrusted) workspace or a read-only file system: no saving. */
  readOnly: boolean;
  /** The sentence explaining why saving is off, when readOnly. */
  readOnlyReason: string | null;
}

/** Mass as a function of the fit window, for one direction. */
export interface WindowScanSeries {
  towards: string;
  points: { window_meV: number; mass: number; stderr: number; points: number }[];
}
