/**
 * The fit's warnings, each once: sentences that differ only in their numbers (the window each direction grew
 * to) are merged, with the range of those numbers and the directions (and branches) they apply to. Pure.
 */
import type { MassFit } from '../../src/protocol';

/** Numbers inside a warning sentence (window sizes, point counts). */
const NUMBER = /\d+(?:\.\d+)?/g;

/** Sentences with the numbers taken out: warnings that differ only in their numbers share this. */
function skeleton(text: string): string {
  return text.replace(NUMBER, '#').replace(/\bpoints\b/g, 'point');
}

/** One sentence for a group of the same skeleton: a number that differs is shown as its range (47–83). */
function mergeNumbers(texts: readonly string[]): string {
  const first = texts[0]!;
  if (texts.length === 1) return first;
  const numbers = texts.map((t) => t.match(NUMBER) ?? []);
  let i = 0;
  return first
    .replace(NUMBER, (m) => {
      const at = i++;
      const vals = numbers.map((n) => n[at] ?? m);
      const nums = vals.map(Number);
      const lo = Math.min(...nums);
      const hi = Math.max(...nums);
      if (lo === hi) return m;
      return `${vals[nums.indexOf(lo)]}–${vals[nums.indexOf(hi)]}`;
    })
    .replace(/(\d–[\d.]+) point\b/g, '$1 points');
}

/** "X (branches 1, 2), K (branch 2)": the directions, each with its branches. */
function whereText(who: readonly MassFit[]): string {
  const byDir = new Map<string, number[]>();
  for (const f of who) {
    const list = byDir.get(f.towards) ?? [];
    if (!byDir.has(f.towards)) byDir.set(f.towards, list);
    if (f.branch !== undefined && !list.includes(f.branch)) list.push(f.branch);
  }
  return [...byDir].map(([dir, br]) => (br.length === 0 ? dir : `${dir} (branch${br.length > 1 ? 'es' : ''} ${br.join(', ')})`)).join(', ');
}

/**
 * Each warning once: sentences that differ only in their numbers (the window each direction grew to) are
 * listed once, with the range of those numbers and the directions (and branches) they apply to.
 */
export function dedupedWarnings(general: readonly string[], masses: readonly MassFit[]): string[] {
  const order: string[] = [];
  const groups = new Map<string, { texts: string[]; who: MassFit[] }>();
  const add = (text: string, who: MassFit | null): void => {
    const key = skeleton(text);
    let g = groups.get(key);
    if (!g) {
      g = { texts: [], who: [] };
      groups.set(key, g);
      order.push(key);
    }
    if (!g.texts.includes(text)) g.texts.push(text);
    if (who && !g.who.includes(who)) g.who.push(who);
  };
  for (const w of general) add(w, null);
  for (const f of masses) for (const w of f.warnings ?? []) add(w, f);
  return order.map((key) => {
    const g = groups.get(key)!;
    const text = mergeNumbers(g.texts);
    return g.who.length === 0 ? text : `${text} [towards ${whereText(g.who)}]`;
  });
}
