/**
 * Writing the annotations text beside the data file. When `<file>.valleys.json` is open in an editor the
 * merge goes through a WorkspaceEdit on that document (its unsaved hand edits were merged in, and undo works);
 * the document is saved unless it held unsaved edits of its own. Otherwise through vscode.workspace.fs: write a temporary file next to it, then
 * rename it over the old one, so a failed write never leaves half a file. The target path always comes from
 * the data file's URI, never from file content.
 */
import * as vscode from 'vscode';
import { ValleyscopeError } from '../core/errors';

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

/** The current text of the target: the open document's (with unsaved edits), or the file's, or null. */
export async function currentText(t: AnnotationsTarget): Promise<{ text: string | null; mtime: number | null }> {
  if (t.document) return { text: t.document.getText(), mtime: null };
  try {
    const st = await vscode.workspace.fs.stat(t.uri);
    const bytes = await vscode.workspace.fs.readFile(t.uri);
    return { text: new TextDecoder('utf-8').decode(bytes), mtime: st.mtime };
  } catch (e) {
    if (e instanceof vscode.FileSystemError && e.code === 'FileNotFound') return { text: null, mtime: null };
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
  if (!(await doc.save())) throw new ValleyscopeError(`${doc.uri.path}: the merged annotations are in the editor but could not be saved to disk`);
  return 'saved';
}

/**
 * Write through the file system: temporary file, then rename. `expectedMtime` is the modification time when
 * the old text was read (null when there was no file): if the file changed since, nothing is written and the
 * caller merges again.
 */
export async function writeThroughFs(uri: vscode.Uri, text: string, expectedMtime: number | null): Promise<'written' | 'changed-on-disk'> {
  const bytes = new TextEncoder().encode(text);
  const rand = Array.from(globalThis.crypto.getRandomValues(new Uint8Array(4)), (x) => x.toString(16).padStart(2, '0')).join('');
  const tmp = uri.with({ path: `${uri.path}.tmp-${rand}` });
  await vscode.workspace.fs.writeFile(tmp, bytes);
  try {
    let now: number | null = null;
    try {
      now = (await vscode.workspace.fs.stat(uri)).mtime;
    } catch {
      now = null;
    }
    if (now !== expectedMtime) return 'changed-on-disk';
    await vscode.workspace.fs.rename(tmp, uri, { overwrite: true });
    return 'written';
  } finally {
    try {
      await vscode.workspace.fs.delete(tmp);
    } catch {
      // Renamed away (the usual case) or already gone.
    }
  }
}
