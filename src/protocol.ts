/**
 * Messages between the extension host and the band view (webview). Both sides import this file; it has no
 * `vscode` and no DOM imports, so it also runs in unit tests.
 *
 * Band data travels as compact typed arrays (an ArrayBuffer, a typed array, or base64 text: see
 * EncodedArray), never as JSON arrays of numbers. Every message from the webview is checked with
 * `isViewToHostMessage` before the host uses it (the webview is treated as untrusted input).
 *
 * Index conventions: `kIndex` and `band0` are 0-based indices into the band arrays; the Report's BandPoint.band
 * is 1-based (band0 = band − 1). Energies are in eV, path distances in the units named by `distanceUnits`.
 */
import type { ExtremumKind, ExtremumReport, MassFit, RejectReason, Report, Vec3 } from './core/model';

// ---------------------------------------------------------------------------------------------------------
// Message type names

export const HostToViewType = {
  /** The band structure to draw (sent after `ready`, and again when the file changes). */
  BandData: 'bandData',
  /** The answer to a requestFit. */
  FitResult: 'fitResult',
  /** The answer to a requestWindowScan. */
  WindowScanResult: 'windowScanResult',
  /** A request (fit, scan) that failed; `requestId` says which. */
  RequestFailed: 'requestFailed',
  /** The outcome of a save. */
  SaveResult: 'saveResult',
  /** The outcome of an export. */
  ExportResult: 'exportResult',
  /** The host asks the view for the plot (command "Export plot"); the view answers with `export`. */
  ExportRequest: 'exportRequest',
  /** The host asks the view to send a `save` with what it has (command "Save annotations"). */
  SaveRequest: 'saveRequest',
  /** Theme or trust changed while the view is open. */
  Environment: 'environment',
  /** The file is being (re)loaded; the view may show a busy state. */
  Loading: 'loading',
  /** Loading failed: the sentence to show in place of the plot. */
  LoadFailed: 'loadFailed',
  /** The review statuses and notes of the annotations file beside the run (after data, and after a save). */
  Reviews: 'reviews',
} as const;
export type HostToViewType = (typeof HostToViewType)[keyof typeof HostToViewType];

export const ViewToHostType = {
  /** The view has loaded its script and listens. */
  Ready: 'ready',
  RequestFit: 'requestFit',
  RequestWindowScan: 'requestWindowScan',
  Save: 'save',
  Export: 'export',
  /** Show the source file in an editor (optionally at the line of a k-point). */
  OpenFile: 'openFile',
  /** An error inside the view, for the host's log. */
  ViewError: 'viewError',
} as const;
export type ViewToHostType = (typeof ViewToHostType)[keyof typeof ViewToHostType];

// ---------------------------------------------------------------------------------------------------------
// Compact arrays

export type ArrayDType = 'f64' | 'f32';

/**
 * A numeric array in transit. `data` is an ArrayBuffer (VS Code transfers those efficiently), a typed array
 * of the given dtype, or base64 text of the little-endian bytes (for channels that only carry JSON).
 */
export interface EncodedArray {
  dtype: ArrayDType;
  length: number;
  data: ArrayBuffer | Float64Array | Float32Array | string;
}

/** Encode as an ArrayBuffer (a copy, so the caller's array stays usable). */
export function encodeArray(
  values: Float64Array | Float32Array,
  dtype: ArrayDType = values instanceof Float32Array ? 'f32' : 'f64',
): EncodedArray {
  const out = dtype === 'f32' ? Float32Array.from(values) : Float64Array.from(values);
  return { dtype, length: out.length, data: out.buffer };
}

/** Encode as base64 text (for JSON-only channels and tests). */
export function encodeArrayBase64(values: Float64Array | Float32Array, dtype: ArrayDType = 'f64'): EncodedArray {
  const out = dtype === 'f32' ? Float32Array.from(values) : Float64Array.from(values);
  return { dtype, length: out.length, data: bytesToBase64(new Uint8Array(out.buffer)) };
}

/** Decode to a typed array of the encoded dtype. Throws on a length that does not match the bytes. */
export function decodeArray(a: EncodedArray): Float64Array | Float32Array {
  const width = a.dtype === 'f32' ? 4 : 8;
  let bytes: Uint8Array;
  if (typeof a.data === 'string') bytes = base64ToBytes(a.data);
  else if (a.data instanceof ArrayBuffer) bytes = new Uint8Array(a.data);
  else if (ArrayBuffer.isView(a.data)) bytes = new Uint8Array(a.data.buffer, a.data.byteOffset, a.data.byteLength);
  else throw new Error('encoded array: data is neither an ArrayBuffer, a typed array nor base64 text');
  if (bytes.byteLength !== a.length * width) {
    throw new Error(`encoded array: ${bytes.byteLength} bytes do not hold ${a.length} values of ${a.dtype}`);
  }
  // Copy into an aligned buffer (a view into a larger buffer may sit at an unaligned offset).
  const aligned = new Uint8Array(bytes.byteLength);
  aligned.set(bytes);
  return a.dtype === 'f32' ? new Float32Array(aligned.buffer) : new Float64Array(aligned.buffer);
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';

export function bytesToBase64(bytes: Uint8Array): string {
  let out = '';
  let i = 0;
  for (; i + 2 < bytes.length; i += 3) {
    const n = (bytes[i]! << 16) | (bytes[i + 1]! << 8) | bytes[i + 2]!;
    out += B64[(n >> 18) & 63]! + B64[(n >> 12) & 63]! + B64[(n >> 6) & 63]! + B64[n & 63]!;
  }
  const rest = bytes.length - i;
  if (rest === 1) {
    const n = bytes[i]! << 16;
    out += B64[(n >> 18) & 63]! + B64[(n >> 12) & 63]! + '==';
  } else if (rest === 2) {
    const n = (bytes[i]! << 16) | (bytes[i + 1]! << 8);
    out += B64[(n >> 18) & 63]! + B64[(n >> 12) & 63]! + B64[(n >> 6) & 63]! + '=';
  }
  return out;
}

export function base64ToBytes(text: string): Uint8Array {
  const clean = text.replace(/[\s=]+/g, '');
  if (/[^A-Za-z0-9+/]/.test(clean)) throw new Error('encoded array: not base64 text');
  const out = new Uint8Array(Math.floor((clean.length * 3) / 4));
  let o = 0;
  let acc = 0;
  let bits = 0;
  for (let i = 0; i < clean.length; i++) {
    acc = (acc << 6) | B64.indexOf(clean[i]!);
    bits += 6;
    if (bits >= 8) {
      bits -= 8;
      out[o++] = (acc >> bits) & 255;
    }
  }
  return out.subarray(0, o);
}

// ---------------------------------------------------------------------------------------------------------
// Host → view payloads

export type ThemeKind = 'light' | 'dark' | 'highContrast' | 'highContrastLight';
export type EnergyReference = 'vbm' | 'fermi' | 'raw';

export interface PathTickData {
  /** Path distance of the tick. */
  distance: number;
  /** Label, Γ spelled 'Γ'; labels meeting at one point are joined as 'K|U'. */
  label: string;
  kIndex: number;
}

export interface PathSegmentData {
  /** First and last k index (inclusive). */
  start: number;
  end: number;
  startLabel: string | null;
  endLabel: string | null;
  /** True when this segment is not connected to the previous one (draw a break). */
  afterJump: boolean;
}

/** An extremum from the Report, located on the arrays so the view can mark it and snap to it. */
export interface ExtremumMark {
  kind: ExtremumKind;
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  eV: number;
  label: string | null;
  /** Index into `report.extrema` of the extremum this mark comes from. */
  reportIndex: number;
}

/**
 * A candidate the analysis set aside (a saddle, a crossing, a path end, rounding), located on the arrays:
 * the view does not offer it as an extremum to fit.
 */
export interface SetAsideMark {
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  reason: RejectReason;
  detail: string;
}

/** Fit settings the view starts from (the user's settings). */
export interface FitDefaults {
  window_meV: number;
  method: string;
  /** Fit methods the host accepts. */
  methods: string[];
  energyReference: EnergyReference;
  range_eV: number;
}

export interface BandData {
  /** A name for the title (file name, not a path to trust). */
  title: string;
  format: string;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  /** Path distance per k-point (nk values). */
  distance: EncodedArray;
  distanceUnits: 'inverse-angstrom' | 'fractional' | 'written';
  /** Fractional reciprocal coordinates, nk × 3. */
  kpoints: EncodedArray;
  /** Cartesian k in Å⁻¹ (nk × 3), or null when the lattice is unknown. */
  cartesian: EncodedArray | null;
  /** One array per spin channel, layout [k * nBands + band0], eV (raw, as in the file). */
  energies: EncodedArray[];
  ticks: PathTickData[];
  segments: PathSegmentData[];
  fermiEnergy: number | null;
  /** Energies of the edges, eV, raw; null for a metal or when edges are unknown. */
  vbm_eV: number | null;
  cbm_eV: number | null;
  report: Report;
  marks: ExtremumMark[];
  /** Candidates the analysis set aside (absent from hosts that predate them). */
  setAside?: SetAsideMark[];
  defaults: FitDefaults;
  /** The file ended early (a running job): results are provisional. */
  partial: boolean;
}

export interface EnvironmentData {
  theme: ThemeKind;
  /** Restricted (untrusted) workspace or a read-only file system: no saving. */
  readOnly: boolean;
  /** The sentence explaining why saving is off, when readOnly. */
  readOnlyReason: string | null;
}

/** Fitted curve samples to draw over the data, one per direction of the fit. */
export interface FitCurve {
  /** Same wording as MassFit.towards. */
  towards: string;
  /** Path distances of the samples (same units as BandData.distance). */
  distance: number[];
  /** Energies of the samples, eV raw. */
  energy: number[];
}

/** Mass as a function of the fit window, for one direction. */
export interface WindowScanSeries {
  towards: string;
  points: { window_meV: number; mass: number; stderr: number; points: number }[];
}

export interface FitTarget {
  spin: 0 | 1;
  kIndex: number;
  band0: number;
  /**
   * The view names this point as an extremum (a maximum or a minimum): the host fits exactly there and never
   * moves to another. Absent: the host fits the nearest local extremum of the band.
   */
  maximum?: boolean;
}

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
export interface ExportRequestMessage {
  type: typeof HostToViewType.ExportRequest;
  format: ExportFormat;
}
export interface SaveRequestMessage {
  type: typeof HostToViewType.SaveRequest;
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
  | ExportRequestMessage
  | SaveRequestMessage
  | EnvironmentMessage
  | LoadingMessage
  | LoadFailedMessage;

// ---------------------------------------------------------------------------------------------------------
// View → host messages

export type ExportFormat = 'svg' | 'png';

export interface ReadyMessage {
  type: typeof ViewToHostType.Ready;
}
export interface RequestFitMessage extends FitTarget {
  type: typeof ViewToHostType.RequestFit;
  requestId: number;
  window_meV: number;
  method: string;
  /** Also run a window scan and return it with the fit. */
  withScan?: boolean;
}
export interface RequestWindowScanMessage extends FitTarget {
  type: typeof ViewToHostType.RequestWindowScan;
  requestId: number;
  method: string;
  /** Windows to scan, meV; the host uses its own default list when absent. */
  windows_meV?: number[];
}
/**
 * What to keep in the annotations file: references to extrema and the fit choices. The host recomputes every
 * number with the core, so the file holds exactly what `valleyscope analyze` would print.
 */
export interface SaveEntry extends FitTarget {
  window_meV: number;
  method: string;
  note?: string;
}
export interface SaveMessage {
  type: typeof ViewToHostType.Save;
  entries: SaveEntry[];
  /** A free-text note for the whole run. */
  notes?: string;
}
export interface ExportMessage {
  type: typeof ViewToHostType.Export;
  format: ExportFormat;
  /** SVG text, or PNG bytes (ArrayBuffer / Uint8Array, or base64 text without a data: prefix). */
  data: string | ArrayBuffer | Uint8Array;
  /** Size of the image in pixels (PNG) or user units (SVG). */
  width: number;
  height: number;
}
export interface OpenFileMessage {
  type: typeof ViewToHostType.OpenFile;
  /** Reveal the line of this k-point when given. */
  kIndex?: number;
}
export interface ViewErrorMessage {
  type: typeof ViewToHostType.ViewError;
  message: string;
}

export type ViewToHostMessage =
  ReadyMessage | RequestFitMessage | RequestWindowScanMessage | SaveMessage | ExportMessage | OpenFileMessage | ViewErrorMessage;

// ---------------------------------------------------------------------------------------------------------
// Validation of what the view sends (issue: every message from the webview is validated before use)

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

type Obj = Record<string, unknown>;

function isObj(x: unknown): x is Obj {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}
function isIndex(x: unknown): x is number {
  return typeof x === 'number' && Number.isInteger(x) && x >= 0 && x <= MESSAGE_LIMITS.maxIndex;
}
function isRequestId(x: unknown): x is number {
  return typeof x === 'number' && Number.isInteger(x) && x >= 0 && x <= Number.MAX_SAFE_INTEGER;
}
function isWindow(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x >= MESSAGE_LIMITS.minWindow_meV && x <= MESSAGE_LIMITS.maxWindow_meV;
}
function isMethod(x: unknown): x is string {
  return typeof x === 'string' && x.length > 0 && x.length <= MESSAGE_LIMITS.maxMethodChars && /^[a-z0-9_-]+$/.test(x);
}
function isNote(x: unknown): x is string {
  return typeof x === 'string' && x.length <= MESSAGE_LIMITS.maxNoteChars;
}
function isSpin(x: unknown): x is 0 | 1 {
  return x === 0 || x === 1;
}
function isFitTarget(m: Obj): boolean {
  return isSpin(m.spin) && isIndex(m.kIndex) && isIndex(m.band0) && (m.maximum === undefined || typeof m.maximum === 'boolean');
}
function onlyKeys(m: Obj, allowed: readonly string[]): boolean {
  for (const k of Object.keys(m)) if (!allowed.includes(k)) return false;
  return true;
}
function isPixels(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x > 0 && x <= MESSAGE_LIMITS.maxExportPixels;
}
function isExportData(format: unknown, x: unknown): boolean {
  if (format === 'svg') return typeof x === 'string' && x.length <= MESSAGE_LIMITS.maxExportBytes;
  if (format !== 'png') return false;
  if (typeof x === 'string') return x.length <= MESSAGE_LIMITS.maxExportBytes * 1.4 && /^[A-Za-z0-9+/=\s]*$/.test(x);
  if (x instanceof ArrayBuffer) return x.byteLength <= MESSAGE_LIMITS.maxExportBytes;
  if (x instanceof Uint8Array) return x.byteLength <= MESSAGE_LIMITS.maxExportBytes;
  return false;
}

/**
 * True when `x` is a well-formed message from the view: known type, only known fields, every field of the
 * right type and within bounds. Anything else is dropped by the host.
 */
export function isViewToHostMessage(x: unknown): x is ViewToHostMessage {
  if (!isObj(x) || typeof x.type !== 'string') return false;
  const m = x;
  switch (m.type) {
    case ViewToHostType.Ready:
      return onlyKeys(m, ['type']);
    case ViewToHostType.RequestFit:
      return (
        onlyKeys(m, ['type', 'requestId', 'spin', 'kIndex', 'band0', 'maximum', 'window_meV', 'method', 'withScan']) &&
        isRequestId(m.requestId) &&
        isFitTarget(m) &&
        isWindow(m.window_meV) &&
        isMethod(m.method) &&
        (m.withScan === undefined || typeof m.withScan === 'boolean')
      );
    case ViewToHostType.RequestWindowScan:
      return (
        onlyKeys(m, ['type', 'requestId', 'spin', 'kIndex', 'band0', 'maximum', 'method', 'windows_meV']) &&
        isRequestId(m.requestId) &&
        isFitTarget(m) &&
        isMethod(m.method) &&
        (m.windows_meV === undefined ||
          (Array.isArray(m.windows_meV) &&
            m.windows_meV.length > 0 &&
            m.windows_meV.length <= MESSAGE_LIMITS.maxScanWindows &&
            m.windows_meV.every(isWindow)))
      );
    case ViewToHostType.Save:
      return (
        onlyKeys(m, ['type', 'entries', 'notes']) &&
        Array.isArray(m.entries) &&
        m.entries.length <= MESSAGE_LIMITS.maxEntries &&
        m.entries.every(
          (e) =>
            isObj(e) &&
            onlyKeys(e, ['spin', 'kIndex', 'band0', 'maximum', 'window_meV', 'method', 'note']) &&
            isFitTarget(e) &&
            isWindow(e.window_meV) &&
            isMethod(e.method) &&
            (e.note === undefined || isNote(e.note)),
        ) &&
        (m.notes === undefined || isNote(m.notes))
      );
    case ViewToHostType.Export:
      return (
        onlyKeys(m, ['type', 'format', 'data', 'width', 'height']) &&
        (m.format === 'svg' || m.format === 'png') &&
        isExportData(m.format, m.data) &&
        isPixels(m.width) &&
        isPixels(m.height)
      );
    case ViewToHostType.OpenFile:
      return onlyKeys(m, ['type', 'kIndex']) && (m.kIndex === undefined || isIndex(m.kIndex));
    case ViewToHostType.ViewError:
      return onlyKeys(m, ['type', 'message']) && typeof m.message === 'string' && m.message.length <= MESSAGE_LIMITS.maxErrorChars;
    default:
      return false;
  }
}

/** A type-guard for the view side: the host is trusted, but a check on `type` keeps the switch honest. */
export function isHostToViewMessage(x: unknown): x is HostToViewMessage {
  if (!isObj(x) || typeof x.type !== 'string') return false;
  return (Object.values(HostToViewType) as string[]).includes(x.type);
}

/** Re-exported so both sides can name what a fit returns without reaching into the core. */
export type { ExtremumReport, MassFit, Report, Vec3 };

// ---------------------------------------------------------------------------------------------------------
// Compare view: messages between the host and the compare view (webview/compareView). Own type names
// (prefixed "compare") and an own validator, so neither view can be sent the other's messages.

export const CompareHostToViewType = {
  /** Runs found so far and how many are still being read. */
  Progress: 'compareProgress',
  /** The table: one row per run, the numeric columns, events and cautions. */
  Table: 'compareTable',
  /** Band data for the runs the view asked to overlay. */
  Bands: 'compareBands',
  /** A sentence for the status line (e.g. a run that could not be opened). */
  Notice: 'compareNotice',
} as const;
export type CompareHostToViewType = (typeof CompareHostToViewType)[keyof typeof CompareHostToViewType];

export const CompareViewToHostType = {
  Ready: 'compareReady',
  /** Look for runs again and re-read them. */
  Rescan: 'compareRescan',
  /** Take differences against this run. */
  SetReference: 'compareSetReference',
  /** List annotations files as runs of their own (true) or only beside their data runs (false). */
  SetAnnotationsAsRuns: 'compareSetAnnotationsAsRuns',
  /** Send band data of these runs (overlay). */
  RequestBands: 'compareRequestBands',
  /** Open a run: its band view, or its file in an editor. */
  OpenRun: 'compareOpenRun',
  ViewError: 'compareViewError',
} as const;
export type CompareViewToHostType = (typeof CompareViewToHostType)[keyof typeof CompareViewToHostType];

/** A numeric column of the compare table (also a y quantity of the trend plot). */
export interface CompareColumn {
  key: string;
  /** Header text. */
  label: string;
  /** Unit shown after the header, '' when none. */
  unit: string;
  /** What the column is about, for grouping and the trend plot's choices. */
  group: 'edge' | 'mass' | 'valley' | 'structure';
  /** Longer explanation (tooltip). */
  title: string;
  /** Decimals to show. */
  decimals: number;
  /** Shown only behind "More columns" (the compact default set: gap, edges, N_v, DOS and conductivity masses). */
  more?: boolean;
}

export interface CompareRow {
  /** Stable within one table ("r0", "r1", …). */
  id: string;
  /** Workspace-relative path of the run's file (data file, or annotations file). */
  name: string;
  origin: 'data' | 'annotations';
  isReference: boolean;
  /** An annotations file exists beside the data file (data rows) or is this row (annotations rows). */
  annotations: 'none' | 'current' | 'stale';
  staleReasons: string[];
  /** The run could not be read or analysed: the sentence why (all numbers null). */
  error: string | null;
  metal: boolean | null;
  /** A metal whose overlap is between distinct bands (electron and hole pockets); null when unknown. */
  semimetal?: boolean | null;
  /** Noncollinear (spin-orbit) run: one electron per band. */
  spinors?: boolean;
  direct: boolean | null;
  /** Where the edges are (label or fractional k as text). */
  vbm: string | null;
  cbm: string | null;
  /** Valley id (see `valleys`) of the CBM and VBM, for spotting an edge that moved. */
  cbmValley: string | null;
  vbmValley: string | null;
  /** Column key → value (null when the run has no such number). */
  values: Record<string, number | null>;
  /** Band data can be drawn for this run (a readable data file). */
  canOverlay: boolean;
  /** The material (composition of the cell, "Si2"), null when the run gives no structure: trend lines join only runs of one series. */
  series?: string | null;
  /** Bravais class of the run's crystal ("cF", "tI"), when known. */
  latticeType?: string | null;
}

export interface CompareTable {
  reference: string | null;
  columns: CompareColumn[];
  /** Column keys usable as the trend plot's x axis (structural descriptors). */
  descriptorKeys: string[];
  rows: CompareRow[];
  /** What changed relative to the reference, one sentence each, with the row it is about. */
  events: { rowId: string; kind: string; message: string }[];
  /** Cautions shown beside the numbers. */
  cautions: string[];
  annotationsAsRuns: boolean;
}

export interface CompareBandRun {
  rowId: string;
  title: string;
  nk: number;
  nBands: number;
  nSpin: 1 | 2;
  distance: EncodedArray;
  energies: EncodedArray[];
  ticks: PathTickData[];
  segments: PathSegmentData[];
  /** The energy the run is aligned at (its VBM; its Fermi level when no gap is known), eV raw. */
  align_eV: number | null;
  alignedAt: 'vbm' | 'fermi' | 'none';
  distanceUnits: BandData['distanceUnits'];
}

export interface CompareProgressMessage {
  type: typeof CompareHostToViewType.Progress;
  found: number;
  done: number;
  message: string;
}
export interface CompareTableMessage {
  type: typeof CompareHostToViewType.Table;
  table: CompareTable;
  environment: EnvironmentData;
}
export interface CompareBandsMessage {
  type: typeof CompareHostToViewType.Bands;
  requestId: number;
  runs: CompareBandRun[];
  /** Rows asked for that could not be drawn, with the reason. */
  missing: { rowId: string; reason: string }[];
}
export interface CompareNoticeMessage {
  type: typeof CompareHostToViewType.Notice;
  message: string;
}
export type CompareHostToViewMessage = CompareProgressMessage | CompareTableMessage | CompareBandsMessage | CompareNoticeMessage;

export interface CompareReadyMessage {
  type: typeof CompareViewToHostType.Ready;
}
export interface CompareRescanMessage {
  type: typeof CompareViewToHostType.Rescan;
}
export interface CompareSetReferenceMessage {
  type: typeof CompareViewToHostType.SetReference;
  rowId: string;
}
export interface CompareSetAnnotationsAsRunsMessage {
  type: typeof CompareViewToHostType.SetAnnotationsAsRuns;
  value: boolean;
}
export interface CompareRequestBandsMessage {
  type: typeof CompareViewToHostType.RequestBands;
  requestId: number;
  rowIds: string[];
}
export interface CompareOpenRunMessage {
  type: typeof CompareViewToHostType.OpenRun;
  rowId: string;
  target: 'bandView' | 'file';
}
export interface CompareViewErrorMessage {
  type: typeof CompareViewToHostType.ViewError;
  message: string;
}
export type CompareViewToHostMessage =
  | CompareReadyMessage
  | CompareRescanMessage
  | CompareSetReferenceMessage
  | CompareSetAnnotationsAsRunsMessage
  | CompareRequestBandsMessage
  | CompareOpenRunMessage
  | CompareViewErrorMessage;

/** At most this many runs are overlaid at once. */
export const COMPARE_MAX_OVERLAY = 8;

function isRowId(x: unknown): x is string {
  return typeof x === 'string' && /^r\d{1,6}$/.test(x);
}

/** True when `x` is a well-formed message from the compare view (known type, known fields, bounded values). */
export function isCompareViewToHostMessage(x: unknown): x is CompareViewToHostMessage {
  if (!isObj(x) || typeof x.type !== 'string') return false;
  const m = x;
  switch (m.type) {
    case CompareViewToHostType.Ready:
    case CompareViewToHostType.Rescan:
      return onlyKeys(m, ['type']);
    case CompareViewToHostType.SetReference:
      return onlyKeys(m, ['type', 'rowId']) && isRowId(m.rowId);
    case CompareViewToHostType.SetAnnotationsAsRuns:
      return onlyKeys(m, ['type', 'value']) && typeof m.value === 'boolean';
    case CompareViewToHostType.RequestBands:
      return (
        onlyKeys(m, ['type', 'requestId', 'rowIds']) &&
        isRequestId(m.requestId) &&
        Array.isArray(m.rowIds) &&
        m.rowIds.length <= COMPARE_MAX_OVERLAY &&
        m.rowIds.every(isRowId)
      );
    case CompareViewToHostType.OpenRun:
      return onlyKeys(m, ['type', 'rowId', 'target']) && isRowId(m.rowId) && (m.target === 'bandView' || m.target === 'file');
    case CompareViewToHostType.ViewError:
      return onlyKeys(m, ['type', 'message']) && typeof m.message === 'string' && m.message.length <= MESSAGE_LIMITS.maxErrorChars;
    default:
      return false;
  }
}

/** The view side's check on what the host sends. */
export function isCompareHostToViewMessage(x: unknown): x is CompareHostToViewMessage {
  if (!isObj(x) || typeof x.type !== 'string') return false;
  return (Object.values(CompareHostToViewType) as string[]).includes(x.type);
}
