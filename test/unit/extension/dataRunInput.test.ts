import assert from 'node:assert/strict';
import { dataRunInput, runCrystal } from '../../../src/core/compare/dataRunInput';
import { loadSi } from './demoRun';

describe('compare view: a data run as the comparison takes it', () => {
  it('gives the demo silicon its crystal: face-centred cubic, 48 rotations, one lattice point, Si2', async () => {
    const { bs, report } = await loadSi();
    const run = dataRunInput('r0', bs, report);
    assert.equal(run.name, 'r0');
    assert.equal(run.origin, 'data');
    assert.equal(run.report, report);
    // Silicon: diamond structure, space group Fd-3m (No. 227), Bravais lattice cF, point group m-3m of order 48
    // (International Tables for Crystallography, Vol. A); the demo's cell is the primitive two-atom cell.
    assert.equal(run.latticeType, 'cF');
    assert.equal(run.rotations?.length, 48);
    assert.equal(run.latticePointsPerCell, 1);
    assert.equal(run.composition, 'Si2');
    assert.ok(run.pathLines && run.pathLines.length > 0, 'the labelled path lines name valleys off the labels');
  });

  it('has no crystal without a structure (nothing guessed)', () => {
    assert.deepEqual(runCrystal(null), { rotations: null, latticeType: null, latticePointsPerCell: null, composition: null });
  });
});
