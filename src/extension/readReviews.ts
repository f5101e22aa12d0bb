/**
 * Read the annotations file beside a run for the band view's review marks: the open editor's text when the
 * file is open (unsaved edits included), otherwise the file on disk under the path policy (inside the run's
 * folder once links are resolved, a regular file within the annotations limit; core/io/pathPolicy.ts).
 */
import type { LoadedRun } from './runLoader';
import type { ReviewsMessage } from '../protocol';
import { HostToViewType } from '../protocol';
import { annotationsTarget } from './annotationsWriter';
import { WorkspaceFileAccessor } from './fileAccessor';
import { checkConfined } from '../core/io/pathPolicy';
import { READ_LIMITS } from '../core/io/readLimits';
import { dirname } from '../core/io/fileAccessor';
import { parseAnnotations } from '../core/annotations/parseAnnotations';
import { reviewMarks } from './reviewMarks';

export async function readReviews(run: LoadedRun): Promise<ReviewsMessage> {
  const target = annotationsTarget(run.fileUri);
  const name = target.uri.path.split('/').pop() ?? target.uri.path;
  const none: ReviewsMessage = { type: HostToViewType.Reviews, file: null, reviews: [], problem: null };
  try {
    let text: string;
    if (target.document) {
      text = target.document.getText();
    } else {
      const fs = new WorkspaceFileAccessor(target.uri, READ_LIMITS.annotations);
      const path = target.uri.path;
      const st = await checkConfined(fs, dirname(path), path, 'the annotations file', 'annotations');
      if (!st) return none;
      text = new TextDecoder('utf-8').decode(await fs.readFile(path, READ_LIMITS.annotations));
    }
    if (text.trim() === '') return none;
    const doc = parseAnnotations(text, name);
    return { type: HostToViewType.Reviews, file: name, reviews: reviewMarks(doc, run.bs), problem: null };
  } catch (e) {
    const why = e instanceof Error ? e.message : String(e);
    return { type: HostToViewType.Reviews, file: name, reviews: [], problem: `${name} could not be read: ${why}` };
  }
}
