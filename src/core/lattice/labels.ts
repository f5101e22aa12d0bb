/** High-symmetry point labels as people type them, normalised for display. */

const GREEK: Record<string, string> = {
  gamma: 'Γ',
  g: 'Γ',
  gm: 'Γ',
  gam: 'Γ',
  γ: 'Γ',
  delta: 'Δ',
  lambda: 'Λ',
  sigma: 'Σ',
  sigma_1: 'Σ₁',
  sigma1: 'Σ₁',
};

/**
 * Normalise a label: GAMMA, G, \Gamma, $\Gamma$, Γ all become Γ; other Greek names likewise; subscripts
 * written _1 become ₁; anything else is kept as written (trimmed).
 */
export function normaliseLabel(raw: string): string {
  let s = raw
    .trim()
    .replace(/^\$+|\$+$/g, '')
    .replace(/^\\(mathrm|rm)\{(.*)\}$/, '$2')
    .trim();
  s = s.replace(/^\\/, '');
  const lower = s.toLowerCase();
  if (lower in GREEK) return GREEK[lower]!;
  const m = /^([A-Za-z]+)_?\{?([0-9])\}?$/.exec(s);
  if (m && m[1]!.length <= 2) {
    const base = GREEK[m[1]!.toLowerCase()] && m[1]!.length > 1 ? GREEK[m[1]!.toLowerCase()]! : m[1]!;
    return base + String.fromCharCode(0x2080 + Number(m[2]));
  }
  return s;
}
