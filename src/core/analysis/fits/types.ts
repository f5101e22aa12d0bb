/** What every curvature fit takes and returns. */

/**
 * Energies along one direction leaving an extremum: `t` is the distance from the extremum's sampled point
 * (Å⁻¹, increasing from 0), `e` the band energy there (eV). `back`, when present, holds the points on the
 * opposite side of the same straight line (distances again positive), for centred finite differences.
 */
export interface LineSamples {
  t: Float64Array;
  e: Float64Array;
  back?: { t: Float64Array; e: Float64Array };
  /**
   * True when symmetry fixes the vertex at t = 0: at a time-reversal-invariant k (k ≡ −k modulo G, e.g. Γ,
   * X, L) E(k0 + q) = E(k0 − q), so E is even along every line through k0 and has no odd terms.
   */
  even?: boolean;
}

export interface FitSettings {
  /** Energy window around the extremum, meV. */
  window_meV: number;
  /** Standard deviation of one energy value from the rounding of the file, eV (0: full precision). */
  energySigma: number;
}

/** A curvature fit along one line, with its provenance. */
export interface CurvatureFit {
  method: string;
  /** d²E/dk² at the extremum, eV·Å². */
  curvature: number;
  curvatureStderr: number;
  /** Signed mass, m_e (negative at a maximum). */
  mass: number;
  stderr: number;
  /** Points used. */
  points: number;
  /** Energy window of the points used, meV (larger than asked when it had to grow). */
  window_meV: number;
  /** Root-mean-square residual, meV (0 for finite differences, which interpolate exactly). */
  residual_meV: number;
  /** Kane non-parabolicity, 1/eV. */
  alpha_per_eV?: number;
  alphaStderr?: number;
  /** Distance of the fitted vertex from the sampled point along the line, Å⁻¹ (free-vertex fits). */
  vertexT?: number;
  /** Energy of the fitted vertex, eV. */
  vertexE?: number;
  warnings: string[];
  /** Whether the mass can be quoted (fits/quotable.ts); when false, `undeterminedReason` says why. */
  determined: boolean;
  undeterminedReason?: string;
}

export type CurvatureFitter = (s: LineSamples, settings: FitSettings) => CurvatureFit | null;
