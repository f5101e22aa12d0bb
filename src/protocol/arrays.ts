/**
 * Numeric arrays in transit between the extension host and a webview: an ArrayBuffer (VS Code transfers those
 * efficiently), a typed array, or base64 text of the little-endian bytes (for channels that only carry JSON).
 * Base64 is the platform's `btoa`/`atob` (present in browsers, webviews and Node ≥ 16).
 */

export type ArrayDType = 'f64' | 'f32';

/** A numeric array in transit: `length` values of `dtype` in `data`. */
export interface EncodedArray {
  dtype: ArrayDType;
  length: number;
  data: ArrayBuffer | Float64Array | Float32Array | string;
}

function copyAs(values: Float64Array | Float32Array, dtype: ArrayDType): Float64Array | Float32Array {
  return dtype === 'f32' ? Float32Array.from(values) : Float64Array.from(values);
}

/** Encode as an ArrayBuffer (a copy, so the caller's array stays usable). */
export function encodeArray(
  values: Float64Array | Float32Array,
  dtype: ArrayDType = values instanceof Float32Array ? 'f32' : 'f64',
): EncodedArray {
  const out = copyAs(values, dtype);
  return { dtype, length: out.length, data: out.buffer as ArrayBuffer };
}

/** Encode as base64 text (for JSON-only channels and tests). */
export function encodeArrayBase64(values: Float64Array | Float32Array, dtype: ArrayDType = 'f64'): EncodedArray {
  const out = copyAs(values, dtype);
  return { dtype, length: out.length, data: bytesToBase64(new Uint8Array(out.buffer)) };
}

/** Decode to a typed array of the encoded dtype. Throws on a length that does not match the bytes. */
export function decodeArray(a: EncodedArray): Float64Array | Float32Array {
  const width = a.dtype === 'f32' ? 4 : 8;
  let bytes: Uint8Array;
  if (typeof a.data === 'string') bytes = base64ToBytes(a.data);
  else if (a.data instanceof ArrayBuffer) bytes = new Uint8Array(a.data);
  else if (ArrayBuffer.isView(a.data)) bytes = new Uint8Array(a.data.buffer, a.data.byteOffset, a.data.byteLength);
  else throw new Error('encoded array: data is neither an ArrayBuffer, a typed array nor base64 text');
  if (bytes.byteLength !== a.length * width) {
    throw new Error(`encoded array: ${bytes.byteLength} bytes do not hold ${a.length} values of ${a.dtype}`);
  }
  // Copy into an aligned buffer (a view into a larger buffer may sit at an unaligned offset).
  const aligned = new Uint8Array(bytes.byteLength);
  aligned.set(bytes);
  return a.dtype === 'f32' ? new Float32Array(aligned.buffer) : new Float64Array(aligned.buffer);
}

/** Bytes per `String.fromCharCode` call: well under every engine's argument limit. */
const CHUNK = 0x8000;

/** Standard base64 (RFC 4648 §4, with padding) of the bytes. */
export function bytesToBase64(bytes: Uint8Array): string {
  let binary = '';
  for (let i = 0; i < bytes.length; i += CHUNK) binary += String.fromCharCode(...bytes.subarray(i, i + CHUNK));
  return btoa(binary);
}

/** The bytes of base64 text (whitespace and padding ignored); throws on anything that is not base64. */
export function base64ToBytes(text: string): Uint8Array {
  const clean = text.replace(/[\s=]+/g, '');
  if (/[^A-Za-z0-9+/]/.test(clean) || clean.length % 4 === 1) throw new Error('encoded array: not base64 text');
  const binary = atob(clean);
  const out = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i++) out[i] = binary.charCodeAt(i);
  return out;
}
