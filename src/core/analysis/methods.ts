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

/** One line per method, for pickers and provenance (what the method assumes, in a sentence). */
export const METHOD_DESCRIPTIONS: Readonly<Record<string, string>> = {
  [PARABOLA]: 'Least-squares parabola over the points in the window, vertex free.',
  [CENTRAL_2]: '3-point central difference at the sampled point (error O(h²)), checked at step 2h.',
  [CENTRAL_4]: '5-point central difference at the sampled point (error O(h⁴)), checked at step 2h.',
  [POLY4]: 'Least-squares quartic over the window: the curvature with cubic and quartic terms separated.',
  [KANE]: 'Kane dispersion ε(1 + αε) = ħ²k²/2m*: mass and non-parabolicity α fitted together.',
  'forward-1': 'One-sided 3-point difference (the line stops at the extremum): first order in the step.',
  'forward-3': 'One-sided 5-point difference (the line stops at the extremum).',
};

/** The description of a method id or alias, or null when unknown. */
export function methodDescription(name: string): string | null {
  const id = methodId(name) ?? name;
  return Object.prototype.hasOwnProperty.call(METHOD_DESCRIPTIONS, id) ? METHOD_DESCRIPTIONS[id]! : null;
}
