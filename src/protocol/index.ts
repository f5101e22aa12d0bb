/**
 * Messages between the extension host and the webviews (band view, compare view). Both sides import this
 * folder; it has no `vscode` and no DOM imports, so it also runs in unit tests.
 *
 * - ./arrays.ts       numeric arrays in transit (ArrayBuffer, typed array or base64 text)
 * - ./names.ts        message type names, built from their keys by the naming rule below
 * - ./limits.ts       bounds on what a view may send, and the small schemas messages are built from
 * - ./bandViewData.ts what the host sends the band view to draw (band data, marks, environment)
 * - ./bandView.ts     the band view's messages, both directions
 * - ./compareView.ts  the compare view's messages and table, both directions
 *
 * Every message from a webview is checked (`isViewToHostMessage`, `isCompareViewToHostMessage`: valibot
 * schemas, strict: known type, only known fields, bounded values) before the host uses it.
 *
 * Naming rule, both directions: a message that asks the other side to do something and answer is named
 * `request<Thing>` on the wire (`RequestThing` as a key of the type constants: requestFit, requestWindowScan,
 * requestSave, requestExport, compareRequestBands); its answer is `<thing>Result` (fitResult, windowScanResult,
 * saveResult, exportResult) or carries the thing itself (compareBands), and repeats the request's `requestId`
 * when the request has one; a request that fails is answered `requestFailed`. Messages that only tell (ready,
 * loading, environment, viewError) are named for what they tell. The compare view prefixes every wire name with
 * `compare`, so the two views' validators never accept each other's messages.
 */
export * from './arrays';
export * from './limits';
export * from './bandViewData';
export * from './bandView';
export * from './compareView';

/** Re-exported so both sides can name what a fit returns without reaching into the core. */
export type { ExtremumReport, MassFit, Report, Vec3 } from '../core/model';
