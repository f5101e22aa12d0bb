/**
 * A count read from a header (atoms, k-points, ...) is checked against the bytes that follow before anything
 * is allocated for it: each announced item needs at least `minBytesEach` bytes of text, so a 450-byte file
 * cannot make a reader allocate gigabytes.
 */
import type { TextScanner } from './textScanner';

export function checkAnnouncedCount(sc: TextScanner, count: number, minBytesEach: number, what: string, line = sc.line): void {
  if (!Number.isSafeInteger(count) || count < 0) throw sc.error(`the header announces ${count} ${what}, which is not a count`, line, 0);
  const left = sc.bytes.length - sc.pos;
  if (count * minBytesEach > left) {
    throw sc.error(
      `the header announces ${count} ${what}, more than the ${left} bytes after it can hold (each needs at least ${minBytesEach}): the file is damaged, truncated or not this layout`,
      line,
      0,
    );
  }
}
