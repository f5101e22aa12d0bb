/**
 * Messages between the extension host and the band view (webview/bandView). Host-to-view messages are typed
 * interfaces (the host is trusted; the view checks the tag). View-to-host messages are valibot schemas: each
 * is written once and gives both its TypeScript type and the validator the host runs on everything it receives.
 */
import * as v from 'valibot';
import type { ExtremumReport } from '../core/model';
import type { FitCurve } from '../core/analysis/fitCurves';
import type { BandData, EnvironmentData, WindowScanSeries } from './bandViewData';
import { bandViewNames } from './names';
import {
  IndexSchema,
  MESSAGE_LIMITS,
  MethodSchema,
  NoteSchema,
  RequestIdSchema,
  SpinSchema,
  WindowSchema,
  guardOf,
  hasTypeIn,
  viewErrorSchema,
} from './limits';

// ---------------------------------------------------------------------------------------------------------
// Message type names (the naming rule is at the top of ./index.ts)

/**
 * Host → view: BandData (the band structure to draw, after `ready` and again when the file changes); FitResult
 * and WindowScanResult (the answers to requestFit and requestWindowScan); RequestFailed (a request that failed,
 * `requestId` says which); SaveResult, ExportResult (outcomes); RequestExport (command "Export plot": the view
 * answers with `export`); RequestSave (command "Save annotations": the view sends a `save` with what it has);
 * Environment (theme or trust changed); Loading (the file is being (re)loaded); LoadFailed (the sentence to show
 * in place of the plot); Reviews (the review statuses and notes of the annotations file beside the run).
 */
export const HostToViewType = {
  ...bandViewNames([
    'BandData',
    'FitResult',
    'WindowScanResult',
    'RequestFailed',
    'SaveResult',
    'ExportResult',
    'RequestExport',
    'RequestSave',
    'Environment',
    'Loading',
    'LoadFailed',
    'Reviews',
  ]),
  /** @deprecated old key of RequestExport (same message). */
  ExportRequest: 'requestExport',
  /** @deprecated old key of RequestSave (same message). */
  SaveRequest: 'requestSave',
} as const;
export type HostToViewType = (typeof HostToViewType)[keyof typeof HostToViewType];

/**
 * View → host: Ready (the view has loaded its script and listens); RequestFit, RequestWindowScan; Save; Export;
 * OpenFile (show the source file, optionally at the line of a k-point); ViewError (for the host's log).
 */
export const ViewToHostType = bandViewNames(['Ready', 'RequestFit', 'RequestWindowScan', 'Save', 'Export', 'OpenFile', 'ViewError']);
export type ViewToHostType = (typeof ViewToHostType)[keyof typeof ViewToHostType];

export type ExportFormat = 'svg' | 'png';

// ---------------------------------------------------------------------------------------------------------
// View → host messages: schemas (type and validator at once)

/** Which point of which band a fit is about. */
const fitTargetEntries = {
  spin: SpinSchema,
  kIndex: IndexSchema,
  band0: IndexSchema,
  /**
   * The view names this point as an extremum (a maximum or a minimum): the host fits exactly there and never
   * moves to another. Absent: the host fits the nearest local extremum of the band.
   */
  maximum: v.optional(v.boolean()),
};
export const FitTargetSchema = v.strictObject(fitTargetEntries);
export type FitTarget = v.InferOutput<typeof FitTargetSchema>;

export const ReadyMessageSchema = v.strictObject({ type: v.literal(ViewToHostType.Ready) });
export type ReadyMessage = v.InferOutput<typeof ReadyMessageSchema>;

/** What every fit request carries: its id (repeated by the answer), the point, the method. */
const fitRequestEntries = { requestId: RequestIdSchema, ...fitTargetEntries, method: MethodSchema };

export const RequestFitMessageSchema = v.strictObject({
  type: v.literal(ViewToHostType.RequestFit),
  ...fitRequestEntries,
  window_meV: WindowSchema,
  /** Also run a window scan and return it with the fit. */
  withScan: v.optional(v.boolean()),
});
export type RequestFitMessage = v.InferOutput<typeof RequestFitMessageSchema>;

export const RequestWindowScanMessageSchema = v.strictObject({
  type: v.literal(ViewToHostType.RequestWindowScan),
  ...fitRequestEntries,
  /** Windows to scan, meV; the host uses its own default list when absent. */
  windows_meV: v.optional(v.pipe(v.array(WindowSchema), v.minLength(1), v.maxLength(MESSAGE_LIMITS.maxScanWindows))),
});
export type RequestWindowScanMessage = v.InferOutput<typeof RequestWindowScanMessageSchema>;

/**
 * What to keep in the annotations file: references to extrema and the fit choices. The host recomputes every
 * number with the core, so the file holds exactly what `valleyscope analyze` would print.
 */
export const SaveEntrySchema = v.strictObject({
  ...fitTargetEntries,
  window_meV: WindowSchema,
  method: MethodSchema,
  note: v.optional(NoteSchema),
});
export type SaveEntry = v.InferOutput<typeof SaveEntrySchema>;

export const SaveMessageSchema = v.strictObject({
  type: v.literal(ViewToHostType.Save),
  entries: v.pipe(v.array(SaveEntrySchema), v.maxLength(MESSAGE_LIMITS.maxEntries)),
  /** A free-text note for the whole run. */
  notes: v.optional(NoteSchema),
});
export type SaveMessage = v.InferOutput<typeof SaveMessageSchema>;

/** SVG text; PNG bytes as an ArrayBuffer, a Uint8Array, or base64 text without a data: prefix. */
function isExportData(format: ExportFormat, x: string | ArrayBuffer | Uint8Array): boolean {
  if (format === 'svg') return typeof x === 'string' && x.length <= MESSAGE_LIMITS.maxExportBytes;
  if (typeof x === 'string') return x.length <= MESSAGE_LIMITS.maxExportBytes * 1.4 && /^[A-Za-z0-9+/=\s]*$/.test(x);
  return x.byteLength <= MESSAGE_LIMITS.maxExportBytes;
}
const PixelsSchema = v.pipe(v.number(), v.finite(), v.gtValue(0), v.maxValue(MESSAGE_LIMITS.maxExportPixels));

export const ExportMessageSchema = v.pipe(
  v.strictObject({
    type: v.literal(ViewToHostType.Export),
    format: v.picklist(['svg', 'png']),
    data: v.union([v.string(), v.instance(ArrayBuffer), v.custom<Uint8Array>((x) => x instanceof Uint8Array)]),
    /** Size of the image in pixels (PNG) or user units (SVG). */
    width: PixelsSchema,
    height: PixelsSchema,
  }),
  v.check((m) => isExportData(m.format, m.data)),
);
export type ExportMessage = v.InferOutput<typeof ExportMessageSchema>;

export const OpenFileMessageSchema = v.strictObject({
  type: v.literal(ViewToHostType.OpenFile),
  /** Reveal the line of this k-point when given. */
  kIndex: v.optional(IndexSchema),
});
export type OpenFileMessage = v.InferOutput<typeof OpenFileMessageSchema>;

export const ViewErrorMessageSchema = viewErrorSchema(ViewToHostType.ViewError);
export type ViewErrorMessage = v.InferOutput<typeof ViewErrorMessageSchema>;

export const ViewToHostMessageSchema = v.variant('type', [
  ReadyMessageSchema,
  RequestFitMessageSchema,
  RequestWindowScanMessageSchema,
  SaveMessageSchema,
  ExportMessageSchema,
  OpenFileMessageSchema,
  ViewErrorMessageSchema,
]);
/** Any message the band view may send (the union of the schemas above). */
export type ViewToHostMessage = v.InferOutput<typeof ViewToHostMessageSchema>;

/**
 * True when `x` is a well-formed message from the view: known type, only known fields, every field of the
 * right type and within bounds. Anything else is dropped by the host.
 */
export const isViewToHostMessage = guardOf(ViewToHostMessageSchema);

// ---------------------------------------------------------------------------------------------------------
// Host → view messages
export interface BandDataMessage {
  type: typeof HostToViewType.BandData;
  data: BandData;
  environment: EnvironmentData;
}
export interface FitResultMessage {
  type: typeof HostToViewType.FitResult;
  requestId: number;
  target: FitTarget;
  /** The extremum as the core fitted it (1-based band inside, like the Report). */
  extremum: ExtremumReport;
  curves: FitCurve[];
  /** Present when the engine ran a window scan along with the fit. */
  scan: WindowScanSeries[] | null;
}
export interface WindowScanResultMessage {
  type: typeof HostToViewType.WindowScanResult;
  requestId: number;
  target: FitTarget;
  scan: WindowScanSeries[];
}
export interface RequestFailedMessage {
  type: typeof HostToViewType.RequestFailed;
  requestId: number;
  message: string;
}
export interface SaveResultMessage {
  type: typeof HostToViewType.SaveResult;
  ok: boolean;
  /** Where it was written (workspace-relative when possible), or the sentence saying why not. */
  message: string;
}
export interface ExportResultMessage {
  type: typeof HostToViewType.ExportResult;
  ok: boolean;
  message: string;
}
export interface RequestExportMessage {
  type: typeof HostToViewType.RequestExport;
  format: ExportFormat;
}
export interface RequestSaveMessage {
  type: typeof HostToViewType.RequestSave;
}
export interface EnvironmentMessage {
  type: typeof HostToViewType.Environment;
  environment: EnvironmentData;
}
export interface LoadingMessage {
  type: typeof HostToViewType.Loading;
  title: string;
}
export interface LoadFailedMessage {
  type: typeof HostToViewType.LoadFailed;
  message: string;
}

/** A reviewed entry of the annotations file, placed on the run's arrays (one per k-point where it sits). */
export interface ReviewMark {
  /** The entry's id in the annotations file (kind, spin, band from the edge, valley). */
  id: string;
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  /** 'unreviewed', 'accepted', 'questioned', 'rejected' or the reviewer's own word. */
  status: string;
  note: string;
  /** False when the latest analysis no longer finds this extremum (kept in the file as not found). */
  found: boolean;
}
export interface ReviewsMessage {
  type: typeof HostToViewType.Reviews;
  /** Name of the annotations file (for the panel), or null when there is none beside the run. */
  file: string | null;
  reviews: ReviewMark[];
  /** Why the file could not be read (refused by the path policy, bad JSON), or null. */
  problem: string | null;
}

export type HostToViewMessage =
  | ReviewsMessage
  | BandDataMessage
  | FitResultMessage
  | WindowScanResultMessage
  | RequestFailedMessage
  | SaveResultMessage
  | ExportResultMessage
  | RequestExportMessage
  | RequestSaveMessage
  | EnvironmentMessage
  | LoadingMessage
  | LoadFailedMessage;

/** @deprecated old name of RequestExportMessage. */
export type ExportRequestMessage = RequestExportMessage;
/** @deprecated old name of RequestSaveMessage. */
export type SaveRequestMessage = RequestSaveMessage;

/** A type-guard for the view side: the host is trusted, but a check on `type` keeps the switch honest. */
export const isHostToViewMessage = hasTypeIn(HostToViewType) as (x: unknown) => x is HostToViewMessage;
