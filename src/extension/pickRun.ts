/**
 * "Open Band View" on a folder: the runs found under it (eigenvalue files confirmed by content), one opened
 * directly, several offered in a picker with their folder and layout, none said in a sentence.
 */
import * as vscode from 'vscode';
import { findWorkspaceRuns } from './compareViewRuns';
import { runTitle } from './runTitle';

export async function isFolder(uri: vscode.Uri): Promise<boolean> {
  try {
    return ((await vscode.workspace.fs.stat(uri)).type & vscode.FileType.Directory) !== 0;
  } catch {
    return false;
  }
}

/** The run to open for a folder, or null when there is none or the user cancelled (already said). */
export async function pickRunInFolder(folder: vscode.Uri, maxBytes: number): Promise<vscode.Uri | null> {
  const cts = new vscode.CancellationTokenSource();
  try {
    const found = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Window, title: `Looking for runs in ${runTitle(folder.path)}` },
      () => findWorkspaceRuns(cts.token, maxBytes, folder),
    );
    if (found.data.length === 0) {
      void vscode.window.showWarningMessage(`No eigenvalue file was found in ${vscode.workspace.asRelativePath(folder)} or below it.`);
      return null;
    }
    if (found.data.length === 1) return found.data[0]!;
    const items = found.data.map((uri) => ({
      label: runTitle(uri.path),
      description: vscode.workspace.asRelativePath(uri),
      uri,
    }));
    const pick = await vscode.window.showQuickPick(items, {
      title: `${found.data.length} runs in ${vscode.workspace.asRelativePath(folder)}${found.truncated ? ' (search stopped at its limit)' : ''}: open which?`,
      matchOnDescription: true,
    });
    return pick?.uri ?? null;
  } finally {
    cts.dispose();
  }
}
