/**
 * Property-based fuzzing of the annotations reader (issue 10): whatever the bytes, it returns a document or
 * throws a ReaderError with a located sentence — never another exception, never a hang — and a document it
 * accepts writes and reads back to the same bytes. Fixed seed and bounded runs here; set
 * VALLEYSCOPE_FUZZ_RUNS=20000 for a longer local run.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { ReaderError } from '../../../src/core/errors';
import { docArb, fuzzParams, fuzzTimeout } from './arbitraries';

/** Parse; on success the document must be a fixed point of write-read; on failure a located ReaderError. */
function parseOrLocatedError(text: string): void {
  let doc;
  try {
    doc = parseAnnotations(text, 'fuzz.valleys.json');
  } catch (e) {
    assert.ok(e instanceof ReaderError, `unexpected ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}`);
    assert.ok(e.message.startsWith('fuzz.valleys.json'), e.message);
    assert.ok(e.reason.length > 0 && !e.reason.includes('\n'), 'one sentence');
    const lines = text.split(/\r\n|\r|\n/).length;
    assert.ok(e.line >= 0 && e.line <= lines, `line ${e.line} within the ${lines} lines`);
    return;
  }
  const out = serializeAnnotations(doc);
  assert.equal(serializeAnnotations(parseAnnotations(out, 'again')), out);
}

describe('annotations reader under fuzzing', function () {
  this.timeout(fuzzTimeout());
  it('survives arbitrary text', () => {
    fc.assert(fc.property(fc.string({ maxLength: 300, unit: 'binary' }), parseOrLocatedError), fuzzParams(400));
  });

  it('survives arbitrary JSON values, with and without the layout key', () => {
    fc.assert(
      fc.property(fc.jsonValue({ maxDepth: 5 }), fc.boolean(), (v, tag) => {
        const value = tag && v !== null && typeof v === 'object' && !Array.isArray(v) ? { valleyscopeAnnotations: 1, ...v } : v;
        parseOrLocatedError(JSON.stringify(value));
      }),
      fuzzParams(300),
    );
  });

  it('survives valid files cut, spliced and corrupted anywhere', () => {
    const mutation = fc.oneof(
      fc.record({ op: fc.constant('cut' as const), at: fc.double({ min: 0, max: 1, noNaN: true }) }),
      fc.record({ op: fc.constant('delete' as const), at: fc.double({ min: 0, max: 1, noNaN: true }), n: fc.integer({ min: 1, max: 20 }) }),
      fc.record({
        op: fc.constant('insert' as const),
        at: fc.double({ min: 0, max: 1, noNaN: true }),
        s: fc.constantFrom('"', ',', '{', ']', '-', 'e', '\\', '\u0000', '\r', 'null', '<<<<<<< x\n', '1e400'),
      }),
    );
    fc.assert(
      fc.property(docArb, fc.array(mutation, { minLength: 1, maxLength: 3 }), (doc, ops) => {
        let text = serializeAnnotations(doc);
        for (const m of ops) {
          const i = Math.floor(m.at * text.length);
          if (m.op === 'cut') text = text.slice(0, i);
          else if (m.op === 'delete') text = text.slice(0, i) + text.slice(i + m.n);
          else text = text.slice(0, i) + m.s + text.slice(i);
        }
        parseOrLocatedError(text);
      }),
      fuzzParams(300),
    );
  });

  it('reads back every document the writer makes to the same document', () => {
    fc.assert(
      fc.property(docArb, (doc) => {
        const text = serializeAnnotations(doc);
        const back = parseAnnotations(text, 'x');
        assert.equal(back.entries.length, doc.entries.length);
        assert.deepEqual(
          back.entries.map((e) => [e.id, e.note, e.status, e.found]).sort(),
          doc.entries.map((e) => [e.id, e.note, e.status, e.found]).sort(),
        );
        assert.deepEqual(JSON.parse(JSON.stringify(back.extra)), JSON.parse(JSON.stringify(doc.extra)));
      }),
      fuzzParams(150),
    );
  });
});
