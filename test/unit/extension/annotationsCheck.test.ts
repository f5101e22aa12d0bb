import assert from 'node:assert/strict';
import { annotationsProblems } from '../../../src/extension/annotationsCheck';
import { composeAnnotations } from '../../../src/core/annotations/composeAnnotations';
import { composeInputOf, loadSi } from './demoRun';

describe('extension: problems of a hand-edited annotations file', () => {
  it('finds none in a file the extension wrote', async () => {
    const si = await loadSi();
    const c = composeAnnotations(composeInputOf(si));
    assert.deepEqual(annotationsProblems(c.text, 'EIGENVAL.valleys.json'), []);
  });

  it('puts a merge conflict left in the file on its line', async () => {
    const si = await loadSi();
    const c = composeAnnotations(composeInputOf(si));
    const lines = c.text.split('\n');
    // Git's conflict markers (git-merge documentation), as a careless merge leaves them.
    lines.splice(3, 0, '<<<<<<< HEAD');
    const problems = annotationsProblems(lines.join('\n'), 'EIGENVAL.valleys.json');
    assert.equal(problems.length, 1);
    assert.equal(problems[0]!.severity, 'error');
    assert.equal(problems[0]!.line, 3);
  });

  it("warns (without refusing) about a review status of the reviewer's own wording", async () => {
    const si = await loadSi();
    const c = composeAnnotations(composeInputOf(si));
    const doc = JSON.parse(c.text) as { entries: { status: string }[] };
    doc.entries[0]!.status = 'looks odd';
    const problems = annotationsProblems(JSON.stringify(doc, null, 2), 'EIGENVAL.valleys.json');
    assert.ok(problems.length >= 1);
    assert.ok(problems.every((p) => p.severity === 'warning'));
    assert.ok(problems.some((p) => p.message.includes('looks odd')));
  });
});
