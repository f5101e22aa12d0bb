/**
 * Fits asked of the host and their answers: the request for a selected extremum (named as a maximum or a
 * minimum, so the host fits exactly there), the answer shown in the side panel and kept for saving, a late
 * answer to an older request left alone, the window scan and a failed request reported.
 */
import {
  ViewToHostType,
  type FitResultMessage,
  type FitTarget,
  type RequestFailedMessage,
  type ViewToHostMessage,
  type WindowScanResultMessage,
  type WindowScanSeries,
} from '../../src/protocol';
import { LatestRequest } from '../shared/requests';
import type { ReferenceChoice } from './energyReference';
import type { FitPanel } from './fitPanel';
import type { ShownFit } from './plotOverlay';
import { fitDoneText } from './pointText';
import type { ReviewNote } from './reviewNote';
import type { ViewChoices } from './viewChoices';

/** A point to fit: a candidate (with its sign, +1 maximum, −1 minimum) or a stored fit (with `maximum`). */
export type FitPoint = FitTarget & { sign?: number };

/** The target sent for a point: a candidate is an extremum by name (maximum or minimum), never another. */
export function fitTargetOf(c: FitPoint): FitTarget {
  const maximum = typeof c.sign === 'number' && c.sign !== 0 ? c.sign > 0 : c.maximum;
  return { spin: c.spin, kIndex: c.kIndex, band0: c.band0, ...(typeof maximum === 'boolean' ? { maximum } : {}) };
}

export function sameTarget(a: FitTarget, b: FitTarget): boolean {
  return a.spin === b.spin && a.kIndex === b.kIndex && a.band0 === b.band0;
}

/** What a fit request asked: the answer is shown with these (the choices may have moved on since). */
interface Asked {
  window_meV: number;
  method: string;
}

export interface FitRequestsDeps {
  post(m: ViewToHostMessage): void;
  panel: FitPanel;
  review: ReviewNote;
  choices: ViewChoices;
  setStatus(text: string): void;
}

export class FitRequests {
  /** The fit shown (its target, extremum, curves and window asked), or null. */
  shown: (ShownFit & { target: FitTarget }) | null = null;
  private scan: WindowScanSeries[] = [];
  private readonly requests = new LatestRequest<Asked>();

  constructor(private readonly deps: FitRequestsDeps) {}

  /** Asks the host to fit a point with the current window and method (and to scan the window with it). */
  request(c: FitPoint, withScan: boolean): void {
    const { window_meV, method } = this.deps.choices;
    const target = fitTargetOf(c);
    const requestId = this.requests.start({ window_meV, method });
    this.deps.panel.showPending(`band ${c.band0 + 1} at k-point ${c.kIndex + 1}`);
    this.deps.post({ type: ViewToHostType.RequestFit, requestId, ...target, window_meV, method, withScan });
  }

  /** The host's fit: shown when it answers the latest request (a newer refit may be on its way). */
  onResult(m: FitResultMessage, ref: ReferenceChoice): boolean {
    const answered = this.requests.settle(m.requestId);
    if (answered.state !== 'current') return false;
    const { window_meV, method } = answered.context;
    this.shown = { target: m.target, extremum: m.extremum, curves: m.curves, window_meV };
    if (m.scan) this.scan = m.scan;
    const zero = ref.subscript ? `E_${ref.subscript}` : '';
    this.deps.panel.showResult(m.extremum, { value: m.extremum.eV - ref.offset, zero }, window_meV, method);
    this.showReview();
    this.deps.panel.setScan(this.scan, window_meV);
    this.deps.choices.keepFit({ ...m.target, window_meV, method });
    this.deps.setStatus(fitDoneText(m.extremum));
    return true;
  }

  /** A window scan for the selected point (one for another point is left alone). */
  onScan(m: WindowScanResultMessage, selected: FitTarget | null): void {
    if (!selected || !sameTarget(m.target, selected)) return;
    this.scan = m.scan;
    this.deps.panel.setScan(m.scan, this.deps.choices.window_meV);
  }

  /** A failed request, unless it is an older fit that a newer request has replaced. */
  onFailed(m: RequestFailedMessage): void {
    if (this.requests.settle(m.requestId).state === 'stale') return;
    this.deps.panel.showFailed(m.message);
    this.deps.setStatus(`The fit did not run: ${m.message}`);
  }

  /** The saved review of the fitted extremum (its band or any band of its degenerate group, at its k-point). */
  showReview(): void {
    if (!this.shown) return;
    const { target: t, extremum: x } = this.shown;
    const first = x.band - 1;
    const below = x.kind === 'vbm' || x.kind === 'peak';
    const group = Array.from({ length: Math.max(1, x.degenerateBands ?? 1) }, (_, i) => first + (below ? -i : i));
    this.deps.review.show(t.spin, t.kIndex, [t.band0, ...group]);
  }

  /** Forgets the fit shown (a new run); keepScan false also drops the window scan. */
  clear(keepScan: boolean): void {
    this.shown = null;
    if (!keepScan) this.scan = [];
  }
}
