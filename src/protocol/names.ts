/**
 * Message type names, built from their keys so the naming rule (./index.ts) holds by construction: the band
 * view's wire name is the key with its first letter in lower case (RequestFit → 'requestFit'), the compare
 * view's is the key after 'compare' (RequestBands → 'compareRequestBands').
 */

type BandViewNames<K extends string> = { readonly [P in K]: Uncapitalize<P> };
type CompareViewNames<K extends string> = { readonly [P in K]: `compare${P}` };

function build<K extends string>(keys: readonly K[], wire: (key: K) => string): Readonly<Record<K, string>> {
  const out = {} as Record<K, string>;
  for (const k of keys) out[k] = wire(k);
  return Object.freeze(out);
}

/** The band view's type names: `{ RequestFit: 'requestFit', … }`. */
export function bandViewNames<const K extends string>(keys: readonly K[]): BandViewNames<K> {
  return build(keys, (k) => k.charAt(0).toLowerCase() + k.slice(1)) as BandViewNames<K>;
}

/** The compare view's type names: `{ RequestBands: 'compareRequestBands', … }`. */
export function compareViewNames<const K extends string>(keys: readonly K[]): CompareViewNames<K> {
  return build(keys, (k) => `compare${k}`) as CompareViewNames<K>;
}
