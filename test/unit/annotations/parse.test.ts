import { strict as assert } from 'node:assert';
import { parseAnnotations } from '../../../src/core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../../src/core/annotations/serializeAnnotations';
import { buildAnnotations } from '../../../src/core/annotations/buildAnnotations';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { ReaderError } from '../../../src/core/errors';
import { analyticReport } from './analyticReport';

const SOURCE = { format: 'vasp-eigenval', file: 'EIGENVAL', files: [{ role: 'eigenvalues', path: 'EIGENVAL', sha256: 'b'.repeat(64) }] };
const good = (): string => serializeAnnotations(buildAnnotations(analyticReport(), SOURCE, DEFAULT_SETTINGS, { toolVersion: '0.1.0' }));

/** 1-based line and column of the first occurrence of `needle` in `text` (+ offset characters). */
function where(text: string, needle: string, offset = 0): { line: number; column: number } {
  const i = text.indexOf(needle) + offset;
  assert.ok(i >= offset, `${needle} not in text`);
  const before = text.slice(0, i).split('\n');
  return { line: before.length, column: before[before.length - 1]!.length + 1 };
}

function readerError(text: string): ReaderError {
  try {
    parseAnnotations(text, 'run/EIGENVAL.valleys.json');
  } catch (e) {
    assert.ok(e instanceof ReaderError, `a ReaderError, got ${String(e)}`);
    return e;
  }
  assert.fail('the text was accepted');
}

describe('annotations reader', () => {
  it('locates a missing comma at the line and column where the next key starts', () => {
    const text = good().replace('"note": "",\n  "entries"', '"note": ""\n  "entries"');
    const e = readerError(text);
    const at = where(text, '"entries"');
    assert.equal(e.line, at.line);
    assert.equal(e.column, at.column);
    assert.equal(e.file, 'run/EIGENVAL.valleys.json');
    assert.match(e.message, /^run\/EIGENVAL\.valleys\.json:\d+:\d+: not valid JSON: expected "," or "}" after the value of "note"/);
  });

  it('says a truncated file is truncated, wherever it is cut', () => {
    const text = good();
    for (const cut of [1, 10, Math.floor(text.length / 2), text.length - 3]) {
      const e = readerError(text.slice(0, cut));
      assert.ok(e.line >= 1, 'located');
      assert.match(e.reason, /not valid JSON/);
    }
    assert.match(readerError('').reason, /empty/);
  });

  it('refuses a key written twice, pointing at the second', () => {
    const text = good().replace('"note": "",\n  "entries"', '"note": "",\n  "note": "second",\n  "entries"');
    const e = readerError(text);
    assert.equal(e.line, where(text, '"note": "second"').line);
    assert.match(e.reason, /the key "note" appears twice/);
  });

  it('refuses version-control conflict markers with their line', () => {
    const lines = good().split('\n');
    const i = lines.findIndex((l) => l.includes('"status"'));
    lines.splice(i, 1, '<<<<<<< HEAD', '      "status": "accepted",', '=======', '      "status": "questioned",', '>>>>>>> review');
    const e = readerError(lines.join('\n'));
    assert.equal(e.line, i + 1);
    assert.match(e.reason, /conflict markers/);
  });

  it('refuses a file of a newer layout instead of losing what it holds', () => {
    const e = readerError(good().replace('"valleyscopeAnnotations": 2', '"valleyscopeAnnotations": 3'));
    assert.equal(e.line, 2);
    assert.match(e.reason, /newer than layout 2/);
  });

  it('names a field of the wrong type and where its value is', () => {
    const text = good().replace('"band": 2,\n      "valley"', '"band": "two",\n      "valley"');
    const e = readerError(text);
    const at = where(text, '"two"');
    assert.deepEqual({ line: e.line, column: e.column }, at);
    assert.match(e.reason, /entries\[\d\]\.band must be a number, found the text "two"/);
    const zero = readerError(good().replace('"band": 2,\n      "k"', '"band": 0,\n      "k"'));
    assert.match(zero.reason, /band must be a whole number of 1 or more, found 0/);
    const kind = readerError(good().replace('"kind": "cbm"', '"kind": "bottom"'));
    assert.match(kind.reason, /kind must be one of vbm, cbm, valley, peak, found "bottom"/);
  });

  it('says when a text is JSON but not an annotations file', () => {
    assert.match(readerError('[1, 2]').reason, /holds one JSON object, found a list/);
    assert.match(readerError('{"entries": []}').reason, /not a Valleyscope annotations file/);
  });

  it('reads a byte-order mark and Windows line endings as the same document', () => {
    const text = good();
    const crlf = '\uFEFF' + text.replace(/\n/g, '\r\n');
    assert.equal(serializeAnnotations(parseAnnotations(crlf, 'x')), text);
  });

  it('fills in what a hand-written file leaves out and keeps a status of its own wording', () => {
    const warnings: string[] = [];
    const doc = parseAnnotations(
      '{"valleyscopeAnnotations": 1, "entries": [{"kind": "cbm", "band": 5, "k": [0.5, 0, 0.5], "energy_eV": 0.61, "status": "ask Ana"}]}',
      'hand.valleys.json',
      warnings,
    );
    const e = doc.entries[0]!;
    // No gap in the file: no edge to count from, so the absolute band names it.
    assert.equal(e.id, 'cbm/b5/v=0.5,0,0.5');
    assert.equal(e.status, 'ask Ana');
    assert.equal(e.note, '');
    assert.equal(e.found, true);
    assert.deepEqual(e.masses, []);
    assert.equal(doc.settings.window_meV, DEFAULT_SETTINGS.window_meV);
    assert.ok(warnings.some((w) => /review status "ask Ana"/.test(w)));
    assert.ok(warnings.some((w) => /no analysis settings/.test(w)));
  });

  it('keeps unknown fields, even one named __proto__, without touching any prototype', () => {
    const doc = parseAnnotations(
      '{"valleyscopeAnnotations": 1, "__proto__": {"polluted": true}, "ticket": "REV-12", "entries": [{"kind": "vbm", "band": 4, "k": [0, 0, 0], "energy_eV": 0, "constructor": 1}]}',
      'x',
    );
    assert.equal(({} as Record<string, unknown>).polluted, undefined);
    assert.deepEqual(Object.keys(doc.extra), ['__proto__', 'ticket']);
    assert.equal(doc.entries[0]!.extra.constructor, 1);
    const text = serializeAnnotations(doc);
    assert.match(text, /"__proto__": \{\n {4}"polluted": true\n {2}\},\n {2}"ticket": "REV-12"\n\}\n$/);
  });

  it('refuses two entries for the same extremum', () => {
    const entry = '{"kind": "vbm", "band": 4, "k": [0, 0, 0], "energy_eV": 0}';
    const e = readerError(`{"valleyscopeAnnotations": 1, "entries": [${entry},\n ${entry}]}`);
    assert.equal(e.line, 2);
    assert.match(e.reason, /same extremum as entries\[0\]/);
  });

  it('refuses nesting deep enough to threaten the stack, with a sentence', () => {
    const deep = '{"valleyscopeAnnotations": 1, "x": ' + '['.repeat(100000) + ']'.repeat(100000) + '}';
    assert.match(readerError(deep).reason, /nested more than 64 levels/);
  });

  it('refuses numbers and escapes that are not JSON', () => {
    for (const bad of ['01', '1.', '.5', '+1', 'NaN', 'Infinity', '1e999', '"\\x41"', "'a'"]) {
      const e = readerError(`{"valleyscopeAnnotations": 1, "x": ${bad}}`);
      assert.equal(e.line, 1, bad);
      assert.match(e.reason, /not valid JSON/, bad);
    }
  });
});
