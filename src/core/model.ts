/**
 * The vocabulary of the whole project: band structures as read from files, and the report that analysis
 * returns. Pure types and a few constructors; no I/O, no `vscode`.
 *
 * Units inside the core: energies in eV, lengths in Å, reciprocal lengths in Å⁻¹ including the 2π,
 * masses in electron masses m_e. Readers convert once.
 */

export type Vec3 = [number, number, number];
/** A 3×3 matrix stored as three rows. For a lattice the rows are a1, a2, a3 in Å. */
export type Mat3 = [Vec3, Vec3, Vec3];

/** Atoms in the cell: species per atom and fractional positions (nAtoms × 3). */
export interface Structure {
  lattice: Mat3;
  species: string[];
  positions: Float64Array;
}

/** A file that contributed to a band structure, with a SHA-256 of its bytes. */
export interface SourceFile {
  /** Role of the file in the run: 'eigenvalues', 'structure', 'kpath', 'lattice', ... */
  role: string;
  /** Path as given by the caller (relative to the run folder when the run is a folder). */
  path: string;
  sha256: string;
}

export interface BandSource {
  /** Format id of the main file (e.g. 'vasp-eigenval'). */
  format: string;
  /** The main (eigenvalue) file. */
  file: string;
  /** Every file used, main file first. */
  files: SourceFile[];
}

/** A non-fatal remark about the input, shown to the user beside the results. */
export interface InputWarning {
  code: string;
  message: string;
  file?: string;
  line?: number;
}

export interface KLabel {
  /** 0-based k-point index. */
  index: number;
  /** Display label, Γ spelled as 'Γ'. A jump in the path is written 'K|U'. */
  label: string;
}

/** A uniform grid of k-points (e.g. BXSF): k-points are stored in grid order, first index slowest. */
export interface KGrid {
  dims: Vec3;
  /** Grid origin, fractional reciprocal coordinates. */
  origin: Vec3;
  /** True when the last point along each axis repeats the first (periodic general grid). */
  endpointsRepeated: boolean;
}

export type OccupationArray = Float32Array | Float64Array;

export type MethodFamily = 'semilocal' | 'hybrid' | 'gw' | 'model' | 'unknown';
/** How the energies were computed, as far as the files say. */
export interface ElectronicMethod {
  family: MethodFamily;
  name: string | null;
  evidence: string;
}

export interface BandStructure {
  source: BandSource;
  /** Real-space lattice rows in Å, when known. */
  lattice: Mat3 | null;
  /** Crystal structure, when known (needed for valley degeneracy). */
  structure: Structure | null;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  /** nk × 3 fractional reciprocal coordinates. */
  kpoints: Float64Array;
  /** nk weights, when the file gives them. */
  weights: Float64Array | null;
  /** One array per spin channel, layout [k * nBands + band], eV. */
  energies: Float64Array[];
  /**
   * Same layout as energies, when the file gives occupations (0..1 or 0..2 as written). Readers of large
   * text files keep them in single precision: the files write them with six decimals at most, and they only
   * decide which states are filled.
   */
  occupations: OccupationArray[] | null;
  fermiEnergy: number | null;
  electrons: number | null;
  /** Non-collinear / spin-orbit run: one electron per band. */
  spinorbit: boolean;
  /** How the energies were computed (functional family), when the files say. */
  method?: ElectronicMethod;
  /** One Fermi energy per spin channel (eV), when the file writes two (fixed spin moment); fermiEnergy is the higher. */
  fermiEnergies?: [number, number];
  /** Where the written Fermi energy came from, when the layout says (e.g. 'fermi_energy', 'highestOccupiedLevel'). */
  fermiSource?: string;
  /**
   * The written Fermi energy was fixed on other k-points than these, and any occupations written here follow from
   * it (VASP's KPOINTS_OPT set; the zero-weight path after a hybrid run's weighted mesh): where the electron count is
   * known it decides which states are filled and classifies the run first (occupation.ts, conductionClass.ts).
   */
  fermiFromOtherKPoints?: boolean;
  /** Point-group rotations the file says its code used (pw.x's s(i,j), its own crystal convention); load.ts checks them. */
  listedRotations?: Mat3[];
  labels: KLabel[];
  /** 'path' for line-mode runs, 'grid' for uniform meshes, 'points' when unknown. */
  sampling: 'path' | 'grid' | 'points';
  grid: KGrid | null;
  /** The k-point mesh the run's input declares, when it says (checked against the points: meshRunAnalysis.ts). */
  declaredMesh?: DeclaredMesh;
  /**
   * Path distance (Å⁻¹) as written by the file, for layouts that give distances but no k-points
   * (or when the lattice is unknown). Null when distances are computed from k-points.
   */
  writtenDistance: Float64Array | null;
  /**
   * When the file holds bands numbered from N + 1 (e.g. a band grid of bands 3–6): N. Reports number bands
   * from it; core arrays stay 0-based from the first band held.
   */
  bandNumberOffset?: number;
  /** True when the file ended early (a running job): what is here is complete only up to nk. */
  partial: boolean;
  /** Set on a path made by interpolating a mesh run (not read from a file): the mesh it came from. */
  interpolatedFrom?: { divisions: [number, number, number] };
  warnings: InputWarning[];
}

export function energyAt(bs: BandStructure, spin: number, k: number, band: number): number {
  return bs.energies[spin]![k * bs.nBands + band]!;
}

export function kpointAt(bs: BandStructure, k: number): Vec3 {
  return [bs.kpoints[3 * k]!, bs.kpoints[3 * k + 1]!, bs.kpoints[3 * k + 2]!];
}

export function labelAt(bs: BandStructure, k: number): string | null {
  for (const l of bs.labels) if (l.index === k) return l.label;
  return null;
}

// ---------------------------------------------------------------------------------------------------------
// Report: what analysis returns and the CLI prints with --json. Band indices are 1-based here.

/** A point on a band: the object called P in the CLI contract. */
export interface BandPoint {
  /** 1-based band index. */
  band: number;
  spin: 0 | 1;
  /** Fractional reciprocal coordinates. */
  k: Vec3;
  eV: number;
  label: string | null;
  /** Mesh runs: the point's place on a labelled line from Γ ("0.85 Γ→X"), when it lies on one. */
  position?: string | null;
}

export interface DirectGap {
  eV: number;
  k: Vec3;
}

export interface GapReport {
  eV: number;
  direct: boolean;
  vbm: BandPoint;
  cbm: BandPoint;
  directGap: DirectGap;
  /** Mesh runs: 'interpolated' when the edges come from the interpolated bands, with the gap's uncertainty (eV; null when unknown). */
  source?: 'interpolated';
  uncertainty_eV?: number | null;
}

export interface MassFit {
  /** Where the direction points: the far end's label, or its fractional k written as text. */
  towards: string;
  /** Cartesian unit vector of the direction. */
  direction: Vec3;
  /** Signed curvature mass in m_e; negative at a maximum. */
  mass: number;
  stderr: number;
  points: number;
  window_meV: number;
  method: string;
  alpha_per_eV?: number;
  /** Root-mean-square residual of the fit, meV. */
  residual_meV?: number;
  /** At a degenerate edge: the branch (1-based, by energy at the first step) followed by smooth continuation. */
  branch?: number;
  warnings?: string[];
  /**
   * Whether the mass can be quoted: false when the fit has no more points than unknowns, its standard
   * error exceeds 30 % of |m|, or its vertex lies outside the points used (then `undeterminedReason` says which).
   */
  determined: boolean;
  undeterminedReason?: string;
  /**
   * Finite differences only (they pass through their points, so they have no residual and their stderr is
   * the rounding error alone): the same line fitted by the least-squares parabola at the same window
   * setting, and how far the two masses lie apart. An uncertainty from method disagreement, not a stderr.
   */
  methodSpread?: MethodSpread;
  /** Mesh runs: the mass is a principal mass of the interpolated band's analytic Hessian (stderr: its leave-one-out uncertainty). */
  source?: 'interpolated';
}

/** Disagreement of a finite-difference mass with another method on the same samples. */
export interface MethodSpread {
  /** The method compared against (PARABOLA). */
  against: string;
  /** That method's signed mass, m_e. */
  mass: number;
  /** The window setting both used, meV. */
  window_meV: number;
  /** |m − mass|, m_e. */
  spread: number;
}

export interface MassTensor {
  /** Principal signed masses, m_e. */
  principal: Vec3;
  /** Principal axes, cartesian unit vectors (rows), in the order of `principal`. */
  axes: Mat3;
  method: string;
  points?: number;
  residual_meV?: number;
  /** Standard errors of the principal masses, m_e (interpolated tensors: the leave-one-out uncertainty). */
  stderr?: Vec3;
  /** Mesh runs: the tensor is the interpolated band's analytic Hessian; whether its masses can be quoted, and why not. */
  source?: 'interpolated';
  determined?: boolean;
  undeterminedReason?: string;
}

export type ExtremumKind = 'vbm' | 'cbm' | 'valley' | 'peak';

export interface ExtremumReport extends BandPoint {
  kind: ExtremumKind;
  offset_eV: number;
  degenerateBands: number;
  valleyDegeneracy: number | null;
  /**
   * The valley as a name that survives re-runs: the chosen member of the star of k under the crystal's point
   * group and time reversal (lattice/valleyIdentity.ts); under time reversal only when the crystal is
   * unknown. Absent in reports made without it.
   */
  valley?: Vec3;
  masses: MassFit[];
  tensor: MassTensor | null;
  dosMass: number | null;
  conductivityMass: number | null;
  /**
   * Set when `dosMass` comes from path directions only at a degenerate edge (a coarse angular average):
   * its estimated error, m_e.
   */
  dosMassPathLimited?: { error: number };
  /** At a degenerate extremum of a cubic crystal sampled off the path: the warped-band fit (tensorRun.ts). */
  warping?: WarpingFitReport;
  /** Mesh runs: what the interpolation adds (its uncertainties, whether it resolved the extremum). */
  interpolated?: InterpolatedExtremumInfo;
  warnings: string[];
}

/**
 * A k-point mesh as an input file declares it (VASP's KPOINTS automatic forms or vasprun.xml's <generation>,
 * pw.x's <monkhorst_pack>), in the convention k = (j + shift)/n of interpolation/regularMesh.ts.
 */
export interface DeclaredMesh {
  divisions: [number, number, number];
  /** Per axis, in units of the spacing, in [0, 1). */
  shift: [number, number, number];
  /** Where it is declared, for messages, e.g. 'the KPOINTS file (Gamma-centred)'. */
  source: string;
}

/** An extremum found on the interpolated bands of a mesh run: its uncertainties (leave-one-out). */
export interface InterpolatedExtremumInfo {
  /** Largest change of the energy when a star of nearby mesh points is left out, eV (null when unknown). */
  energyUncertainty_eV: number | null;
  /** Largest change of the position, Å⁻¹. */
  positionUncertainty_invA: number | null;
  /** False when the mesh has an extremum here that the interpolation does not resolve (mesh energy, no masses). */
  resolved: boolean;
  /** 1-based bands within the interpolation's error of this one here. */
  touchingBands: number[];
}

/** How a mesh run was interpolated (Report.interpolation). */
export interface MeshInterpolationReport {
  method: string;
  /** The published method, named. */
  reference: string;
  divisions: Vec3;
  /** 0 or ½ per axis. */
  shift: Vec3;
  irreduciblePoints: number;
  stars: number;
  /** 1-based bands interpolated (first, last), per spin channel in order. */
  bands: [number, number][];
  /** The input file that declares the mesh, when one does (a declared mesh other than the points' is a warning). */
  declaredBy?: string;
  /** Set when the file lists points equivalent by the crystal's symmetry (merged, one per star). */
  mergedEquivalentPoints?: { listed: number; kept: number; largestDifference_eV: number };
}

/** Insulator/metal/semimetal classification of one spin channel (spin-polarised runs). */
export interface ChannelClassification {
  spin: 0 | 1;
  metal: boolean | null;
  semimetal: boolean | null;
  fermi_eV: number | null;
  classificationReason: string;
  /** 1-based bands of this channel that cross the Fermi level. */
  crossingBands: number[];
}

/** The warped-band form's parameters (Dresselhaus, Kip & Kittel 1955) and what follows from them, m_e. */
export interface WarpingFitReport {
  A: number;
  B: number;
  C: number;
  /** Unit of A, B, C: ħ²/2m_e. */
  unit: string;
  stderr: { A: number; B: number; C: number };
  points: number;
  residual_meV: number;
  heavy: { m100: number; m110: number; m111: number; dos: number | null };
  light: { m100: number; m110: number; m111: number; dos: number | null };
}

/** Why a candidate is not a band extremum. */
export type RejectReason = 'saddle' | 'crossing' | 'boundary' | 'rounding' | 'shallow';

/** A point that looked like an extremum of its band index but is not a minimum or a maximum. */
export interface RejectedCandidate {
  /** 1-based band index. */
  band: number;
  spin: 0 | 1;
  /** Fractional reciprocal coordinates. */
  k: Vec3;
  eV: number;
  reason: RejectReason;
  /** One sentence: what was seen. */
  detail: string;
}

export interface Report {
  file: string;
  format: string;
  nk: number;
  nbands: number;
  nspin: number;
  electrons: number | null;
  metal: boolean | null;
  /** A metal whose overlap is between different bands, with electron and hole pockets. */
  semimetal: boolean | null;
  /** The Fermi level used (written by the file, or estimated as the reason says); null if unknown. */
  fermi_eV: number | null;
  /** One sentence: which evidence decided the classification. */
  classificationReason: string;
  /** Noncollinear (spin-orbit) run: one electron per band. */
  spinors: boolean;
  /** 1-based bands that cross the Fermi level (metals), all spin channels merged. */
  crossingBands?: number[];
  /** Why there is no gap although the run is not a metal (e.g. a local grid around one point). */
  gapReason?: string;
  /** Per spin channel (spin-polarised runs only). */
  spinChannels?: ChannelClassification[];
  gap: GapReport | null;
  extrema: ExtremumReport[];
  /** Per spin channel gaps (spin-polarised runs only). */
  spinGaps?: (GapReport | null)[];
  warnings: string[];
  cautions: string[];
  /** Candidates that are not extrema (saddles, crossings, path ends, rounding): never valleys or peaks. */
  rejected?: RejectedCandidate[];
  /** Mesh runs whose bands were interpolated to find the edges and masses. */
  interpolation?: MeshInterpolationReport;
}
