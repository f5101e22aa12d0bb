/**
 * The saved review of the fitted extremum (status and note from the annotations file beside the run), shown
 * in the side panel. `reviewAt` is pure; `ReviewNote` owns one element.
 */
import type { ReviewMark, ReviewsMessage } from '../../src/protocol';
import { el } from '../shared/controls';

/** The review of the extremum at (spin, kIndex) on one of `bands0` (0-based), or null. */
export function reviewAt(reviews: readonly ReviewMark[], spin: number, kIndex: number, bands0: readonly number[]): ReviewMark | null {
  for (const r of reviews) if (r.spin === spin && r.kIndex === kIndex && bands0.includes(r.band0)) return r;
  return null;
}

export class ReviewNote {
  readonly root: HTMLElement;
  private file: string | null = null;
  private reviews: ReviewMark[] = [];
  private problem: string | null = null;

  constructor() {
    this.root = el('div', 'vs-review');
    this.root.setAttribute('aria-live', 'polite');
    this.root.hidden = true;
  }

  setReviews(m: ReviewsMessage): void {
    this.file = m.file;
    this.reviews = m.reviews;
    this.problem = m.problem;
  }

  /** Show the review of the extremum at (spin, kIndex, bands0), or what stands in for it. */
  show(spin: number, kIndex: number, bands0: readonly number[]): void {
    const r = reviewAt(this.reviews, spin, kIndex, bands0);
    if (this.problem) {
      this.root.replaceChildren(el('p', 'vs-review-problem', `Saved reviews not shown: ${this.problem}`));
      this.root.hidden = false;
      return;
    }
    if (!r) {
      this.root.replaceChildren();
      this.root.hidden = true;
      return;
    }
    const head = el('p', 'vs-review-status');
    head.append(
      el('span', 'vs-review-label', 'Review: '),
      el('strong', `vs-review-word vs-review-${/^[a-z]+$/.test(r.status) ? r.status : 'other'}`, r.status),
    );
    head.append(
      el(
        'span',
        'vs-muted',
        ` (saved in ${this.file ?? 'the annotations file'}${r.found ? '' : '; the latest analysis no longer finds this extremum'})`,
      ),
    );
    const parts: HTMLElement[] = [head];
    if (r.note.trim() !== '') parts.push(el('p', 'vs-review-note', r.note));
    this.root.replaceChildren(...parts);
    this.root.hidden = false;
  }

  clear(): void {
    this.root.replaceChildren();
    this.root.hidden = true;
  }
}
