/**
 * JSON Lines records are read from files anyone may have written: a record with any field replaced by any
 * JSON value is either refused with a sentence (ValleyscopeError naming file:line and the field) or read and
 * compared without any other kind of failure.
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../../src/cli/main';
import { runsFromRecords, type JsonRecord } from '../../../../src/cli/batch/jsonLines';
import { compareRuns } from '../../../../src/core/compare/compareRuns';
import { formatComparison } from '../../../../src/core/compare/formatComparison';
import { ValleyscopeError } from '../../../../src/core/errors';
import { writeTinyRun } from '../../annotations/tinyRun';

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

/** Every path (list of keys/indices) into a JSON value. */
function paths(v: Json, prefix: (string | number)[] = []): (string | number)[][] {
  const out: (string | number)[][] = [prefix];
  if (Array.isArray(v)) v.forEach((x, i) => out.push(...paths(x, [...prefix, i])));
  else if (v !== null && typeof v === 'object') for (const [k, x] of Object.entries(v)) out.push(...paths(x, [...prefix, k]));
  return out;
}

function replaced(v: Json, path: (string | number)[], by: Json | undefined): Json {
  if (path.length === 0) return by === undefined ? null : by;
  const copy = JSON.parse(JSON.stringify(v)) as Json;
  let o = copy as Record<string | number, Json>;
  for (const k of path.slice(0, -1)) o = o[k] as Record<string | number, Json>;
  const last = path.at(-1)!;
  // Removing from an array shortens it (JSON has no holes).
  if (by === undefined && Array.isArray(o)) (o as Json[]).splice(last as number, 1);
  else if (by === undefined) delete o[last];
  else o[last] = by;
  return copy;
}

describe('JSON Lines records from anywhere', function () {
  this.timeout(120000);
  let good: Json[] = [];
  before(async () => {
    const root = mkdtempSync(join(tmpdir(), 'vs-jsonl-fuzz-'));
    writeTinyRun(join(root, 'a'), { gap_eV: 1.1 });
    writeTinyRun(join(root, 'b'), { gap_eV: 1.4 });
    let text = '';
    await main(['analyze', root, '--jsonl', '--jobs', '1'], { out: (t) => void (text += `${t}\n`), err: () => undefined });
    good = text
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l) as Json);
    assert.equal(good.length, 2);
  });

  it('a record with one field replaced or removed is refused with a sentence or compared', () => {
    const value: fc.Arbitrary<Json | undefined> = fc.oneof(
      fc.constant(undefined),
      fc.constantFrom<Json>(
        null,
        true,
        false,
        0,
        -1,
        1e308,
        -0.5,
        2.5,
        3,
        49,
        '',
        'Γ',
        'cbm',
        [],
        {},
        [0, 0, 0],
        [
          [1, 0, 0],
          [0, 1, 0],
          [0, 0, 1],
        ],
      ),
      fc.jsonValue() as fc.Arbitrary<Json>,
    );
    fc.assert(
      fc.property(fc.nat(), value, fc.nat(), (pick, by, which) => {
        const target = good[which % 2]!;
        // The record itself being an object with a "path" is checked by readJsonLines (tested in jsonLines.test.ts).
        const all = paths(target).slice(1);
        const path = all[pick % all.length]!;
        const mutated = replaced(target, path, by);
        const records: JsonRecord[] = [good[(which + 1) % 2]!, mutated].map((v, i) => ({
          path: i === 0 ? 'x/first' : 'x/second',
          where: `shard.jsonl:${i + 1}`,
          value: v as Record<string, unknown>,
        }));
        try {
          const { runs } = runsFromRecords(records);
          if (runs.length >= 2) for (const f of ['table', 'csv', 'md', 'json'] as const) formatComparison(compareRuns(runs), f);
        } catch (e) {
          if (!(e instanceof ValleyscopeError)) throw e;
          assert.match(e.message, /^shard\.jsonl:\d: /);
        }
      }),
      { numRuns: 300 },
    );
  });
});
