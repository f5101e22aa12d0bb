/**
 * Bounds on what a webview may send, and the small schemas every view-to-host message is built from. A webview
 * is untrusted input: every field is checked for type and range before the host uses it.
 */
import * as v from 'valibot';

/** Limits on what the view may send: bounded sizes so a misbehaving view cannot make the host do much. */
export const MESSAGE_LIMITS = {
  maxIndex: 100_000_000,
  minWindow_meV: 0.1,
  maxWindow_meV: 5000,
  maxScanWindows: 200,
  maxEntries: 1000,
  maxNoteChars: 20_000,
  maxMethodChars: 32,
  maxExportBytes: 64 * 1024 * 1024,
  maxExportPixels: 20_000,
  maxErrorChars: 4000,
} as const;

/** A 0-based index into the band arrays (k-point or band). */
export const IndexSchema = v.pipe(v.number(), v.integer(), v.minValue(0), v.maxValue(MESSAGE_LIMITS.maxIndex));
/** The id a request carries and its answer repeats. */
export const RequestIdSchema = v.pipe(v.number(), v.safeInteger(), v.minValue(0));
/** A fit window, meV. */
export const WindowSchema = v.pipe(
  v.number(),
  v.finite(),
  v.minValue(MESSAGE_LIMITS.minWindow_meV),
  v.maxValue(MESSAGE_LIMITS.maxWindow_meV),
);
/** A fit method id (checked against the host's list where it is used). */
export const MethodSchema = v.pipe(v.string(), v.minLength(1), v.maxLength(MESSAGE_LIMITS.maxMethodChars), v.regex(/^[a-z0-9_-]+$/));
export const NoteSchema = v.pipe(v.string(), v.maxLength(MESSAGE_LIMITS.maxNoteChars));
export const SpinSchema = v.picklist([0, 1]);
/** The text of an error a view reports for the host's log. */
export const ErrorTextSchema = v.pipe(v.string(), v.maxLength(MESSAGE_LIMITS.maxErrorChars));

/** The schema of an error inside a view, sent for the host's log, under that view's type name. */
export function viewErrorSchema<const T extends string>(type: T) {
  return v.strictObject({ type: v.literal(type), message: ErrorTextSchema });
}

/**
 * The type guard of a schema: true when `x` passes every check of it. The narrowed type keeps what was known
 * of `x` before (a `Record<string, unknown>` stays indexable), so callers can read any field after the check.
 */
export function guardOf<S extends v.GenericSchema>(schema: S): <T>(x: T) => x is T & v.InferOutput<S> {
  return <T>(x: T): x is T & v.InferOutput<S> => v.is(schema, x);
}

/** A check that a host-to-view message names one of the given types (the host is trusted; the view checks the tag). */
export function hasTypeIn(types: Record<string, string>): (x: unknown) => boolean {
  const known = new Set(Object.values(types));
  return (x) => typeof x === 'object' && x !== null && !Array.isArray(x) && known.has((x as { type?: unknown }).type as string);
}
