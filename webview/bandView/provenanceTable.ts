/**
 * How the masses were measured, as the side panel shows it: each method used with its description, then a
 * small table with one row per fitted direction (and branch): method, window used, points, standard error,
 * residual; the spread against the parabola for finite differences and Kane α only when present.
 */
import type { MassFit } from '../../src/protocol';
import { methodDescription } from '../../src/core/analysis/methods';
import { el } from '../shared/controls';
import { sig } from '../shared/format';

/** Direction with its branch, as provenance rows name it. */
function directionName(f: MassFit): string {
  return f.branch === undefined ? f.towards : `${f.towards} (branch ${f.branch})`;
}

/** Provenance as a small table: one row per fitted direction (and branch); the Kane α column only for Kane fits. */
export function provenanceParts(masses: MassFit[], method: string, window_meV: number, withBranch: boolean): HTMLElement[] {
  const usedMethods = [...new Set(masses.map((f) => f.method))];
  const list = usedMethods.length ? usedMethods : [method];
  const methodLines = list.map((m) => {
    const p = el('p', 'vs-method-line');
    p.append(el('strong', undefined, m), `: ${methodDescription(m) ?? 'no description'}`);
    return p;
  });
  if (masses.length === 0) return [...methodLines, el('p', 'vs-muted', `window ${sig(window_meV, 3)} meV asked; nothing fitted.`)];
  const withAlpha = masses.some((f) => f.alpha_per_eV !== undefined);
  const withSpread = masses.some((f) => f.methodSpread !== undefined);
  const heads = [
    withBranch ? 'direction (branch)' : 'direction',
    'method',
    'window (meV)',
    'points',
    'stderr (mₑ)',
    'residual (meV)',
    ...(withSpread ? ['spread vs parabola (mₑ)'] : []),
    ...(withAlpha ? ['Kane α (eV⁻¹)'] : []),
  ];
  const table = el('table', 'vs-provenance-table');
  const thead = el('thead');
  const hr = el('tr');
  table.setAttribute('role', 'table');
  hr.setAttribute('role', 'row');
  for (const h of heads) {
    const th = el('th', undefined, h);
    th.setAttribute('role', 'columnheader');
    hr.append(th);
  }
  thead.append(hr);
  const tbody = el('tbody');
  for (const f of masses) {
    const tr = el('tr');
    tr.dataset.towards = f.towards;
    const cells = [
      el('td', 'vs-prov-direction', directionName(f)),
      el('td', undefined, f.method),
      el('td', 'vs-num', sig(f.window_meV, 3)),
      el('td', 'vs-num', String(f.points)),
      el('td', 'vs-num', sig(f.stderr, 2)),
      el('td', 'vs-num', f.residual_meV === undefined ? '—' : sig(f.residual_meV, 2)),
    ];
    if (withSpread) cells.push(el('td', 'vs-num', f.methodSpread ? sig(f.methodSpread.spread, 2) : '—'));
    if (withAlpha) {
      const td = el('td', 'vs-num vs-alpha', f.alpha_per_eV === undefined ? '—' : sig(f.alpha_per_eV, 3));
      cells.push(td);
    }
    // Each cell carries its column head: the side panel shows the row as label–value pairs (styles.ts).
    cells.forEach((td, i) => {
      td.dataset.label = heads[i]!;
      td.setAttribute('role', 'cell');
    });
    tr.setAttribute('role', 'row');
    tr.append(...cells);
    tbody.append(tr);
  }
  table.append(thead, tbody);
  const wrap = el('div', 'vs-provenance-scroll');
  wrap.append(table);
  const asked = el(
    'p',
    'vs-muted',
    `Window asked: ${String(window_meV)} meV; the window column gives what each fit used (it grows where too few points lie inside).`,
  );
  const parts: HTMLElement[] = [...methodLines, wrap, asked];
  if (withSpread)
    parts.push(
      el(
        'p',
        'vs-muted',
        'A finite difference passes through its points: it has no residual, and its stderr is the rounding of the energies only. The spread against the parabola fit at the same window is the uncertainty to quote.',
      ),
    );
  return parts;
}
