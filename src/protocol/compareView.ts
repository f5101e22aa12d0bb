/**
 * Messages between the host and the compare view (webview/compareView). Own wire names (prefixed "compare")
 * and an own validator, so neither view can be sent the other's messages. View-to-host messages are valibot
 * schemas (type and validator written once); host-to-view messages are typed interfaces.
 */
import * as v from 'valibot';
import type { EncodedArray } from './arrays';
import type { BandData, EnvironmentData, PathSegmentData, PathTickData } from './bandViewData';
import { RequestIdSchema, guardOf, hasTypeIn, viewErrorSchema } from './limits';
import { compareViewNames } from './names';

/**
 * Host → compare view: Progress (runs found so far and how many are still being read); Table (one row per run,
 * the numeric columns, events and cautions); Bands (band data for the runs the view asked to overlay); Notice (a
 * sentence for the status line, e.g. a run that could not be opened).
 */
export const CompareHostToViewType = compareViewNames(['Progress', 'Table', 'Bands', 'Notice']);
export type CompareHostToViewType = (typeof CompareHostToViewType)[keyof typeof CompareHostToViewType];

/**
 * Compare view → host: Ready; Rescan (look for runs again and re-read them); SetReference (take differences
 * against this run); SetAnnotationsAsRuns (list annotations files as runs of their own, or only beside their data
 * runs); RequestBands (send band data of these runs, to overlay); OpenRun (its band view, or its file in an
 * editor); ViewError (for the host's log).
 */
export const CompareViewToHostType = compareViewNames([
  'Ready',
  'Rescan',
  'SetReference',
  'SetAnnotationsAsRuns',
  'RequestBands',
  'OpenRun',
  'ViewError',
]);
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

/** At most this many runs are overlaid at once. */
export const COMPARE_MAX_OVERLAY = 8;

// ---------------------------------------------------------------------------------------------------------
// View → host messages: schemas (type and validator at once)

/** A row of the table as the view names it ("r0", "r1", …). */
const RowIdSchema = v.pipe(v.string(), v.regex(/^r\d{1,6}$/));

export const CompareReadyMessageSchema = v.strictObject({ type: v.literal(CompareViewToHostType.Ready) });
export type CompareReadyMessage = v.InferOutput<typeof CompareReadyMessageSchema>;

export const CompareRescanMessageSchema = v.strictObject({ type: v.literal(CompareViewToHostType.Rescan) });
export type CompareRescanMessage = v.InferOutput<typeof CompareRescanMessageSchema>;

export const CompareSetReferenceMessageSchema = v.strictObject({ type: v.literal(CompareViewToHostType.SetReference), rowId: RowIdSchema });
export type CompareSetReferenceMessage = v.InferOutput<typeof CompareSetReferenceMessageSchema>;

export const CompareSetAnnotationsAsRunsMessageSchema = v.strictObject({
  type: v.literal(CompareViewToHostType.SetAnnotationsAsRuns),
  value: v.boolean(),
});
export type CompareSetAnnotationsAsRunsMessage = v.InferOutput<typeof CompareSetAnnotationsAsRunsMessageSchema>;

export const CompareRequestBandsMessageSchema = v.strictObject({
  type: v.literal(CompareViewToHostType.RequestBands),
  requestId: RequestIdSchema,
  rowIds: v.pipe(v.array(RowIdSchema), v.maxLength(COMPARE_MAX_OVERLAY)),
});
export type CompareRequestBandsMessage = v.InferOutput<typeof CompareRequestBandsMessageSchema>;

export const CompareOpenRunMessageSchema = v.strictObject({
  type: v.literal(CompareViewToHostType.OpenRun),
  rowId: RowIdSchema,
  target: v.picklist(['bandView', 'file']),
});
export type CompareOpenRunMessage = v.InferOutput<typeof CompareOpenRunMessageSchema>;

export const CompareViewErrorMessageSchema = viewErrorSchema(CompareViewToHostType.ViewError);
export type CompareViewErrorMessage = v.InferOutput<typeof CompareViewErrorMessageSchema>;

export const CompareViewToHostMessageSchema = v.variant('type', [
  CompareReadyMessageSchema,
  CompareRescanMessageSchema,
  CompareSetReferenceMessageSchema,
  CompareSetAnnotationsAsRunsMessageSchema,
  CompareRequestBandsMessageSchema,
  CompareOpenRunMessageSchema,
  CompareViewErrorMessageSchema,
]);
/** Any message the compare view may send (the union of the schemas above). */
export type CompareViewToHostMessage = v.InferOutput<typeof CompareViewToHostMessageSchema>;

/** True when `x` is a well-formed message from the compare view (known type, known fields, bounded values). */
export const isCompareViewToHostMessage = guardOf(CompareViewToHostMessageSchema);

/** The view side's check on what the host sends. */
export const isCompareHostToViewMessage = hasTypeIn(CompareHostToViewType) as (x: unknown) => x is CompareHostToViewMessage;
