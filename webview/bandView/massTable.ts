/**
 * The table of directional masses at the fitted extremum: one row per direction (and branch, at a degenerate
 * edge), the signed curvature mass, the hole mass as a positive number, the uncertainty and the points used.
 * A mass the fit could not determine shows the word "undetermined", with what the fit gave in its tooltip.
 */
import type { MassFit } from '../../src/protocol';
import { el } from '../shared/controls';
import { sig } from '../shared/format';

const HEAD_TITLES: Record<string, string> = {
  pts: 'Points used by the fit',
  branch: 'At a degenerate edge each branch is followed by smooth continuation; branch 1 lies nearest the gap.',
  '±': 'One standard error of the fit; for finite differences (no residual) the spread against the parabola at the same window, marked "spread".',
};

export class MassTable {
  /** The scrolling box around the table. */
  readonly root = el('div', 'vs-masses-scroll');
  private readonly table = el('table', 'vs-masses');
  private readonly head = el('thead');
  private readonly body = el('tbody');
  /** Whether the table shown has a branch column (a degenerate edge). */
  withBranch = false;

  constructor() {
    this.table.append(el('caption', undefined, 'Directional masses (mₑ)'), this.head, this.body);
    this.root.append(this.table);
  }

  show(masses: readonly MassFit[]): void {
    this.withBranch = masses.some((f) => f.branch !== undefined);
    const heads = ['towards', ...(this.withBranch ? ['branch'] : []), 'm* (signed)', 'hole mass', '±', 'pts'];
    const hr = el('tr');
    for (const h of heads) {
      const th = el('th', undefined, h);
      th.dataset.col = h;
      const title = HEAD_TITLES[h];
      if (title) th.title = title;
      hr.append(th);
    }
    this.head.replaceChildren(hr);
    this.table.classList.toggle('vs-with-branch', this.withBranch);
    this.body.replaceChildren(...masses.map((f) => this.row(f)));
    if (masses.length === 0) {
      const tr = el('tr');
      const td = el('td', 'vs-muted', 'No direction could be fitted here (see the notes below).');
      td.colSpan = heads.length;
      tr.append(td);
      this.body.append(tr);
    }
  }

  private row(f: MassFit): HTMLTableRowElement {
    const tr = el('tr');
    tr.dataset.towards = f.towards;
    if (f.branch !== undefined) tr.dataset.branch = String(f.branch);
    const lead = [
      el('td', undefined, f.towards),
      ...(this.withBranch ? [el('td', 'vs-num vs-branch', f.branch === undefined ? '—' : String(f.branch))] : []),
    ];
    const points = el('td', 'vs-num', String(f.points));
    if (f.determined === false) {
      // Not quotable: the word instead of the number; what the fit gave and why it is not quoted in the tooltip.
      tr.classList.add('vs-undetermined');
      tr.dataset.determined = 'false';
      tr.append(...lead, el('td', 'vs-num', 'undetermined'), el('td', 'vs-num', '—'), uncertaintyCell(f), points);
      tr.title = `The fit gave ${sig(f.mass, 3)} ± ${sig(f.stderr, 2)} mₑ, not quoted: ${f.undeterminedReason ?? 'undetermined'}.`;
      return tr;
    }
    const hole = f.mass < 0 ? sig(-f.mass, 3) : '—';
    tr.append(...lead, el('td', 'vs-num', sig(f.mass, 3)), el('td', 'vs-num', hole), uncertaintyCell(f), points);
    if (f.alpha_per_eV !== undefined) tr.title = `non-parabolicity α = ${sig(f.alpha_per_eV, 3)} eV⁻¹`;
    return tr;
  }
}

/**
 * The uncertainty cell: the fit's standard error; for a finite difference (no residual, stderr from rounding
 * only) the spread against the parabola at the same window, marked "spread" so it is not read as a stderr.
 */
function uncertaintyCell(f: MassFit): HTMLTableCellElement {
  const td = el('td', 'vs-num');
  const sp = f.methodSpread;
  if (!sp) {
    td.textContent = sig(f.stderr, 2);
    return td;
  }
  td.classList.add('vs-spread');
  td.append(el('span', 'vs-spread-value', sig(sp.spread, 2)), ' ', el('span', 'vs-spread-tag', 'spread'));
  td.title =
    `Method spread: the ${sp.against} fit at the same window setting (${sig(sp.window_meV, 3)} meV) gives ${sig(sp.mass, 3)} mₑ; ` +
    `this is how far the two disagree. The ${f.method} stencil's own standard error (rounding of the energies only) is ${sig(f.stderr, 2)} mₑ.`;
  return td;
}
