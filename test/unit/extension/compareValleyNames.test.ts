/**
 * One valley naming rule in the compare view: a data run's row, the row of its annotations file and the
 * "what changed" sentences all name a valley by the core comparison's id (compareRuns.ts). Data: the demo's
 * silicon runs (bands of Cohen & Bergstresser's empirical pseudopotential model, Phys. Rev. 141, 789 (1966)),
 * annotated with `valleyscope annotate` in a temporary folder.
 */
import assert from 'node:assert/strict';
import { cpSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '../../../src/cli/main';
import type { CliIO } from '../../../src/cli/io';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { loadRun } from '../../../src/core/load';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { loadAnnotationsRun } from '../../../src/core/compare/loadAnnotationsRun';
import { dataRunInput } from '../../../src/core/compare/dataRunInput';
import { buildCompareTable, type CompareEntry } from '../../../src/extension/compareViewData';

const RUNS = ['si-strain/01_biaxial-1.00pct', 'si-strain/05_biaxial+1.00pct', 'si-bulk'];

describe('compare view: one valley name per valley across data rows, annotations rows and events', function () {
  this.timeout(60_000);
  let dir: string;
  const entries: CompareEntry[] = [];

  before(async () => {
    await ensureSymmetryReady();
    dir = mkdtempSync(join(tmpdir(), 'vs-valley-names-'));
    let i = 0;
    for (const r of RUNS) {
      cpSync(join('fixtures', 'demo', r), join(dir, r), { recursive: true, filter: (s) => !s.endsWith('.valleys.json') });
      const io: CliIO & { err: (t: string) => void } = { out: () => undefined, err: () => undefined };
      assert.equal(await main(['annotate', join(dir, r, 'EIGENVAL')], io), 0);
      const bs = await loadRun(nodeFileAccessor, join(dir, r, 'EIGENVAL'));
      const id = `r${i++}`;
      entries.push({
        id,
        name: `${r}/EIGENVAL`,
        origin: 'data',
        annotations: 'current',
        staleReasons: [],
        // As the compare view's host builds a data row (core/compare/dataRunInput.ts).
        run: dataRunInput(id, bs, analyzeBandStructure(bs, DEFAULT_SETTINGS)),
        error: null,
        canOverlay: true,
      });
      const a = await loadAnnotationsRun(nodeFileAccessor, join(dir, r, 'EIGENVAL.valleys.json'));
      const aid = `r${i++}`;
      entries.push({
        id: aid,
        name: `${r}/EIGENVAL.valleys.json`,
        origin: 'annotations',
        annotations: 'current',
        staleReasons: [],
        run: { ...a.run, name: aid },
        error: null,
        canOverlay: false,
      });
    }
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('each annotations row names its edges and valleys as its data row does', () => {
    const t = buildCompareTable(entries, null, true);
    const valleyKeys = (values: Record<string, number | null>): string[] =>
      Object.keys(values)
        .filter((k) => /^valley\.[cv]\d+\.offset$/.test(k) && values[k] !== null)
        .sort();
    for (let i = 0; i < t.rows.length; i += 2) {
      const data = t.rows[i]!;
      const saved = t.rows[i + 1]!;
      assert.equal(saved.origin, 'annotations');
      assert.equal(saved.cbmValley, data.cbmValley, `${data.name}: CBM valley`);
      assert.equal(saved.vbmValley, data.vbmValley, `${data.name}: VBM valley`);
      assert.deepEqual(valleyKeys(saved.values), valleyKeys(data.values), `${data.name}: valley columns`);
      assert.ok(data.cbmValley && /^c\d+$/.test(data.cbmValley));
    }
    // Every valley an event names is a column of the table (the same ids).
    const ids = new Set(t.columns.filter((c) => c.key.startsWith('valley.')).map((c) => c.key.split('.')[1]));
    const named = t.events.flatMap((e) => [...e.message.matchAll(/valley ([cv]\d+)/g)].map((m) => m[1]!));
    assert.ok(named.length > 0, 'control: the strain series has valley events');
    for (const n of named) assert.ok(ids.has(n), `event valley ${n} is a column`);
  });
});
