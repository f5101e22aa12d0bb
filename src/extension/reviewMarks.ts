/**
 * The reviewer's statuses and notes of an annotations file, placed on the run's arrays for the band view
 * (one mark per k-point where the entry's k sits on the path: a point visited twice gets two). Only entries
 * with a note or a status other than 'unreviewed' are sent. Pure.
 */
import type { BandStructure } from '../core/model';
import { kpointAt } from '../core/model';
import type { AnnotationsDoc } from '../core/annotations/annotationsModel';
import type { ReviewMark } from '../protocol';

/** Longest note sent to the view (the file may hold more; the view shows the start and says so). */
export const MAX_REVIEW_NOTE = 4000;

export function reviewMarks(doc: AnnotationsDoc, bs: BandStructure): ReviewMark[] {
  const out: ReviewMark[] = [];
  const offset = bs.bandNumberOffset ?? 0;
  for (const e of doc.entries) {
    if (e.status === 'unreviewed' && e.note.trim() === '') continue;
    const band0 = e.band - 1 - offset;
    if (e.spin >= bs.nSpin || band0 < 0 || band0 >= bs.nBands) continue;
    const note = e.note.length > MAX_REVIEW_NOTE ? `${e.note.slice(0, MAX_REVIEW_NOTE)} …` : e.note;
    for (let k = 0; k < bs.nk; k++) {
      const q = kpointAt(bs, k);
      if (Math.abs(q[0] - e.k[0]) > 1e-6 || Math.abs(q[1] - e.k[1]) > 1e-6 || Math.abs(q[2] - e.k[2]) > 1e-6) continue;
      out.push({ id: e.id, spin: e.spin, kIndex: k, band0, status: e.status.slice(0, 80), note, found: e.found });
    }
  }
  return out;
}
