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
    const { xr, xi } = line;
    // The lines along the axis start at the indices whose coordinate along it is 0.
    const outer = total / (n * stride);
    for (let hi = 0; hi < outer; hi++) {
      for (let lo = 0; lo < stride; lo++) {
        const base = hi * n * stride + lo;
        for (let t = 0, at = base; t < n; t++, at += stride) {
          xr[t] = re[at]!;
          xi[t] = im[at]!;
        }
        line.run();
        for (let p = 0, at = base; p < n; p++, at += stride) {
          re[at] = xr[p]!;
          im[at] = xi[p]!;
        }
      }
    }
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
    for (let t2 = 0; t2 < b; t2++) {
      for (let p1 = 0; p1 < a; p1++) weightedSum(yr, yi, t2 * a + p1, xr, xi, t2, b, war, wai, p1, a, a);
    }
    for (let p = 0; p < n; p++) weightedSum(xr, xi, p, yr, yi, p % a, a, wbr, wbi, p, n, b);
  }
}

/** out[at] = Σ_{s<count} x[x0 + s·xStep] w[w0 + s·wStep], complex (real and imaginary arrays). */
function weightedSum(
  outR: Float64Array,
  outI: Float64Array,
  at: number,
  xr: Float64Array,
  xi: Float64Array,
  x0: number,
  xStep: number,
  wr: Float64Array,
  wi: Float64Array,
  w0: number,
  wStep: number,
  count: number,
): void {
  let sr = 0;
  let si = 0;
  for (let s = 0, x = x0, w = w0; s < count; s++, x += xStep, w += wStep) {
    sr += xr[x]! * wr[w]! - xi[x]! * wi[w]!;
    si += xr[x]! * wi[w]! + xi[x]! * wr[w]!;
  }
  outR[at] = sr;
  outI[at] = si;
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
