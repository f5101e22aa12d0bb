/**
 * Names of the curvature-fit methods users can choose. The finite differences are named by their order of
 * accuracy: 'central-2' (3 points, error O(h²)) and 'central-4' (5 points, error O(h⁴)).
 */
export const PARABOLA = 'parabola';
export const CENTRAL_2 = 'central-2';
export const CENTRAL_4 = 'central-4';
export const POLY4 = 'poly4';
export const KANE = 'kane';

export const FIT_METHODS = [PARABOLA, CENTRAL_2, CENTRAL_4, POLY4, KANE];

/** Earlier names still accepted on input (command line, settings, annotations files). */
export const METHOD_ALIASES: Readonly<Record<string, string>> = { fd3: CENTRAL_2, fd5: CENTRAL_4 };

/** The current id of a method name (an alias is translated), or null when the name is unknown. */
export function methodId(name: string): string | null {
  if (FIT_METHODS.includes(name)) return name;
  return Object.prototype.hasOwnProperty.call(METHOD_ALIASES, name) ? METHOD_ALIASES[name]! : null;
}
