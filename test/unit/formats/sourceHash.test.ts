import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { vaspEigenvalReader } from '../../../src/core/formats/vasp/eigenval';
import { vasprunReader } from '../../../src/core/formats/vasp/vasprun';
import { DETECT_HEAD_BYTES, READERS, detectFormat } from '../../../src/core/formats/index';
import { basename } from '../../../src/core/io/fileAccessor';
import { NOT_HASHED } from '../../../src/core/formats/sourceHash';
import type { InputFile } from '../../../src/core/io/fileAccessor';
import type { FormatReader, ReadOptions } from '../../../src/core/formats/types';

// Reference digest: node's OpenSSL SHA-256 (FIPS 180-4), a general-purpose library outside the project.
const opensslSha256 = (bytes: Uint8Array): string => createHash('sha256').update(bytes).digest('hex');

/** The file as bytes, or as a ranged source that hands out at most `chunk` bytes a read. */
function input(path: string, streamed: boolean, chunk = 4096): InputFile {
  const bytes = new Uint8Array(readFileSync(path));
  if (!streamed) return { path, bytes };
  const read = (off: number, len: number): Uint8Array => bytes.slice(off, Math.min(bytes.length, off + Math.min(len, chunk)));
  return { path, bytes: new Uint8Array(0), stream: { size: bytes.length, read, close: () => undefined } };
}

const cases: { name: string; reader: FormatReader; path: string }[] = [
  { name: 'EIGENVAL', reader: vaspEigenvalReader, path: 'fixtures/epm/si/EIGENVAL' },
  { name: 'vasprun.xml', reader: vasprunReader, path: 'fixtures/vasprun/vasprun.xml' },
];

describe('the main file hash is computed only when asked for (ReadOptions.hashSources)', () => {
  for (const { name, reader, path } of cases) {
    for (const streamed of [false, true]) {
      const how = streamed ? 'streamed' : 'whole';
      it(`${name}, ${how}: the default records the SHA-256 of the bytes; hashSources false records none and reads the same data`, () => {
        const bytes = new Uint8Array(readFileSync(path));
        const hashed = reader.read(input(path, streamed), [], {});
        const options: ReadOptions = { hashSources: false };
        const unhashed = reader.read(input(path, streamed), [], options);
        assert.equal(hashed.source.files[0]!.sha256, opensslSha256(bytes));
        assert.equal(unhashed.source.files[0]!.sha256, NOT_HASHED);
        assert.deepEqual(Array.from(unhashed.energies[0]!), Array.from(hashed.energies[0]!));
        assert.deepEqual(Array.from(unhashed.kpoints), Array.from(hashed.kpoints));
      });
    }
  }

  it('no digest is ever the empty string, so a record without one cannot pass for a hash', () => {
    // A SHA-256 digest is 64 hexadecimal digits (FIPS 180-4: 256 bits), even for empty input.
    assert.equal(opensslSha256(new Uint8Array(0)).length, 64);
    assert.notEqual(NOT_HASHED.length, 64);
  });

  it('every registered reader honours it for its main file', () => {
    const fixtures = [
      'fixtures/epm/si/EIGENVAL',
      'fixtures/vasprun/vasprun.xml',
      'fixtures/qe/si.xml',
      'fixtures/qe/si.bands.dat',
      'fixtures/castep/si.bands',
      'fixtures/wannier90/si_band.dat',
      'fixtures/bxsf/model.bxsf',
    ];
    const seen = new Set<string>();
    for (const path of fixtures) {
      const bytes = new Uint8Array(readFileSync(path));
      const found = detectFormat(bytes.subarray(0, DETECT_HEAD_BYTES), basename(path));
      assert.ok(found, path);
      // bands.x output gives k in 2π/alat: any alat serves here (the hash is the point).
      const bs = found.reader.read({ path, bytes }, [], { hashSources: false, alatAngstrom: 5.43 });
      assert.equal(bs.source.files[0]!.sha256, NOT_HASHED, found.reader.id);
      assert.equal(
        found.reader.read({ path, bytes }, [], { alatAngstrom: 5.43 }).source.files[0]!.sha256,
        opensslSha256(bytes),
        found.reader.id,
      );
      seen.add(found.reader.id);
    }
    assert.deepEqual([...seen].sort(), READERS.map((r) => r.id).sort());
  });
});
