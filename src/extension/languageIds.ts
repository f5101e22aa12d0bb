/**
 * The language ids the extension contributes for eigenvalue layouts (see package.json contributes.languages),
 * and which one a reader's format id maps to. Pure.
 */

export const LANGUAGE_IDS = ['vasp-eigenval', 'vasp-vasprun', 'qe-xml', 'qe-bands', 'wannier90-band', 'bxsf', 'castep-bands'] as const;
export type LanguageId = (typeof LANGUAGE_IDS)[number];

export function isEigenvalueLanguage(id: string): id is LanguageId {
  return (LANGUAGE_IDS as readonly string[]).includes(id);
}

/** The language for a reader's format id (e.g. 'vasp-eigenval'), by the words in the id. */
export function languageForFormat(formatId: string): LanguageId | null {
  const f = formatId.toLowerCase();
  if (f.includes('eigenval')) return 'vasp-eigenval';
  if (f.includes('vasprun')) return 'vasp-vasprun';
  if ((f.includes('qe') || f.includes('espresso')) && f.includes('xml')) return 'qe-xml';
  if ((f.includes('qe') || f.includes('espresso')) && f.includes('band')) return 'qe-bands';
  if (f.includes('wannier')) return 'wannier90-band';
  if (f.includes('bxsf')) return 'bxsf';
  if (f.includes('castep')) return 'castep-bands';
  return null;
}

/** Languages a file of ours may have been opened as before content detection (ambiguous names). */
export const GENERIC_LANGUAGES = ['plaintext', 'xml', 'log', 'properties', 'ini'];
