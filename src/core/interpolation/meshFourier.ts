/**
 * The star-function fit on a regular mesh by discrete Fourier sums instead of star values at each data point.
 *
 * On a mesh k = (j + s)/n (fractional, per axis) every phase k·R of a lattice vector R = Σ n_a a_a is
 * 2π Σ_a (j_a + s_a) n_a / n_a-divisions, so sums over the mesh of f(k) cos(k·R) are discrete Fourier transforms
 * evaluated at R modulo the mesh. With the stars closed under the group and inversion (starBasis.ts), and
 * star(i) the mesh points that irreducible point i stands for (c_i of them):
 *   - the fit's matrix H_ij = Σ_{m≥1} S_m(k_i) S_m(k_j)/ρ_m equals (1/c_i) Σ_{q∈star(i)} F(q − k_j), with
 *     F(p) = Σ_{R≠0} cos(p·R) / (ρ(R) n(R)) a function on the Γ-centred mesh of differences: one transform
 *     of the folded roughness weights replaces the N² M products of the direct sum;
 *   - a coefficient Σ_i μ_i S_m(k_i) equals Σ_q ν(q) cos(q·R_m), ν(q) = μ_i / c_i on star(i): one transform
 *     of ν per band, read at each star's representative R_m.
 * Both identities use only that S_m is invariant under the operations that map the mesh onto itself.
 *
 * Better still, H is the mesh convolution with F restricted to functions invariant under the group: with
 * ν(q) = μ_i / c_i, Σ_j H_ij μ_j = (F ∗ ν)(k_i). A convolution is diagonal in Fourier space, so the fit's
 * system H μ = ε + C, Σ μ = 0 is solved by one transform of the energies divided by F̂(G) = N w(G), w(G) the
 * weights 1/(ρ n) of every basis vector R ≡ G folded onto the mesh (MeshSpectralSolver): no matrix, no
 * factorisation. It needs every frequency G ≢ 0 of the mesh held by some vector of the basis (else H is
 * singular there); the caller falls back to the matrix otherwise.
 */
import type { RegularMesh } from './regularMesh';
import { starValuesFractional, type StarBasis } from './starBasis';
import { inverseRoughnessOf } from './roughness';
import { meshIndexAt, meshPoint } from './meshExtrema';
import { meshTransform } from './lineTransform';

export { meshTransform } from './lineTransform';

const mod = (x: number, n: number): number => ((x % n) + n) % n;

/** Mesh index of each irreducible point (its own position on the mesh), or null if one is off the mesh. */
export function meshIndexOf(mesh: RegularMesh, kFrac: Float64Array): Int32Array | null {
  const nk = kFrac.length / 3;
  const out = new Int32Array(nk);
  for (let i = 0; i < nk; i++) {
    const j = meshIndexAt(mesh, kFrac, 1e-3, 3 * i);
    if (j < 0 || mesh.irreducibleOf[j] !== i) return null;
    out[i] = j;
  }
  return out;
}

/** Index on the mesh of lattice vector member j of the basis (its integer coordinates modulo the divisions). */
function foldedIndex(basis: StarBasis, j: number, dims: readonly number[]): number {
  const z = basis.integer;
  return (mod(z[3 * j]!, dims[0]!) * dims[1]! + mod(z[3 * j + 1]!, dims[1]!)) * dims[2]! + mod(z[3 * j + 2]!, dims[2]!);
}

/**
 * The fit's matrix H (N × N, row-major) for the stars m ≥ 1 with weights 1/ρ_m (`inverseRoughness`), from one
 * transform of the folded weights.
 */
export function meshFitMatrix(basis: StarBasis, inverseRoughness: Float64Array, mesh: RegularMesh, own: Int32Array): Float64Array {
  const dims = mesh.divisions;
  const [, n2, n3] = dims;
  const re = new Float64Array(mesh.total);
  const im = new Float64Array(mesh.total);
  // Each kept member stands for ±R: 2/(ρ n_m) = weight_m/ρ_m on the real part.
  for (let m = 1; m < basis.count; m++) {
    const w = basis.weight[m]! * inverseRoughness[m]!;
    for (let j = basis.start[m]!; j < basis.start[m + 1]!; j++) {
      const p = foldedIndex(basis, j, dims);
      re[p] = re[p]! + w;
    }
  }
  meshTransform(re, im, dims);
  const n = own.length;
  const h = new Float64Array(n * n);
  const [n1] = dims;
  // Index of the difference q − k_j on the mesh, per axis: t1[a1·n + j] + t2[a2·n + j] + t3[a3·n + j].
  const t1 = new Int32Array(n1 * n);
  const t2 = new Int32Array(n2 * n);
  const t3 = new Int32Array(n3 * n);
  for (let k = 0; k < n; k++) {
    const o3 = own[k]! % n3;
    const o2 = Math.floor(own[k]! / n3) % n2;
    const o1 = Math.floor(own[k]! / (n2 * n3));
    for (let a = 0; a < n1; a++) t1[a * n + k] = mod(a - o1, n1) * n2 * n3;
    for (let a = 0; a < n2; a++) t2[a * n + k] = mod(a - o2, n2) * n3;
    for (let a = 0; a < n3; a++) t3[a * n + k] = mod(a - o3, n3);
  }
  for (let a1 = 0, q = 0; a1 < n1; a1++) {
    for (let a2 = 0; a2 < n2; a2++) {
      for (let a3 = 0; a3 < n3; a3++, q++) {
        const i = mesh.irreducibleOf[q]!;
        const scale = 1 / mesh.starSize[i]!;
        const row = i * n;
        const b1 = a1 * n;
        const b2 = a2 * n;
        const b3 = a3 * n;
        // H is symmetric: the lower triangle (k ≤ i) is enough.
        for (let k = 0; k <= i; k++) h[row + k] = h[row + k]! + scale * re[t1[b1 + k]! + t2[b2 + k]! + t3[b3 + k]!]!;
      }
    }
  }
  for (let i = 0; i < n; i++) for (let k = 0; k < i; k++) h[k * n + i] = h[i * n + k]!;
  return h;
}

/** Σ_i μ_i S_m(k_i) for every star m, from one transform of μ spread over the mesh. */
export function meshStarSums(basis: StarBasis, mesh: RegularMesh, mu: ArrayLike<number>): Float64Array {
  const re = new Float64Array(mesh.total);
  const im = new Float64Array(mesh.total);
  for (let q = 0; q < mesh.total; q++) {
    const i = mesh.irreducibleOf[q]!;
    re[q] = mu[i]! / mesh.starSize[i]!;
  }
  meshTransform(re, im, mesh.divisions);
  return readStarSums(starPhases(basis, mesh), re, im, basis.count);
}

/** Per star: the mesh index of its representative R_m and the mesh shift's phase 2π Σ_a s_a n_a / n_a (cos, sin). */
interface StarPhases {
  index: Int32Array;
  cos: Float64Array;
  sin: Float64Array;
}

function starPhases(basis: StarBasis, mesh: RegularMesh): StarPhases {
  const dims = mesh.divisions;
  const z = basis.integer;
  const out = { index: new Int32Array(basis.count), cos: new Float64Array(basis.count), sin: new Float64Array(basis.count) };
  for (let m = 0; m < basis.count; m++) {
    const j = basis.start[m]!;
    out.index[m] = foldedIndex(basis, j, dims);
    let phase = 0;
    for (let a = 0; a < 3; a++) phase += (mesh.shift[a]! * z[3 * j + a]!) / dims[a]!;
    phase *= 2 * Math.PI;
    out.cos[m] = Math.cos(phase);
    out.sin[m] = Math.sin(phase);
  }
  return out;
}

/** Re[X(R_m) e^{2πi s·n/N}] for every star, X a transform over the mesh (re, im). */
function readStarSums(p: StarPhases, re: Float64Array, im: Float64Array, count: number): Float64Array {
  const out = new Float64Array(count);
  for (let m = 0; m < count; m++) {
    const q = p.index[m]!;
    out[m] = re[q]! * p.cos[m]! - im[q]! * p.sin[m]!;
  }
  return out;
}

/**
 * F̂(G) = N w(G) on the mesh of frequencies (G ≡ R modulo the divisions), w(G) = Σ_{R ≡ G, R ≠ 0} 1/(ρ(R) n(R))
 * over every vector of the basis (both of each ±R pair); null when a frequency G ≢ 0 holds no vector.
 */
export function meshKernelSpectrum(basis: StarBasis, mesh: RegularMesh): Float64Array | null {
  // The same basis and divisions give the same spectrum.
  const key = mesh.divisions.join('×');
  let perBasis = spectra.get(basis);
  if (!perBasis) spectra.set(basis, (perBasis = new Map<string, Float64Array | null>()));
  if (!perBasis.has(key)) perBasis.set(key, kernelSpectrum(basis, inverseRoughnessOf(basis), mesh));
  return perBasis.get(key)!;
}

const spectra = new WeakMap<StarBasis, Map<string, Float64Array | null>>();
/** The inverse kernels made from each spectrum. */
const kernels = new WeakMap<Float64Array, Float64Array>();

function kernelSpectrum(basis: StarBasis, inverseRoughness: Float64Array, mesh: RegularMesh): Float64Array | null {
  const dims = mesh.divisions;
  const z = basis.integer;
  // Per axis, (x mod n) times the axis's stride for every coordinate x of the basis: the folded index of ±R by lookups.
  let reach = 0;
  for (let j = 0; j < z.length; j++) reach = Math.max(reach, Math.abs(z[j]!));
  const strides = [dims[1] * dims[2], dims[2], 1];
  const [f0, f1, f2] = [0, 1, 2].map((a) => Int32Array.from({ length: 2 * reach + 1 }, (_, t) => mod(t - reach, dims[a]!) * strides[a]!));
  const w = new Float64Array(mesh.total);
  for (let m = 1; m < basis.count; m++) {
    // Each kept member stands for R and −R, each with 1/(ρ n) = (weight/2)/ρ.
    const half = 0.5 * basis.weight[m]! * inverseRoughness[m]! * mesh.total;
    spreadStar(w, half, z, basis.start[m]!, basis.start[m + 1]!, reach, f0!, f1!, f2!);
  }
  for (let q = 1; q < mesh.total; q++) if (!(w[q]! > 0)) return null;
  return w;
}

/** Adds `half` at the folded index of R and of −R for members from..to−1 (f0..f2: kernelSpectrum's axis tables). */
function spreadStar(
  w: Float64Array,
  half: number,
  z: Int32Array,
  from: number,
  to: number,
  reach: number,
  f0: Int32Array,
  f1: Int32Array,
  f2: Int32Array,
): void {
  for (let j = from; j < to; j++) {
    const plus = f0[reach + z[3 * j]!]! + f1[reach + z[3 * j + 1]!]! + f2[reach + z[3 * j + 2]!]!;
    const minus = f0[reach - z[3 * j]!]! + f1[reach - z[3 * j + 1]!]! + f2[reach - z[3 * j + 2]!]!;
    w[plus] = w[plus]! + half;
    w[minus] = w[minus]! + half;
  }
}

/** One solve of the fit's system for values given at the irreducible points. */
export interface SpectralSolution {
  /** Σ_i μ_i S_m(k_i) for every star m. */
  sums: Float64Array;
  /** Mean of the values over the whole mesh (the constant that the multipliers leave free). */
  mean: number;
}

/**
 * The fit's system H μ = ε + C with Σ_i μ_i = 0 solved in Fourier space (see the top of this file): one
 * transform of the values spread over the mesh, divided by the kernel's spectrum.
 */
export class MeshSpectralSolver {
  private readonly phases: StarPhases;
  /** K(d) = (1/N) Σ_{G≢0} e^{−2πi d·G/n} / F̂(G) on the mesh of differences (made on first use). */
  private kernel: Float64Array | null = null;
  /** The mesh points of each irreducible point's star: points[from[i] .. from[i+1]−1]. */
  private stars: { from: Int32Array; points: Int32Array } | null = null;

  /** `own`: each irreducible point's own mesh index (meshIndexOf). */
  constructor(
    readonly basis: StarBasis,
    readonly mesh: RegularMesh,
    private readonly spectrum: Float64Array,
    private readonly own: Int32Array,
  ) {
    this.phases = starPhases(basis, mesh);
  }

  solve(values: ArrayLike<number>): SpectralSolution {
    const { mesh, spectrum } = this;
    const total = mesh.total;
    const re = new Float64Array(total);
    const im = new Float64Array(total);
    for (let q = 0; q < total; q++) re[q] = values[mesh.irreducibleOf[q]!]!;
    meshTransform(re, im, mesh.divisions);
    const mean = re[0]! / total;
    re[0] = 0;
    im[0] = 0;
    for (let q = 1; q < total; q++) {
      re[q] = re[q]! / spectrum[q]!;
      im[q] = im[q]! / spectrum[q]!;
    }
    return { sums: readStarSums(this.phases, re, im, this.basis.count), mean };
  }

  /**
   * The solution for the values e_p (1 at irreducible point p, 0 elsewhere) without a transform, and the
   * multipliers μ_i(e_p) of every point. Its transform is known: Σ_{q∈star(p)} e^{iq·R_m} = c_p S_m(k_p)
   * (S_m at p's exact place on the mesh); and ν = K ∗ 1_{star(p)}, so μ_i = c_i Σ_{q∈star(p)} K(k_i − q) (K is
   * invariant under the group).
   */
  indicator(p: number): SpectralSolution & { multipliers: Float64Array } {
    const { mesh, spectrum, own } = this;
    const cp = mesh.starSize[p]!;
    const starsAtP = starValuesFractional(this.basis, meshPoint(mesh, own[p]!));
    const sums = new Float64Array(this.basis.count);
    for (let m = 1; m < sums.length; m++) {
      const q = this.phases.index[m]!;
      sums[m] = q === 0 ? 0 : (cp * starsAtP[m]!) / spectrum[q]!;
    }
    const kernel = this.kernelTable();
    const { from, points } = this.starPoints();
    const [n1, n2, n3] = mesh.divisions;
    // Per axis, (x mod n) times the axis's stride for x in −n .. n−1: the index of a difference, by lookups.
    const wrapped = (n: number, stride: number): Int32Array => Int32Array.from({ length: 2 * n }, (_, t) => (t % n) * stride);
    const w1 = wrapped(n1, n2 * n3);
    const w2 = wrapped(n2, n3);
    const w3 = wrapped(n3, 1);
    const count = from[p + 1]! - from[p]!;
    const q1 = new Int32Array(count);
    const q2 = new Int32Array(count);
    const q3 = new Int32Array(count);
    for (let t = 0; t < count; t++) {
      const q = points[from[p]! + t]!;
      q1[t] = n1 - Math.floor(q / (n2 * n3));
      q2[t] = n2 - (Math.floor(q / n3) % n2);
      q3[t] = n3 - (q % n3);
    }
    const multipliers = new Float64Array(own.length);
    for (let i = 0; i < own.length; i++) {
      const o = own[i]!;
      const o1 = Math.floor(o / (n2 * n3));
      const o2 = Math.floor(o / n3) % n2;
      const o3 = o % n3;
      let acc = 0;
      for (let t = 0; t < count; t++) acc += kernel[w1[o1 + q1[t]!]! + w2[o2 + q2[t]!]! + w3[o3 + q3[t]!]!]!;
      multipliers[i] = mesh.starSize[i]! * acc;
    }
    return { sums, mean: cp / mesh.total, multipliers };
  }

  private kernelTable(): Float64Array {
    if (this.kernel) return this.kernel;
    const { mesh, spectrum } = this;
    const hit = kernels.get(spectrum);
    if (hit) return (this.kernel = hit);
    const re = new Float64Array(mesh.total);
    const im = new Float64Array(mesh.total);
    // 1/F̂ is real and even, so its transform is real and either sign of the exponent gives it.
    for (let q = 1; q < mesh.total; q++) re[q] = 1 / spectrum[q]! / mesh.total;
    meshTransform(re, im, mesh.divisions);
    kernels.set(spectrum, re);
    this.kernel = re;
    return re;
  }

  private starPoints(): { from: Int32Array; points: Int32Array } {
    if (this.stars) return this.stars;
    const { irreducibleOf, starSize } = this.mesh;
    const from = new Int32Array(starSize.length + 1);
    for (let i = 0; i < starSize.length; i++) from[i + 1] = from[i]! + starSize[i]!;
    const fill = from.slice(0, starSize.length);
    const points = new Int32Array(irreducibleOf.length);
    for (let q = 0; q < irreducibleOf.length; q++) points[fill[irreducibleOf[q]!]!++] = q;
    this.stars = { from, points };
    return this.stars;
  }
}
