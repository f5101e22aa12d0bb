/** Restricted (untrusted) workspaces and read-only file systems: when saving is off, and the sentence why. */
import * as vscode from 'vscode';
import type { EnvironmentData, ThemeKind } from '../protocol';

export const RESTRICTED_SENTENCE = 'Saving is turned off in Restricted Mode: trust this workspace to write annotations.';

/** Null when writing beside `uri` is allowed, otherwise the sentence to show. */
export function writeRefusal(uri: vscode.Uri | null): string | null {
  if (!vscode.workspace.isTrusted) return RESTRICTED_SENTENCE;
  if (uri && vscode.workspace.fs.isWritableFileSystem(uri.scheme) === false) {
    return `Saving is not possible here: the ${uri.scheme} file system is read-only.`;
  }
  return null;
}

export function themeKind(): ThemeKind {
  switch (vscode.window.activeColorTheme.kind) {
    case vscode.ColorThemeKind.Light:
      return 'light';
    case vscode.ColorThemeKind.HighContrast:
      return 'highContrast';
    case vscode.ColorThemeKind.HighContrastLight:
      return 'highContrastLight';
    default:
      return 'dark';
  }
}

export function environmentFor(uri: vscode.Uri | null): EnvironmentData {
  const refusal = writeRefusal(uri);
  return { theme: themeKind(), readOnly: refusal !== null, readOnlyReason: refusal };
}
