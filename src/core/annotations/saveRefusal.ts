/**
 * When the numbers on screen must not be written into an annotations file, and the sentence why: a file that
 * ended early (a running job: provisional numbers), or a mesh run shown as its interpolant along a path (the
 * annotations of a mesh run are its mesh analysis, which `check` recomputes; the path's numbers would differ).
 */
import type { BandStructure } from '../model';

export function annotationsSaveRefusal(bs: BandStructure): string | null {
  if (bs.partial) {
    return 'Not saved: the file is incomplete (a running job?), so its numbers are provisional. Save once the run has finished.';
  }
  if (bs.interpolatedFrom) {
    const mesh = bs.interpolatedFrom.divisions.join('×');
    return `Not saved: these bands are interpolated from the ${mesh} mesh along a path, and the annotations of a mesh run hold its mesh analysis. Write them with \`valleyscope annotate\` on the run.`;
  }
  return null;
}
