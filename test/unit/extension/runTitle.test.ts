import { strict as assert } from 'node:assert';
import { runTitle } from '../../../src/extension/runTitle';

describe('runTitle (tab titles and headers)', () => {
  it('names the run by its folder and file, so two EIGENVAL files can be told apart', () => {
    assert.equal(runTitle('/home/me/project/si-bulk/EIGENVAL'), 'si-bulk/EIGENVAL');
    assert.equal(runTitle('/home/me/project/gaas/EIGENVAL'), 'gaas/EIGENVAL');
    assert.notEqual(runTitle('/a/si-bulk/EIGENVAL'), runTitle('/a/si-strain/EIGENVAL'));
  });
  it('copes with a trailing slash (a run folder) and a file at the root', () => {
    assert.equal(runTitle('/runs/si-bulk/'), 'runs/si-bulk');
    assert.equal(runTitle('/EIGENVAL'), 'EIGENVAL');
  });
});
