/**
 * Telling a file cut short (a job still writing, a copy interrupted) from a damaged one, for readers that
 * honour `allowPartial`: after an error, the cut is at the current line when nothing but blank lines follows.
 */
import type { TextScanner } from './textScanner';

/** After an error: true when nothing but blank lines follows the current line (the file was cut there). */
export function endsOnThisLine(sc: TextScanner): boolean {
  for (let i = 0; i < 64; i++) {
    if (!sc.nextLine()) return sc.atEnd();
    if (!sc.lineIsBlank()) return false;
  }
  return false;
}
