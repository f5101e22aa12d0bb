/**
 * The compare table: a header of sort buttons (aria-sort on the sorted column), one row per run with its
 * overlay tick, name (opens the band view or the file), annotations state, gap type, edges, the numeric
 * columns shown and a field for a typed value. Rows in the order of tableSort.ts.
 */
import type { CompareColumn, CompareRow, CompareTable } from '../../src/protocol';
import { el } from '../shared/controls';
import { sortRows, type SortState } from './tableSort';
import { cbmCell, formatValue, gapKindText, gapKindTitle, parseTypedValue, USER_KEY } from './tableText';
import type { VsCheckbox } from './pageSkeleton';

export type OpenTarget = 'bandView' | 'file';

/** What the table shows. */
export interface TableInput {
  table: CompareTable;
  sort: SortState | null;
  showMore: boolean;
  selected: readonly string[];
  userValues: ReadonlyMap<string, number>;
}

/** What the table's controls ask for. */
export interface TableActions {
  sortBy(key: string): void;
  toggle(rowId: string, on: boolean): void;
  open(row: CompareRow, target: OpenTarget): void;
  /** A typed value (null: cleared), or the text when it is not a number. */
  typed(row: CompareRow, value: number | null | { invalid: string }): void;
}

/** Where a run opens by default: its band view when it has band data, else its file. */
export const defaultTarget = (r: CompareRow): OpenTarget => (r.canOverlay ? 'bandView' : 'file');

function headerCell(
  key: string,
  label: string,
  unit: string,
  title: string,
  sort: SortState | null,
  act: TableActions,
): HTMLTableCellElement {
  const th = el('th');
  th.scope = 'col';
  th.dataset.key = key;
  const b = el('button', 'cv-sort');
  b.type = 'button';
  b.title = `${title} Click to sort.`;
  b.append(el('span', 'cv-sort-mark', label));
  if (unit) b.append(el('span', 'cv-unit', unit));
  b.addEventListener('click', () => act.sortBy(key));
  if (sort?.key === key) th.setAttribute('aria-sort', sort.direction);
  th.append(b);
  return th;
}

function headerRow(shown: readonly CompareColumn[], sort: SortState | null, act: TableActions): HTMLTableRowElement {
  const hr = el('tr');
  const sel = el('th', undefined, 'Overlay');
  sel.scope = 'col';
  const cell = (key: string, label: string, unit: string, title: string): HTMLTableCellElement =>
    headerCell(key, label, unit, title, sort, act);
  hr.append(
    sel,
    cell('name', 'Run', '', 'Path of the run’s file in the workspace.'),
    cell('annotations', 'Annotations', '', 'Saved annotations beside the run: current, stale (its data changed since), or none.'),
    cell('type', 'Gap type', '', 'Direct or indirect gap, or metal.'),
    cell('vbm', 'VBM at', '', 'Where the valence band maximum is (label or fractional k).'),
    cell('cbm', 'CBM at', '', 'Where the conduction band minimum is, and in which matched valley.'),
  );
  for (const c of shown) hr.append(cell(c.key, c.label, c.unit, c.title));
  hr.append(
    cell(
      USER_KEY,
      'Your value',
      'typed',
      'A number you type per run (e.g. a setting of the calculation), usable as the trend plot’s horizontal axis.',
    ),
  );
  return hr;
}

function nameCell(r: CompareRow, act: TableActions): HTMLTableCellElement {
  const td = el('td', 'cv-run');
  const open = el('button', 'cv-open', r.name);
  open.type = 'button';
  open.title = r.canOverlay ? 'Open the band view of this run' : 'Open this file';
  open.addEventListener('click', () => act.open(r, defaultTarget(r)));
  const file = el('button', 'cv-file', 'file');
  file.type = 'button';
  file.title = `Open ${r.name} in an editor`;
  file.setAttribute('aria-label', `Open the file ${r.name}`);
  file.addEventListener('click', () => act.open(r, 'file'));
  td.append(open, file);
  if (r.isReference) td.append(el('span', 'cv-tag', 'reference'));
  if (r.origin === 'annotations') td.append(el('span', 'cv-tag', 'saved numbers'));
  if (r.error) td.title = r.error;
  return td;
}

function annotationsCell(r: CompareRow): HTMLTableCellElement {
  const td = el('td');
  if (r.annotations === 'stale') {
    const s = el('span', 'cv-stale', 'stale');
    s.title = r.staleReasons.join('\n') || 'The annotations no longer match their data files.';
    td.append(s);
  } else td.append(el('span', 'cv-current', r.annotations === 'current' ? 'saved' : '—'));
  return td;
}

function typedCell(r: CompareRow, value: number | undefined, act: TableActions): HTMLTableCellElement {
  const td = el('td');
  const input = el('input', 'cv-user');
  input.type = 'text';
  input.inputMode = 'decimal';
  input.setAttribute('aria-label', `Your value for ${r.name}`);
  input.value = value === undefined ? '' : String(value);
  input.addEventListener('change', () => {
    const v = parseTypedValue(input.value);
    act.typed(r, v === 'invalid' ? { invalid: input.value } : v);
  });
  td.append(input);
  return td;
}

function rowElement(
  r: CompareRow,
  ref: CompareRow | undefined,
  columns: readonly CompareColumn[],
  input: TableInput,
  act: TableActions,
): HTMLTableRowElement {
  const tr = el('tr');
  tr.dataset.id = r.id;
  tr.dataset.name = r.name;
  const ticked = input.selected.includes(r.id);
  if (r.isReference) tr.classList.add('cv-reference');
  if (r.error) tr.classList.add('cv-failed');
  if (ticked) tr.classList.add('cv-selected');
  const tdSel = el('td');
  const box = el('input', 'cv-select');
  box.type = 'checkbox';
  box.checked = ticked;
  box.disabled = !r.canOverlay;
  box.setAttribute('aria-label', r.canOverlay ? `Overlay the bands of ${r.name}` : `${r.name} has no data file to draw`);
  box.addEventListener('change', () => act.toggle(r.id, box.checked));
  tdSel.append(box);
  const tdType = el('td', undefined, gapKindText(r));
  const typeTitle = gapKindTitle(r);
  if (typeTitle) tdType.title = typeTitle;
  const cbm = cbmCell(r, ref);
  const tdCbm = el('td', undefined, cbm.text);
  if (cbm.title) tdCbm.title = cbm.title;
  if (cbm.moved) tdCbm.classList.add('cv-moved');
  tr.append(tdSel, nameCell(r, act), annotationsCell(r), tdType, el('td', undefined, r.vbm ?? '—'), tdCbm);
  for (const c of columns) {
    const td = el('td', 'cv-num', formatValue(r.values[c.key], c.decimals));
    td.dataset.key = c.key;
    tr.append(td);
  }
  tr.append(typedCell(r, input.userValues.get(r.id), act));
  tr.addEventListener('dblclick', (ev) => {
    if (ev.target instanceof Element && ev.target.closest('input,button')) return;
    act.open(r, defaultTarget(r));
  });
  return tr;
}

/** Renders the table into `tableEl`; sets the "More columns" box's label and visibility. */
export function renderTable(tableEl: HTMLTableElement, moreBox: VsCheckbox, input: TableInput, act: TableActions): void {
  const t = input.table;
  const shown = t.columns.filter((c) => input.showMore || !c.more);
  const hidden = t.columns.length - shown.length;
  moreBox.setAttribute('label', input.showMore ? 'More columns' : `More columns (${hidden} more)`);
  moreBox.hidden = t.columns.every((c) => !c.more);
  const thead = el('thead');
  thead.append(headerRow(shown, input.sort, act));
  const tbody = el('tbody');
  const ref = t.rows.find((x) => x.isReference);
  for (const r of sortRows(t.rows, input.sort, input.userValues)) tbody.append(rowElement(r, ref, shown, input, act));
  tableEl.replaceChildren(thead, tbody);
}

/** Marks the ticked rows without rebuilding the table. */
export function markSelected(tableEl: HTMLTableElement, selected: readonly string[]): void {
  for (const tr of Array.from(tableEl.querySelectorAll<HTMLElement>('tbody tr')))
    tr.classList.toggle('cv-selected', selected.includes(tr.dataset.id ?? ''));
}

/** Row names in the order shown. */
export function visibleRowNames(tableEl: HTMLTableElement): string[] {
  return Array.from(tableEl.querySelectorAll<HTMLElement>('tbody tr'), (tr) => tr.dataset.name ?? '');
}
