/**
 * The discrete Fourier transform over a mesh, X[p] = Σ_j x[j] exp(+2πi p·j/n) over the three axes, line by line.
 * Each line of length n = a·b is done in two short direct sums (Cooley–Tukey with one split, a the largest
 * divisor of n not above √n): n(a + b) products instead of n², from tables made once per length.
 */

/** In-place transform of the mesh (re, im), axes n1 × n2 × n3 in row-major order. */
export function meshTransform(re: Float64Array, im: Float64Array, dims: readonly [number, number, number]): void {
  const [n1, n2, n3] = dims;
  const total = n1 * n2 * n3;
  const strides = [n2 * n3, n3, 1];
  for (let axis = 0; axis < 3; axis++) {
    const n = dims[axis]!;
    if (n === 1) continue;
    const stride = strides[axis]!;
    const line = lineTransform(n);
    // The lines along the axis start at the indices whose coordinate along it is 0. (The loops are the line
    // transform's methods: this function stays small, and the runtime compiles each loop once, not again inside
    // every caller it is inlined into.)
    const outer = total / (n * stride);
    if (stride > 1) line.sideBySide(re, im, outer, stride);
    else line.oneByOne(re, im, outer);
  }
}

const lines = new Map<number, LineTransform>();

function lineTransform(n: number): LineTransform {
  let hit = lines.get(n);
  if (!hit) {
    hit = new LineTransform(n);
    if (lines.size > 8) lines.delete(lines.keys().next().value!);
    lines.set(n, hit);
  }
  return hit;
}

/** One line of length n = a·b, in place in xr/xi: t = b·t1 + t2, p = p1 + a·p2. */
class LineTransform {
  readonly xr: Float64Array;
  readonly xi: Float64Array;
  private readonly a: number;
  private readonly b: number;
  /** exp(2πi t1 p1 / a) at t1·a + p1. */
  private readonly war: Float64Array;
  private readonly wai: Float64Array;
  /** exp(2πi t2 p / n) at t2·n + p. */
  private readonly wbr: Float64Array;
  private readonly wbi: Float64Array;
  /** The inner sums Y[t2·a + p1] = Σ_t1 x[b·t1 + t2] exp(2πi t1 p1 / a). */
  private readonly yr: Float64Array;
  private readonly yi: Float64Array;

  constructor(readonly n: number) {
    let a = 1;
    for (let d = 2; d * d <= n; d++) if (n % d === 0) a = d;
    const b = n / a;
    this.a = a;
    this.b = b;
    this.xr = new Float64Array(n);
    this.xi = new Float64Array(n);
    this.yr = new Float64Array(n);
    this.yi = new Float64Array(n);
    [this.war, this.wai] = twiddles(a, a);
    [this.wbr, this.wbi] = twiddles(b, n);
  }

  run(): void {
    const { n, a, b, xr, xi, yr, yi, war, wai, wbr, wbi } = this;
    // Y[t2·a + p1] = Σ_t1 x[b·t1 + t2] wa[t1·a + p1], then X[p] = Σ_t2 Y[t2·a + p mod a] wb[t2·n + p]: each
    // complex sum in the order of its index (the loops are written out; a call per sum cost more than the sum).
    for (let t2 = 0; t2 < b; t2++) {
      for (let p1 = 0; p1 < a; p1++) {
        let sr = 0;
        let si = 0;
        for (let t1 = 0, x = t2, w = p1; t1 < a; t1++, x += b, w += a) {
          sr += xr[x]! * war[w]! - xi[x]! * wai[w]!;
          si += xr[x]! * wai[w]! + xi[x]! * war[w]!;
        }
        yr[t2 * a + p1] = sr;
        yi[t2 * a + p1] = si;
      }
    }
    for (let p = 0; p < n; p++) {
      let sr = 0;
      let si = 0;
      for (let t2 = 0, y = p % a, w = p; t2 < b; t2++, y += a, w += n) {
        sr += yr[y]! * wbr[w]! - yi[y]! * wbi[w]!;
        si += yr[y]! * wbi[w]! + yi[y]! * wbr[w]!;
      }
      xr[p] = sr;
      xi[p] = si;
    }
  }

  /** The `outer` contiguous lines of (re, im) (line h at h·n .. h·n + n − 1), each copied out, transformed and back. */
  oneByOne(re: Float64Array, im: Float64Array, outer: number): void {
    const { n, xr, xi } = this;
    for (let hi = 0; hi < outer; hi++) {
      const base = hi * n;
      for (let t = 0; t < n; t++) {
        xr[t] = re[base + t]!;
        xi[t] = im[base + t]!;
      }
      this.run();
      for (let p = 0; p < n; p++) {
        re[base + p] = xr[p]!;
        im[base + p] = xi[p]!;
      }
    }
  }

  /** The lines of every block of `stride` neighbouring lines (`outer` blocks of n·stride), side by side. */
  sideBySide(re: Float64Array, im: Float64Array, outer: number, stride: number): void {
    for (let hi = 0; hi < outer; hi++) this.runSideBySide(re, im, hi * this.n * stride, stride);
  }

  /**
   * The `stride` lines starting at base, base + 1, …, base + stride − 1 (element t of line lo at base + t·stride
   * + lo), transformed in place in (re, im): every output is the same sum as run() makes, term by term in the
   * same order, only the lines are interleaved.
   */
  runSideBySide(re: Float64Array, im: Float64Array, base: number, stride: number): void {
    const { n, a, b, war, wai, wbr, wbi } = this;
    const size = n * stride;
    if (scratch.re.length < size) scratch = { re: new Float64Array(size), im: new Float64Array(size) };
    const yr = scratch.re;
    const yi = scratch.im;
    for (let t2 = 0; t2 < b; t2++) {
      for (let p1 = 0; p1 < a; p1++) {
        const o = (t2 * a + p1) * stride;
        yr.fill(0, o, o + stride);
        yi.fill(0, o, o + stride);
        for (let t1 = 0, w = p1; t1 < a; t1++, w += a) {
          addProducts(yr, yi, o, re, im, base + (b * t1 + t2) * stride, war[w]!, wai[w]!, stride);
        }
      }
    }
    for (let p = 0; p < n; p++) {
      const o = base + p * stride;
      re.fill(0, o, o + stride);
      im.fill(0, o, o + stride);
      for (let t2 = 0, w = p; t2 < b; t2++, w += n) {
        addProducts(re, im, o, yr, yi, (t2 * a + (p % a)) * stride, wbr[w]!, wbi[w]!, stride);
      }
    }
  }
}

/** Scratch for the inner sums of side-by-side lines (grown as needed). */
let scratch = { re: new Float64Array(0), im: new Float64Array(0) };

/** out[o + i] += x[x0 + i]·(wr + i wi) for i < count, complex (real and imaginary arrays). */
function addProducts(
  outR: Float64Array,
  outI: Float64Array,
  o: number,
  xr: Float64Array,
  xi: Float64Array,
  x0: number,
  wr: number,
  wi: number,
  count: number,
): void {
  for (let i = 0; i < count; i++) {
    const r = xr[x0 + i]!;
    const m = xi[x0 + i]!;
    outR[o + i] = outR[o + i]! + (r * wr - m * wi);
    outI[o + i] = outI[o + i]! + (r * wi + m * wr);
  }
}

/** exp(2πi (t·p mod n)/n) for t < rows, p < n, at t·n + p: real and imaginary parts. */
function twiddles(rows: number, n: number): [Float64Array, Float64Array] {
  const re = new Float64Array(rows * n);
  const im = new Float64Array(rows * n);
  for (let t = 0; t < rows; t++) {
    for (let p = 0; p < n; p++) {
      const angle = (2 * Math.PI * ((t * p) % n)) / n;
      re[t * n + p] = Math.cos(angle);
      im[t * n + p] = Math.sin(angle);
    }
  }
  return [re, im];
}
