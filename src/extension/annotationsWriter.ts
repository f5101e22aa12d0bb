/**
 * Writing the annotations text beside the data file. When `<file>.valleys.json` is open in an editor the
 * merge goes through a WorkspaceEdit on that document (its unsaved hand edits were merged in, and undo works);
 * the document is saved unless it held unsaved edits of its own. Otherwise through vscode.workspace.fs: write a temporary file next to it, then
 * rename it over the old one, so a failed write never leaves half a file. The target path always comes from
 * the data file's URI, never from file content.
 */
import * as vscode from 'vscode';
import { ValleyscopeError } from '../core/errors';
import { READ_LIMITS, tooLargeSentence } from '../core/io/readLimits';
import { readStateOf, type ReadState } from '../core/annotations/atomicWrite';
import type { AtomicFs } from './atomicWrite';

export interface AnnotationsTarget {
  uri: vscode.Uri;
  /** The open document for that URI, when there is one. */
  document: vscode.TextDocument | undefined;
}

export function annotationsTarget(dataFile: vscode.Uri): AnnotationsTarget {
  const uri = dataFile.with({ path: dataFile.path.replace(/\/+$/, '') + '.valleys.json' });
  const document = vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
  return { uri, document };
}

/** The current text of the target (the open document's, with unsaved edits, or the file's, or null) and its stamp. */
export async function currentText(t: AnnotationsTarget): Promise<ReadState> {
  if (t.document) return { text: t.document.getText(), stamp: null };
  try {
    const st = await vscode.workspace.fs.stat(t.uri);
    // Only a regular file within the annotations limit is read (a FIFO or device there would block or never end).
    if (!(st.type & vscode.FileType.File) || st.type & vscode.FileType.Directory) {
      throw new ValleyscopeError(
        `${t.uri.path}: the annotations file is not a regular file (a folder, FIFO, socket or device); it was not opened — remove it to write annotations there`,
      );
    }
    if (st.size > READ_LIMITS.annotations)
      throw new ValleyscopeError(tooLargeSentence(t.uri.path, st.size, READ_LIMITS.annotations, 'annotations'));
    return readStateOf(await vscode.workspace.fs.readFile(t.uri));
  } catch (e) {
    if (e instanceof vscode.FileSystemError && e.code === 'FileNotFound') return readStateOf(null);
    throw e;
  }
}

/**
 * Replace the open document's text through a workspace edit (undo works). A document without unsaved changes
 * is then saved, so the file on disk holds the result; one with unsaved hand edits is left for its author to
 * save (returns 'left-unsaved'), since saving would also write edits nobody asked to write yet.
 */
export async function writeThroughEditor(doc: vscode.TextDocument, text: string): Promise<'saved' | 'left-unsaved'> {
  const wasDirty = doc.isDirty;
  const edit = new vscode.WorkspaceEdit();
  const all = new vscode.Range(0, 0, doc.lineCount, 0);
  edit.replace(doc.uri, doc.validateRange(all), text);
  if (!(await vscode.workspace.applyEdit(edit))) throw new ValleyscopeError(`${doc.uri.path}: the editor refused the change`);
  if (wasDirty) return 'left-unsaved';
  if (!(await doc.save()))
    throw new ValleyscopeError(`${doc.uri.path}: the merged annotations are in the editor but could not be saved to disk`);
  return 'saved';
}

/** vscode.workspace.fs as the small interface the atomic writer needs, for files beside `base`. */
export function workspaceAtomicFs(base: vscode.Uri): AtomicFs {
  const at = (path: string) => base.with({ path });
  return {
    writeFile: async (path, bytes) => vscode.workspace.fs.writeFile(at(path), bytes),
    readFile: async (path) => {
      let st: vscode.FileStat;
      try {
        st = await vscode.workspace.fs.stat(at(path));
      } catch (e) {
        if (e instanceof vscode.FileSystemError && e.code === 'FileNotFound') return null;
        throw e;
      }
      // Compared before the rename: only a regular file within the limit is read (a FIFO would never end).
      if (!(st.type & vscode.FileType.File) || st.type & vscode.FileType.Directory || st.size > READ_LIMITS.annotations)
        throw new ValleyscopeError(`${path}: replaced by something other than an annotations file while saving`);
      return vscode.workspace.fs.readFile(at(path));
    },
    rename: async (from, to) => vscode.workspace.fs.rename(at(from), at(to), { overwrite: true }),
    delete: async (path) => vscode.workspace.fs.delete(at(path)),
  };
}
