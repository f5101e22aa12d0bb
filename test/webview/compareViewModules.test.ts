/**
 * The compare view's pure modules (no DOM): overlay layout and thinning, table sorting and cell texts, the
 * state kept across reloads, the trend plot's data. Expected values are hand computations from each
 * module's stated rule (marked so), on small tables made here.
 */
import assert from 'node:assert/strict';
import { encodeArray, type CompareBandRun, type CompareColumn, type CompareRow, type CompareTable } from '../../src/protocol';
import { layoutOverlay, pathsMatch } from '../../webview/compareView/overlayLayout';
import { keepSort, nextSort, sortRows } from '../../webview/compareView/tableSort';
import {
  bandsNearWindow,
  decodeBandRun,
  E_HIGH,
  E_LOW,
  strideFor,
  thinnedChannels,
  thinnedIndices,
} from '../../webview/compareView/overlayData';
import { carryRows, DEFAULT_STATE, readSavedState, userValuesByName } from '../../webview/compareView/savedState';
import {
  cbmCell,
  columnTitle,
  formatValue,
  gapKindText,
  parseTypedValue,
  tableSummary,
  USER_KEY,
} from '../../webview/compareView/tableText';
import {
  NO_SERIES_COLOUR,
  paddedDomain,
  seriesColour,
  TREND_SERIES_COLOURS,
  trendAxes,
  trendNoteText,
  trendPoints,
  trendSeries,
} from '../../webview/compareView/trendData';

/** A table row with only what a test sets. */
function row(id: string, name: string, extra: Partial<CompareRow> = {}): CompareRow {
  return {
    id,
    name,
    origin: 'data',
    isReference: false,
    annotations: 'none',
    staleReasons: [],
    error: null,
    metal: false,
    direct: false,
    vbm: null,
    cbm: null,
    cbmValley: null,
    vbmValley: null,
    values: {},
    canOverlay: true,
    ...extra,
  };
}

describe('compare view layout and sorting (pure modules)', () => {
  const seg = (start: number, end: number, a: string, b: string, afterJump = false) => ({
    start,
    end,
    startLabel: a,
    endLabel: b,
    afterJump,
  });
  const tick = (distance: number, label: string, kIndex: number) => ({ distance, label, kIndex });

  it('runs on the same labelled path share the axis, each segment stretched onto the first run’s', () => {
    // Two runs Γ–X–L: segment lengths differ (a strained cell), so raw distances would misplace X.
    const a = {
      nk: 5,
      distance: Float64Array.from([0, 0.5, 1, 1.5, 2]),
      segments: [seg(0, 2, 'Γ', 'X'), seg(2, 4, 'X', 'L')],
      ticks: [tick(0, 'Γ', 0), tick(1, 'X', 2), tick(2, 'L', 4)],
    };
    const b = {
      nk: 5,
      distance: Float64Array.from([0, 0.6, 1.2, 1.6, 2.0]),
      segments: [seg(0, 2, 'Γ', 'X'), seg(2, 4, 'X', 'L')],
      ticks: [tick(0, 'Γ', 0), tick(1.2, 'X', 2), tick(2.0, 'L', 4)],
    };
    assert.equal(pathsMatch([a, b]), true);
    const l = layoutOverlay([a, b]);
    assert.equal(l.shared, true);
    // Linear map of each segment onto the reference segment (hand computation): X of b lands on X of a.
    Array.from(l.x[1]!).forEach((x, i) => assert.ok(Math.abs(x - [0, 0.5, 1, 1.5, 2][i]!) < 1e-12, `k ${i}: ${x}`));
    assert.deepEqual(l.separators, []);
  });

  it('runs on different paths go side by side with a separator', () => {
    const a = { nk: 3, distance: Float64Array.from([0, 1, 2]), segments: [seg(0, 2, 'Γ', 'X')], ticks: [tick(0, 'Γ', 0), tick(2, 'X', 2)] };
    const b = { nk: 3, distance: Float64Array.from([0, 1, 3]), segments: [seg(0, 2, 'Γ', 'L')], ticks: [tick(0, 'Γ', 0), tick(3, 'L', 2)] };
    assert.equal(pathsMatch([a, b]), false);
    const l = layoutOverlay([a, b]);
    assert.equal(l.shared, false);
    assert.equal(l.separators.length, 1);
    // b starts after a (length 2) and a gap of 6 % of the longest run (3): 2.18.
    assert.ok(Math.abs(l.x[1]![0]! - 2.18) < 1e-12);
    assert.ok(l.separators[0]! > 2 && l.separators[0]! < 2.18);
    // A path with an unlabelled end cannot be shared.
    assert.equal(pathsMatch([a, { ...a, segments: [{ ...a.segments[0]!, endLabel: null }] }]), false);
  });

  it('sorts numbers as numbers, rows without a number last either way, ties by name', () => {
    const mass = (id: string, name: string, m: number | null): CompareRow => row(id, name, { values: m === null ? {} : { m } });
    const rows = [mass('r0', 'c', 10), mass('r1', 'a', 9), mass('r2', 'b', null), mass('r3', 'd', 9)];
    assert.deepEqual(
      sortRows(rows, { key: 'm', direction: 'ascending' }).map((r) => r.id),
      ['r1', 'r3', 'r0', 'r2'],
    );
    assert.deepEqual(
      sortRows(rows, { key: 'm', direction: 'descending' }).map((r) => r.id),
      ['r0', 'r1', 'r3', 'r2'],
    );
    assert.deepEqual(
      sortRows(rows, null).map((r) => r.name),
      ['a', 'b', 'c', 'd'],
    );
    assert.deepEqual(nextSort({ key: 'm', direction: 'ascending' }, 'm'), { key: 'm', direction: 'descending' });
  });
});

describe('compare view: sort kept across tables, cell texts', () => {
  it('a sort survives a new table while its column (or a text column, or typed values) is still there', () => {
    assert.deepEqual(keepSort({ key: 'gap', direction: 'descending' }, ['gap']), { key: 'gap', direction: 'descending' });
    assert.equal(keepSort({ key: 'cbm.m.1', direction: 'ascending' }, ['gap']), null);
    assert.deepEqual(keepSort({ key: 'name', direction: 'ascending' }, []), { key: 'name', direction: 'ascending' });
    assert.deepEqual(keepSort({ key: USER_KEY, direction: 'ascending' }, []), { key: USER_KEY, direction: 'ascending' });
    assert.equal(keepSort(null, ['gap']), null);
  });

  it('numbers with the column’s decimals and a true minus; "—" when missing', () => {
    assert.equal(formatValue(-0.5, 3), '−0.500');
    assert.equal(formatValue(null, 3), '—');
    assert.equal(formatValue(Number.NaN, 3), '—');
    assert.equal(formatValue(undefined, 2), '—');
    const cols: CompareColumn[] = [{ key: 'gap', label: 'Gap', unit: 'eV', group: 'edge', title: '', decimals: 4 }];
    assert.equal(columnTitle(cols, 'gap'), 'Gap (eV)');
    assert.equal(columnTitle(cols, USER_KEY), 'Your value');
    assert.equal(columnTitle(cols, 'volume'), 'volume');
  });

  it('gap type: unreadable, metal, semimetal, direct, indirect, unknown; spinors marked', () => {
    assert.equal(gapKindText(row('r0', 'a', { error: 'bad line' })), 'unreadable');
    assert.equal(gapKindText(row('r0', 'a', { metal: true })), 'metal');
    assert.equal(gapKindText(row('r0', 'a', { metal: true, semimetal: true })), 'semimetal');
    assert.equal(gapKindText(row('r0', 'a', { direct: true, spinors: true })), 'direct · spinors');
    assert.equal(gapKindText(row('r0', 'a')), 'indirect');
    assert.equal(gapKindText(row('r0', 'a', { direct: null })), '—');
  });

  it('the CBM cell: a moved valley is marked only against a reference of the same material', () => {
    const ref = row('r0', 'ref', { isReference: true, series: 'Si2', cbm: '0.85 Γ→X', cbmValley: 'c1' });
    const moved = cbmCell(row('r1', 'b', { series: 'Si2', cbm: '0.85 Γ→Z', cbmValley: 'c2' }), ref);
    assert.equal(moved.text, '0.85 Γ→Z [c2]');
    assert.equal(moved.moved, true);
    assert.match(moved.title ?? '', /valley c2 here, in valley c1 in the reference/);
    const other = cbmCell(row('g0', 'gaas', { series: 'As1 Ga1', cbm: 'Γ', cbmValley: 'c2' }), ref);
    assert.equal(other.moved, false);
    assert.match(other.title ?? '', /Another material \(As1 Ga1\) than the reference \(Si2\)/);
    assert.deepEqual(cbmCell(ref, ref), { text: '0.85 Γ→X [c1]', title: null, moved: false });
    assert.equal(cbmCell(row('r2', 'c'), ref).text, '—');
  });

  it('summary and typed values', () => {
    assert.equal(tableSummary([]), 'No runs found in the workspace.');
    assert.equal(tableSummary([row('r0', 'a')]), '1 run');
    assert.equal(
      tableSummary([row('r0', 'a', { error: 'x' }), row('r1', 'b', { annotations: 'stale' }), row('r2', 'c')]),
      '3 runs, 1 unreadable, 1 with stale annotations',
    );
    assert.equal(parseTypedValue(' −1,5 '), -1.5);
    assert.equal(parseTypedValue('2e-3'), 0.002);
    assert.equal(parseTypedValue('  '), null);
    assert.equal(parseTypedValue('abc'), 'invalid');
  });
});

describe('compare view: state kept across reloads', () => {
  it('reads a saved state, keeping defaults for what is missing or malformed', () => {
    assert.deepEqual(readSavedState(undefined), DEFAULT_STATE);
    assert.deepEqual(readSavedState('x'), DEFAULT_STATE);
    const s = readSavedState({
      user: { a: 1, b: 'two', c: Number.NaN },
      trendX: 'volume',
      trendY: 7,
      sort: { key: 'gap', direction: 'sideways' },
      more: 'yes',
    });
    assert.deepEqual(s, { user: { a: 1 }, trendX: 'volume', trendY: 'gap', sort: null, more: false });
    assert.deepEqual(readSavedState({ sort: { key: 'gap', direction: 'descending' }, more: true }).sort, {
      key: 'gap',
      direction: 'descending',
    });
    assert.equal(readSavedState({ more: true }).more, true);
    // The defaults are not shared with a state that is then changed.
    readSavedState(undefined).user.x = 1;
    assert.deepEqual(DEFAULT_STATE.user, {});
  });

  it('typed values are saved by run name: runs not in the table keep theirs, a cleared value is dropped', () => {
    const rows = [row('r0', 'run-a'), row('r1', 'run-b')];
    const saved = { elsewhere: 2, 'run-a': 5 };
    assert.deepEqual(userValuesByName(saved, rows, new Map([['r1', 3]])), { elsewhere: 2, 'run-b': 3 });
    assert.deepEqual(saved, { elsewhere: 2, 'run-a': 5 }, 'the saved record itself is not changed');
  });

  it('ticks and typed values follow their runs by name into a new table', () => {
    const before = [row('r0', 'A'), row('r1', 'B')];
    const after = [row('r0', 'B'), row('r1', 'A'), row('r2', 'C'), row('r3', 'D', { canOverlay: false })];
    const c = carryRows(before, after, ['r0', 'r1'], new Map([['r1', 7]]), { C: 4, D: 1 });
    assert.deepEqual(c.selected, ['r0', 'r1'], 'A and B ticked, now with each other’s ids');
    assert.deepEqual([...c.userValues].sort(), [
      ['r0', 7],
      ['r2', 4],
      ['r3', 1],
    ]);
    const d = carryRows(before, [row('r0', 'A', { canOverlay: false })], ['r0'], new Map(), {});
    assert.deepEqual(d.selected, [], 'a run that can no longer be drawn is unticked');
  });
});

describe('compare view: overlay thinning', () => {
  it('keeps every stride-th k-point of each piece and its last one (hand computation)', () => {
    const t = thinnedIndices(
      [
        { i0: 0, i1: 10 },
        { i0: 10, i1: 13 },
      ],
      4,
    );
    assert.deepEqual(Array.from(t.indices), [0, 4, 8, 9, 10, 12]);
    assert.deepEqual(t.pieces, [
      { i0: 0, i1: 4 },
      { i0: 4, i1: 6 },
    ]);
    assert.deepEqual(Array.from(thinnedIndices([{ i0: 0, i1: 3 }], 1).indices), [0, 1, 2]);
    // At most about two points per CSS pixel: 1000 k-points over 100 px → every 5th.
    assert.equal(strideFor(1000, 100), 5);
    assert.equal(strideFor(10, 100), 1);
    assert.equal(strideFor(10, 0), 5, 'a stretch under a pixel counts as one pixel');
  });

  it('leaves out bands that stay more than 0.5 eV outside the window, relative to the alignment energy', () => {
    assert.equal(E_LOW, -6);
    assert.equal(E_HIGH, 5);
    // 2 k-points × 4 bands, aligned at 10 eV: band 0 far below, band 1 reaches −6.4 (inside the margin),
    // band 2 spans the window, band 3 starts at +5.6 (outside).
    const e = Float64Array.from([-10, 3.6, 9, 15.6, -10, 3.9, 12, 16]);
    assert.deepEqual(bandsNearWindow(e, 2, 4, 1, 10), [1, 2]);
  });

  it('a decoded run is thinned with its layout x and the kept bands only; wrong sizes are refused', () => {
    const run: CompareBandRun = {
      rowId: 'r0',
      title: 'model',
      nk: 5,
      nBands: 2,
      nSpin: 1,
      distance: encodeArray(Float64Array.from([0, 1, 2, 3, 4])),
      energies: [encodeArray(Float64Array.from([-1, 20, -2, 21, -3, 22, -4, 23, -5, 24]))],
      ticks: [],
      segments: [],
      align_eV: 0,
      alignedAt: 'vbm',
      distanceUnits: 'inverse-angstrom',
    };
    const decoded = decodeBandRun(run);
    const [ch] = thinnedChannels(decoded, Float64Array.from([0, 0.5, 1, 1.5, 2]), 3);
    assert.deepEqual(Array.from(ch!.x), [0, 1.5, 2], 'k-points 0, 3 and the last, 4');
    assert.equal(ch!.nBands, 1, 'band 2 (20–24 eV) is outside the window');
    assert.deepEqual(Array.from(ch!.energies), [-1, -4, -5]);
    assert.throws(() => decodeBandRun({ ...run, nk: 6 }), /5 distances for 6 k-points/);
    assert.throws(() => decodeBandRun({ ...run, nBands: 3 }), /10 energies for 5 × 3/);
  });
});

describe('compare view: trend data', () => {
  const rows = [
    row('r0', 'a', { series: 'Si2', latticeType: 'cF', values: { v: 2, gap: 0.8 } }),
    row('r1', 'b', { series: 'Si2', latticeType: 'tI', values: { v: 1, gap: 0.7 } }),
    row('r2', 'c', { series: 'As1 Ga1', values: { v: 3, gap: 1.4 } }),
    row('r3', 'd', { values: { v: 4, gap: 1 } }),
    row('r4', 'e', { values: { v: 5 } }),
    row('r5', 'f', { error: 'unreadable', values: { v: 6, gap: 2 } }),
  ];

  it('one point per readable run with both values, by increasing x; series by material', () => {
    const pts = trendPoints(rows, 'v', 'gap', new Map());
    assert.deepEqual(
      pts.map((p) => p.row.id),
      ['r1', 'r0', 'r2', 'r3'],
    );
    const series = trendSeries(pts);
    assert.deepEqual(series, [
      { name: 'Si2', rowIds: ['r1', 'r0'] },
      { name: 'As1 Ga1', rowIds: ['r2'] },
    ]);
    assert.equal(seriesColour(series, 'As1 Ga1'), TREND_SERIES_COLOURS[1]);
    assert.equal(seriesColour(series, null), NO_SERIES_COLOUR);
    assert.equal(trendNoteText(pts.length, rows.length).startsWith('4 runs plotted; 2 without a value for both axes left out.'), true);
    // Typed values as x: only runs with one.
    const typed = trendPoints(
      rows,
      USER_KEY,
      'gap',
      new Map([
        ['r3', -1],
        ['r4', 2],
      ]),
    );
    assert.deepEqual(
      typed.map((p) => [p.row.id, p.x]),
      [['r3', -1]],
    );
  });

  it('axis domains get 6 % room each side; a single value ±5 % of itself, at least 1e-3 (hand computation)', () => {
    const [a, b] = paddedDomain(0, 10);
    assert.ok(Math.abs(a + 0.6) < 1e-12 && Math.abs(b - 10.6) < 1e-12, `${a} ${b}`);
    const [c, d] = paddedDomain(2, 2);
    assert.ok(Math.abs(c - 1.9) < 1e-12 && Math.abs(d - 2.1) < 1e-12, `${c} ${d}`);
    assert.deepEqual(paddedDomain(0, 0), [-1e-3, 1e-3]);
  });

  it('axis choices: y any non-structural column, x a descriptor or the typed value; unknown keys fall back', () => {
    const col = (key: string, group: CompareColumn['group']): CompareColumn => ({
      key,
      label: key.toUpperCase(),
      unit: '',
      group,
      title: '',
      decimals: 3,
    });
    const t: CompareTable = {
      reference: null,
      columns: [col('v', 'structure'), col('gap', 'edge'), col('m', 'mass')],
      descriptorKeys: ['v'],
      rows,
      events: [],
      cautions: [],
      annotationsAsRuns: false,
    };
    const axes = trendAxes(t, 'nothing', 'v');
    assert.equal(axes.x, 'v');
    assert.equal(axes.y, 'gap', 'a structural column is not a y quantity');
    assert.deepEqual(
      axes.yOptions.map((o) => o.value),
      ['gap', 'm'],
    );
    assert.deepEqual(axes.xOptions, [
      { value: 'v', label: 'V' },
      { value: USER_KEY, label: 'Your value (typed in the table)' },
    ]);
    assert.equal(trendAxes(t, USER_KEY, 'm').x, USER_KEY);
    assert.equal(trendAxes(t, USER_KEY, 'm').y, 'm');
  });
});
