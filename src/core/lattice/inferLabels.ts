/**
 * Give a run without path labels (no KPOINTS or equivalent) the standard high-symmetry labels recognised from
 * its lattice, and say so in a warning: inferred labels are a convenience the reviewer should check.
 */
import type { BandStructure, InputWarning } from '../model';
import { isValleyscopeError } from '../errors';
import { recogniseSpecialPoints } from './specialPoints';
import { ensureSymmetryReady } from './symmetry';

/**
 * True when the k-points carry unequal weights: the multiplicities of an irreducible mesh, never a path (the
 * codes write a band path with equal weights, or zero weights in a hybrid run).
 */
export function weightedLikeMesh(bs: BandStructure): boolean {
  const w = bs.weights;
  if (!w || w.length < 2) return false;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < w.length; i++) {
    const v = w[i]!;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo > 0 && hi > 1.5 * lo;
}

/** Returns the band structure with inferred labels and a warning, or unchanged when labels exist or none fit. */
export async function withInferredLabels(bs: BandStructure): Promise<BandStructure> {
  if (bs.labels.length > 0 || bs.sampling === 'grid' || !(bs.structure?.lattice ?? bs.lattice) || bs.nk === 0) return bs;
  // An irreducible mesh (unequal weights) is not a path: no path labels to infer, and no warning about them.
  if (weightedLikeMesh(bs)) return bs;
  // alat alone does not give the lattice (an fcc and a simple-cubic crystal share it): no labels from a frame
  // built from alat only.
  if (!bs.structure && bs.warnings.some((w) => w.code === 'cell-unknown')) {
    return {
      ...bs,
      warnings: [
        ...bs.warnings,
        {
          code: 'labels-not-inferred',
          message:
            'No path labels were given, and only alat is known, not the lattice: high-symmetry labels are not inferred from alat alone (give --structure).',
        },
      ],
    };
  }
  let warning: InputWarning;
  try {
    await ensureSymmetryReady();
    const r = recogniseSpecialPoints(bs);
    if (r.labels.length > 0) {
      const names = [...new Set(r.labels.map((l) => l.label))].join(', ');
      warning = {
        code: 'labels-inferred',
        message:
          `No path labels were given: ${names} were inferred from the ${r.kind ?? ''} lattice ` +
          `(${bs.structure ? 'crystal structure' : 'lattice vectors only'}; Setyawan & Curtarolo 2010 convention). Check them against the path that was run.`,
      };
      return { ...bs, labels: r.labels, warnings: [...bs.warnings, warning] };
    }
    warning = {
      code: 'labels-not-inferred',
      message: `No path labels were given and none could be inferred: ${r.reason ?? 'no special point found'}.`,
    };
  } catch (e) {
    if (!isValleyscopeError(e) && !(e instanceof Error)) throw e;
    warning = { code: 'labels-not-inferred', message: `No path labels were given and none could be inferred: ${e.message}.` };
  }
  return { ...bs, warnings: [...bs.warnings, warning] };
}
