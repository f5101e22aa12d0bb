/**
 * Band views come back after a window reload: VS Code hands back each panel with the state its page kept
 * (webview/bandView/viewState.ts), which names the run; the panel is filled again and the page restores its
 * fits. A state that names no run (or not a URI) closes the panel instead of showing an empty one.
 */
import * as vscode from 'vscode';
import { BAND_VIEW_TYPE } from './commandIds';
import type { BandViewPanels } from './bandViewPanels';
import type { RunStore } from './runStore';

/** The run named by a restored state, or null. */
export function runOfState(state: unknown): vscode.Uri | null {
  if (typeof state !== 'object' || state === null) return null;
  const run = (state as { run?: unknown }).run;
  if (typeof run !== 'string' || run.length === 0 || run.length > 4096) return null;
  try {
    return vscode.Uri.parse(run, true);
  } catch {
    return null;
  }
}

export function registerBandViewRestore(panels: BandViewPanels, store: RunStore, log: vscode.LogOutputChannel): vscode.Disposable {
  return vscode.window.registerWebviewPanelSerializer(BAND_VIEW_TYPE, {
    deserializeWebviewPanel: async (panel: vscode.WebviewPanel, state: unknown) => {
      const uri = runOfState(state);
      if (!uri) {
        log.info('a band view from before the reload named no run: closed');
        panel.dispose();
        return;
      }
      void store.get(uri).catch(() => undefined);
      await panels.revive(panel, uri);
    },
  });
}
