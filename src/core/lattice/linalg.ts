/** Small fixed-size linear algebra for 3-vectors and 3×3 matrices (rows). */
import type { Mat3, Vec3 } from '../model';

export function det3(m: Mat3): number {
  const [a, b, c] = m;
  return a[0] * (b[1] * c[2] - b[2] * c[1]) - a[1] * (b[0] * c[2] - b[2] * c[0]) + a[2] * (b[0] * c[1] - b[1] * c[0]);
}

export function mat3Inverse(m: Mat3): Mat3 {
  const d = det3(m);
  if (d === 0) throw new Error('singular 3×3 matrix');
  const [a, b, c] = m;
  return [
    [(b[1] * c[2] - b[2] * c[1]) / d, (a[2] * c[1] - a[1] * c[2]) / d, (a[1] * b[2] - a[2] * b[1]) / d],
    [(b[2] * c[0] - b[0] * c[2]) / d, (a[0] * c[2] - a[2] * c[0]) / d, (a[2] * b[0] - a[0] * b[2]) / d],
    [(b[0] * c[1] - b[1] * c[0]) / d, (a[1] * c[0] - a[0] * c[1]) / d, (a[0] * b[1] - a[1] * b[0]) / d],
  ];
}

export function transpose3(m: Mat3): Mat3 {
  return [
    [m[0][0], m[1][0], m[2][0]],
    [m[0][1], m[1][1], m[2][1]],
    [m[0][2], m[1][2], m[2][2]],
  ];
}

/** Row vector times matrix: v · M. */
export function mulVecMat(v: Vec3, m: Mat3): Vec3 {
  return [
    v[0] * m[0][0] + v[1] * m[1][0] + v[2] * m[2][0],
    v[0] * m[0][1] + v[1] * m[1][1] + v[2] * m[2][1],
    v[0] * m[0][2] + v[1] * m[1][2] + v[2] * m[2][2],
  ];
}

/** Matrix times column vector: M v. */
export function mulMatVec(m: Mat3, v: Vec3): Vec3 {
  return [
    m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
    m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
    m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
  ];
}

export function mulMat(a: Mat3, b: Mat3): Mat3 {
  const r: Mat3 = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  for (let i = 0; i < 3; i++) {
    const ai = a[i]!;
    const ri = r[i]!;
    for (let j = 0; j < 3; j++) ri[j] = ai[0] * b[0][j]! + ai[1] * b[1][j]! + ai[2] * b[2][j]!;
  }
  return r;
}

export function dot(a: Vec3, b: Vec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

export function norm(a: Vec3): number {
  return Math.hypot(a[0], a[1], a[2]);
}

export function sub(a: Vec3, b: Vec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

export function add(a: Vec3, b: Vec3): Vec3 {
  return [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
}

export function scale(a: Vec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s];
}
