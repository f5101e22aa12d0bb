/**
 * The byte-level XML scanner behind the vasprun.xml reader: the XML 1.0 rules it keeps (W3C XML 1.0, 5th ed.:
 * matching end tags, quoted attributes, the five predefined entities and character references, one root),
 * the safety rules (no document type declaration, no entity expansion, bounded constructs), line numbers in
 * errors, and results that do not depend on where the file is cut into pieces (property test).
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { ReaderError } from '../../../src/core/errors';
import { MAX_CONSTRUCT_BYTES, XmlByteScanner } from '../../../src/core/formats/xmlByteScanner';
import { VasprunStream, vasprunReader, type VasprunData } from '../../../src/core/formats/vasp/vasprun';
import { collinearModel, spinPolarisedModel } from '../../support/writers/roundTripModel';
import { writeVasprun } from '../../support/writers/vasprun';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);

interface Seen {
  opens: string[];
  texts: string[];
}

/** Scan `text` fed in pieces of the given sizes (cycled); collect every element's text. */
function scan(text: string, pieces: number[] = [text.length + 1], allowPartial = false): Seen & { complete: boolean } {
  const seen: Seen = { opens: [], texts: [] };
  const sc: XmlByteScanner = new XmlByteScanner('t.xml', 'test', {
    open: (name, attrs) => {
      seen.opens.push(
        attrs
          ? `${name}${Object.entries(attrs)
              .map(([k, v]) => ` ${k}=${v}`)
              .join('')}`
          : name,
      );
      return true;
    },
    close: (_name, _depth, text, length) => {
      if (text !== null) seen.texts.push(sc.decode(text, 0, length));
    },
  });
  const bytes = enc(text);
  let i = 0;
  let p = 0;
  while (i < bytes.length) {
    const n = Math.max(1, pieces[p++ % pieces.length]!);
    sc.write(bytes.subarray(i, Math.min(bytes.length, i + n)), i + n >= bytes.length);
    i += n;
  }
  const out = sc.finish(allowPartial);
  return { ...seen, complete: out.complete };
}

function fails(text: string, reason: RegExp, line?: number, pieces?: number[]): void {
  assert.throws(
    () => scan(text, pieces),
    (e: unknown) => {
      assert.ok(e instanceof ReaderError, `a ReaderError, got ${String(e)}`);
      assert.match(e.reason, reason);
      if (line !== undefined) assert.equal(e.line, line, e.message);
      return true;
    },
  );
}

describe('XmlByteScanner: XML rules', () => {
  it('reads elements, attributes (both quote kinds), text, comments, CDATA and processing instructions', () => {
    const s = scan(
      `<?xml version="1.0" encoding="ISO-8859-1"?>\n<!-- head -->\n<a x="1" y='two'>\n <b>hi &lt;there&gt; &#65;&#x42;</b><?pi stuff?>\n <c><![CDATA[ 1 < 2 ]]></c>\n <d/>\n</a>\n`,
    );
    assert.deepEqual(s.opens, ['a x=1 y=two', 'b', 'c', 'd']);
    // <a> holds elements, so it has no text of its own.
    assert.deepEqual(s.texts, ['hi <there> AB', ' 1 < 2 ', '']);
  });
  it('refuses what XML forbids, naming the line', () => {
    fails('<a>\n<b>\n</a>\n', /<\/a> where <\/b> was expected/, 3);
    fails('<a>\n</a>\n<b/>\n', /second root/, 3);
    fails('<a>x</a>\ntext\n', /text outside the root/, 2);
    fails('<a b=1/>', /not quoted/, 1);
    fails('<a b="1" b="2"/>', /appears twice/, 1);
    fails('<a b="<"/>', /inside an attribute value/, 1);
    fails('\n<a><?xml version="1.0"?></a>', /XML declaration that is not at the start/, 2);
    fails('<a>\n\n<!FOO></a>', /unknown "<!"/, 3);
    fails('<a>1 & 2</a>', /starts no entity reference/, 1);
    fails('<a><b/>stray</a>', /unexpected text/, 1);
    fails('<a>stray<b/></a>', /both text and elements/, 1);
  });
  it('tells a file that ends early from a malformed one, or reports it incomplete when asked', () => {
    fails('<a>\n<b>1</b>\n<c>2', /ends inside <c> before the XML is complete/);
    fails('<a>\n<b>1</b>\n<c', /ends inside <a>/);
    assert.equal(scan('<a>\n<b>1</b>\n<c>2', undefined, true).complete, false);
    fails('', /empty/);
  });
});

describe('XmlByteScanner: safety', () => {
  it('refuses a document type declaration, wherever the pieces are cut', () => {
    const laughs =
      '<?xml version="1.0"?>\n<!DOCTYPE lolz [<!ENTITY lol "lol"><!ENTITY lol2 "&lol;&lol;&lol;&lol;">]>\n<lolz>&lol2;</lolz>\n';
    for (const n of [1, 2, 3, 5, 8, 13, 1000]) fails(laughs, /document type/, 2, [n]);
    fails('<!DOCTYPE a SYSTEM "file:///etc/passwd">\n<a/>', /document type/, 1);
  });
  it('expands no entity beyond the five predefined ones and character references', () => {
    fails('<a>\n&ext;</a>', /undefined entity "&ext;"/, 2);
    fails('<a b="&ext;"/>', /undefined entity/);
    fails('<a>&#0;</a>', /undefined entity/);
    assert.deepEqual(scan('<a b="&amp;&quot;&apos;">&amp;amp;</a>').opens, ['a b=&"\'']);
    // "&amp;amp;" is "&amp;" as text: one level of replacement, never recursive.
    assert.deepEqual(scan('<a>&amp;amp;</a>').texts, ['&amp;']);
  });
  it('bounds every construct (a tag, a comment, a collected text): a sentence, no unbounded buffering', () => {
    const big = 'x'.repeat(2 * MAX_CONSTRUCT_BYTES);
    fails(`<a><!-- ${big} --></a>`, /runs over/, undefined, [65536]);
    fails(`<a><b c="${big}"/></a>`, /runs over/, undefined, [65536]);
    fails(`<a><b>${big}</b></a>`, /runs over/, undefined, [65536]);
    fails(`<a>${'<b>'.repeat(100)}`, /nests elements more than/);
  });
});

/** The parts of what the reader returns that must not depend on how the file is fed. */
function summary(d: VasprunData): unknown {
  return {
    nk: d.nk,
    nBands: d.nBands,
    nSpin: d.nSpin,
    energies: d.energies.map((e) => Array.from(e)),
    occupations: d.occupations?.map((o) => Array.from(o)) ?? null,
    kpoints: Array.from(d.kpoints),
    structure: d.structure
      ? { lattice: d.structure.lattice, species: d.structure.species, positions: Array.from(d.structure.positions) }
      : null,
    fermi: d.fermiEnergy,
    electrons: d.electrons,
    method: d.method,
    generation: d.generation,
  };
}

function feed(bytes: Uint8Array, cuts: number[], size: number | null): VasprunData {
  const s = new VasprunStream('vasprun.xml', size);
  let prev = 0;
  for (const c of [...cuts.filter((x) => x > 0 && x < bytes.length).sort((a, b) => a - b), bytes.length]) {
    if (c === prev) continue;
    s.write(bytes.subarray(prev, c), c === bytes.length);
    prev = c;
  }
  return s.finish(false);
}

function outcome(fn: () => VasprunData): unknown {
  try {
    return summary(fn());
  } catch (e) {
    if (e instanceof ReaderError) return { error: e.reason, line: e.line };
    throw e;
  }
}

describe('VasprunStream: independent of where the pieces are cut', () => {
  const good = enc(
    writeVasprun(spinPolarisedModel(), {
      generation: {
        divisions: 21,
        ends: [
          [0, 0, 0],
          [0.5, 0, 0],
        ],
      },
      projected: true,
      earlierStepShift: 1,
    }),
  );
  it('valid file: the same data for any cuts (property test, fixed seed)', () => {
    const whole = outcome(() => feed(good, [], good.length));
    assert.ok(!(whole as { error?: string }).error);
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: good.length }), { maxLength: 40 }), (cuts) => {
        assert.deepEqual(
          outcome(() => feed(good, cuts, good.length)),
          whole,
        );
      }),
      { seed: 20261202, numRuns: 40 },
    );
  });
  it('damaged file: the same sentence and line for any cuts', () => {
    const text = new TextDecoder().decode(good);
    const at = text.indexOf('<r>', text.indexOf('kpoint 7'));
    const damaged = enc(`${text.slice(0, at)}<r>  -1.2x34  1.0 </r>${text.slice(text.indexOf('</r>', at) + 4)}`);
    const whole = outcome(() => feed(damaged, [], damaged.length)) as { error: string; line: number };
    assert.match(whole.error, /should be numbers, found "-1\.2x34"/);
    assert.equal(whole.line, text.slice(0, at).split('\n').length, 'the line of the damaged row');
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: damaged.length }), { maxLength: 20 }), (cuts) => {
        assert.deepEqual(
          outcome(() => feed(damaged, cuts, damaged.length)),
          whole,
        );
      }),
      { seed: 20261203, numRuns: 30 },
    );
  });
});

describe('vasprun.xml rows: the fast path and the general path agree', () => {
  it('rows in exponent form, with signs, without the occupation column or spread over lines read the same values', () => {
    const model = collinearModel();
    const plain = writeVasprun(model);
    const bs0 = vasprunReader.read({ path: 'vasprun.xml', bytes: enc(plain) }, [], {});
    // Rewrite every row: energy in E-notation (the general path's parser), occupation with a "+" sign.
    let n = 0;
    const odd = plain.replace(/<r>\s*(\S+)\s+(\S+)\s*<\/r>/g, (_m, e: string, o: string) => {
      n++;
      return n % 3 === 0 ? `<r>${Number(e).toExponential(6)} +${o}</r>` : n % 3 === 1 ? `<r>\n ${e}\n ${o}\n</r>` : `<r>${e} ${o}</r>`;
    });
    const bs1 = vasprunReader.read({ path: 'vasprun.xml', bytes: enc(odd) }, [], {});
    assert.deepEqual(Array.from(bs1.energies[0]!), Array.from(bs0.energies[0]!));
    assert.deepEqual(Array.from(bs1.occupations![0]!), Array.from(bs0.occupations![0]!));
    const noOcc = plain.replace(/<r>\s*(\S+)\s+(\S+)\s*<\/r>/g, '<r>$1</r>');
    const bs2 = vasprunReader.read({ path: 'vasprun.xml', bytes: enc(noOcc) }, [], {});
    assert.equal(bs2.occupations, null);
    assert.deepEqual(Array.from(bs2.energies[0]!), Array.from(bs0.energies[0]!));
  });
  it('a row with a different number of columns is named, with its line', () => {
    const text = writeVasprun(collinearModel());
    const at = text.indexOf('<r>', text.indexOf('kpoint 3"'));
    const bad = `${text.slice(0, at)}<r> 1.0 2.0 3.0 </r>${text.slice(text.indexOf('</r>', at) + 4)}`;
    assert.throws(
      () => vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bad) }, [], {}),
      (e: unknown) =>
        e instanceof ReaderError &&
        /holds 3 numbers where the rows before hold 2/.test(e.reason) &&
        e.line === text.slice(0, at).split('\n').length,
    );
  });
  it('a damaged k-point or weight is named with its line (the k-point list has a fast path too)', () => {
    const text = writeVasprun(collinearModel());
    const list = text.indexOf('name="kpointlist"');
    const at = text.indexOf('<v>', list);
    const fifth = text.indexOf('<v>', text.indexOf('<v>', text.indexOf('<v>', text.indexOf('<v>', at + 1) + 1) + 1) + 1);
    const bad = `${text.slice(0, fifth)}<v> 0.1 0.2 </v>${text.slice(text.indexOf('</v>', fifth) + 4)}`;
    assert.throws(
      () => vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bad) }, [], {}),
      (e: unknown) =>
        e instanceof ReaderError &&
        /k-point 5 should hold 3 numbers, found 2/.test(e.reason) &&
        e.line === text.slice(0, fifth).split('\n').length,
    );
    const w = text.indexOf('<v>', text.indexOf('name="weights"'));
    const badW = `${text.slice(0, w)}<v> NaN </v>${text.slice(text.indexOf('</v>', w) + 4)}`;
    assert.throws(
      () => vasprunReader.read({ path: 'vasprun.xml', bytes: enc(badW) }, [], {}),
      (e: unknown) =>
        e instanceof ReaderError &&
        /the weight of k-point 1 should be a number, found "NaN"/.test(e.reason) &&
        e.line === text.slice(0, w).split('\n').length,
    );
  });
  it('a k-point with a band missing is named, at the end of its set, whatever path read the sets before', () => {
    const text = writeVasprun(spinPolarisedModel());
    const spin2 = text.indexOf('<set comment="spin 2">');
    const at = text.indexOf('<r>', text.indexOf('<set comment="kpoint 5">', spin2));
    const bad = `${text.slice(0, at)}${text.slice(text.indexOf('</r>', at) + 4)}`;
    const endOfSet = bad.indexOf('</set>', at);
    assert.throws(
      () => vasprunReader.read({ path: 'vasprun.xml', bytes: enc(bad) }, [], {}),
      (e: unknown) =>
        e instanceof ReaderError &&
        /k-point 5 lists 2 bands where the k-points before list 3/.test(e.reason) &&
        e.line === bad.slice(0, endOfSet).split('\n').length,
    );
  });
});
