/**
 * Which line of a file's text holds each k-point: found by content, not by format, so it works for every
 * layout that writes the three fractional coordinates of a k-point on one line (EIGENVAL, vasprun.xml,
 * CASTEP .bands, ...). k-points are searched for in order, each after the line of the previous one.
 * Pure; no `vscode`.
 */

/** Numbers written within this of each other are the same coordinate (files print 6–8 decimals). */
const MATCH_TOL = 2e-5;

/** Text longer than this is not scanned (the editor turns off language features for such files anyway). */
export const MAX_SCANNED_CHARS = 64 * 1024 * 1024;

function isSep(c: number): boolean {
  // space, tab, CR, ',', ';', '<', '>', '(', ')', '[', ']', '='
  return (
    c === 32 ||
    c === 9 ||
    c === 13 ||
    c === 44 ||
    c === 59 ||
    c === 60 ||
    c === 62 ||
    c === 40 ||
    c === 41 ||
    c === 91 ||
    c === 93 ||
    c === 61
  );
}

/** Numeric tokens of one line (Fortran 'D' exponents accepted); other tokens become NaN. */
export function lineNumbers(text: string, start: number, end: number, out: number[]): void {
  out.length = 0;
  let i = start;
  while (i < end) {
    while (i < end && isSep(text.charCodeAt(i))) i++;
    if (i >= end) break;
    const s = i;
    while (i < end && !isSep(text.charCodeAt(i))) i++;
    const tok = text.slice(s, i);
    const v = Number(/[dD]/.test(tok) ? tok.replace(/[dD]/, 'e') : tok);
    out.push(tok.length > 0 ? v : Number.NaN);
  }
}

/** Where the triple sits in the line's tokens (-1: not there). */
function tripleAt(nums: number[], kx: number, ky: number, kz: number): number {
  for (let j = 0; j + 2 < nums.length; j++) {
    if (Math.abs(nums[j]! - kx) <= MATCH_TOL && Math.abs(nums[j + 1]! - ky) <= MATCH_TOL && Math.abs(nums[j + 2]! - kz) <= MATCH_TOL)
      return j;
  }
  return -1;
}

/** A line's shape: how many tokens it has and where the coordinates sit, e.g. "4@0" for EIGENVAL. */
type Shape = string;

function scan(text: string, kpoints: Float64Array, nk: number, shape: Shape | null): { lines: Int32Array; shapes: Shape[] } {
  const lines = new Int32Array(nk).fill(-1);
  const shapes: Shape[] = [];
  const nums: number[] = [];
  let k = 0;
  let line = 0;
  let pos = 0;
  while (pos <= text.length && k < nk) {
    let end = text.indexOf('\n', pos);
    if (end < 0) end = text.length;
    lineNumbers(text, pos, end, nums);
    if (nums.length >= 3) {
      const j = tripleAt(nums, kpoints[3 * k]!, kpoints[3 * k + 1]!, kpoints[3 * k + 2]!);
      const sh = `${nums.length}@${j}`;
      if (j >= 0 && (shape === null || sh === shape)) {
        lines[k] = line;
        shapes.push(sh);
        k++;
      }
    }
    pos = end + 1;
    line++;
  }
  return { lines, shapes };
}

/**
 * 0-based line of each k-point (nk entries; -1 where a k-point was not found, and for all k-points after
 * it). `kpoints` is nk × 3 fractional coordinates.
 *
 * A first pass takes the first line holding each k-point's coordinates; header lines can hold numbers that
 * look like a k-point (tiny values read as 0). When the 2nd and 3rd k-points sit on lines of the same shape,
 * a second pass accepts only lines of that shape.
 */
export function locateKpointLines(text: string, kpoints: Float64Array, nk: number, cartesian: Float64Array | null = null): Int32Array {
  if (nk === 0 || text.length > MAX_SCANNED_CHARS) return new Int32Array(nk).fill(-1);
  const fractional = locateBy(text, kpoints, nk);
  if (!cartesian || fractional[nk - 1]! >= 0) return fractional;
  // Layouts that write cartesian k in units of 2π/alat (Quantum ESPRESSO's XML and bands.x output): the
  // written numbers are the cartesian k (Å⁻¹) times alat/2π, a factor found from the file itself.
  const found = (a: Int32Array): number => a.reduce((n, l) => n + (l >= 0 ? 1 : 0), 0);
  let best = fractional;
  for (const scale of candidateScales(text, cartesian, nk)) {
    const byCartesian = locateBy(
      text,
      cartesian.map((x) => x * scale),
      nk,
    );
    if (found(byCartesian) > found(best)) best = byCartesian;
    if (best[nk - 1]! >= 0) break;
  }
  return best;
}

/** At most this many candidate factors are tried (lattice vectors and the like also give proportional triples). */
const MAX_SCALES = 8;

/**
 * Candidate factors s with written ≈ s × cartesian: from lines holding a triple proportional (s > 0) to the
 * first k-point away from Γ, in file order, distinct.
 */
function candidateScales(text: string, cartesian: Float64Array, nk: number): number[] {
  let j = -1;
  for (let k = 0; k < nk && j < 0; k++) if (Math.hypot(cartesian[3 * k]!, cartesian[3 * k + 1]!, cartesian[3 * k + 2]!) > 1e-6) j = k;
  if (j < 0) return [];
  const c = [cartesian[3 * j]!, cartesian[3 * j + 1]!, cartesian[3 * j + 2]!];
  const c2 = c[0]! * c[0]! + c[1]! * c[1]! + c[2]! * c[2]!;
  const out: number[] = [];
  const nums: number[] = [];
  let pos = 0;
  while (pos <= text.length && out.length < MAX_SCALES) {
    let end = text.indexOf('\n', pos);
    if (end < 0) end = text.length;
    lineNumbers(text, pos, end, nums);
    for (let i = 0; i + 2 < nums.length; i++) {
      const t = [nums[i]!, nums[i + 1]!, nums[i + 2]!];
      if (!t.every(Number.isFinite)) continue;
      const sc = (t[0]! * c[0]! + t[1]! * c[1]! + t[2]! * c[2]!) / c2;
      if (!(sc > 0) || !t.every((x, m) => Math.abs(x - sc * c[m]!) <= MATCH_TOL)) continue;
      if (!out.some((o) => Math.abs(o - sc) <= 1e-6 * o)) out.push(sc);
    }
    pos = end + 1;
  }
  return out;
}

function locateBy(text: string, kpoints: Float64Array, nk: number): Int32Array {
  const first = scan(text, kpoints, nk, null);
  if (nk < 3 || first.shapes.length < 3 || first.shapes[1] !== first.shapes[2]) return first.lines;
  const second = scan(text, kpoints, nk, first.shapes[1]!);
  if (second.shapes.length < first.shapes.length) return first.lines;
  refineFirst(text, kpoints, second.lines, first.shapes[1]!);
  return second.lines;
}

/**
 * The first k-point's coordinates can appear earlier than its own line, in a line of the same shape: vasprun.xml
 * lists the path's corners (`<generation>`) before the k-point list, and Γ is usually the first corner. Take
 * the last line of that shape holding k-point 1 before k-point 2's line.
 */
function refineFirst(text: string, kpoints: Float64Array, lines: Int32Array, shape: Shape): void {
  const l0 = lines[0]!;
  const l1 = lines[1]!;
  if (l0 < 0 || l1 < 0 || l1 - l0 <= 1) return;
  const nums: number[] = [];
  let line = 0;
  let pos = 0;
  while (line < l0 + 1) {
    pos = text.indexOf('\n', pos) + 1;
    line++;
  }
  for (; line < l1 && pos > 0; line++) {
    let end = text.indexOf('\n', pos);
    if (end < 0) end = text.length;
    lineNumbers(text, pos, end, nums);
    const j = nums.length >= 3 ? tripleAt(nums, kpoints[0]!, kpoints[1]!, kpoints[2]!) : -1;
    if (j >= 0 && `${nums.length}@${j}` === shape) lines[0] = line;
    pos = end + 1;
  }
}

/** The k-point whose line is `line`, or -1. `kLines` as returned by locateKpointLines (increasing). */
export function kpointAtLine(kLines: Int32Array, line: number): number {
  let lo = 0;
  let hi = kLines.length - 1;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const v = kLines[mid]!;
    if (v === -1 || v > line) hi = mid - 1;
    else if (v < line) lo = mid + 1;
    else return mid;
  }
  return -1;
}
