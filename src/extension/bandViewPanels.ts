/** The open band views, one per run; which one has focus. */
import type * as vscode from 'vscode';
import { BandViewPanel, type PanelDeps } from './bandViewPanel';

export class BandViewPanels {
  private readonly panels = new Map<string, BandViewPanel>();
  private focusedPanel: BandViewPanel | null = null;
  private lastFocused: BandViewPanel | null = null;

  constructor(private readonly deps: Omit<PanelDeps, 'onFocus'> & { onFocus: (uri: vscode.Uri | null) => void }) {}

  /** The band view with focus, else the last one that had it. */
  get focused(): BandViewPanel | null {
    return this.focusedPanel ?? this.lastFocused;
  }

  get any(): BandViewPanel | null {
    return this.panels.values().next().value ?? null;
  }

  forUri(uri: vscode.Uri | null): BandViewPanel | null {
    return uri ? (this.panels.get(uri.toString()) ?? null) : null;
  }

  isOpen(uri: vscode.Uri): boolean {
    return this.panels.has(uri.toString());
  }

  async open(uri: vscode.Uri): Promise<BandViewPanel> {
    const have = this.panels.get(uri.toString());
    if (have) {
      have.reveal();
      return have;
    }
    // One column for band views: a new run opens as a tab beside the others, not in yet another column.
    const column = (this.lastFocused ?? this.any)?.panel.viewColumn;
    return this.track(uri, (deps) => BandViewPanel.create(uri, deps, column));
  }

  /** A band view VS Code restores after a window reload (its state names the run). */
  async revive(webviewPanel: vscode.WebviewPanel, uri: vscode.Uri): Promise<BandViewPanel> {
    const have = this.panels.get(uri.toString());
    if (have) {
      // Already open (reopened before the restore came): one view per run.
      webviewPanel.dispose();
      have.reveal();
      return have;
    }
    return this.track(uri, (deps) => BandViewPanel.attach(webviewPanel, uri, deps));
  }

  private async track(uri: vscode.Uri, make: (deps: PanelDeps) => Promise<BandViewPanel>): Promise<BandViewPanel> {
    const key = uri.toString();
    let panel: BandViewPanel | null = null;
    panel = await make({
      ...this.deps,
      onFocus: (u) => {
        if (u && panel) {
          this.focusedPanel = panel;
          this.lastFocused = panel;
        } else if (this.focusedPanel === panel) this.focusedPanel = null;
        this.deps.onFocus(u);
      },
    });
    this.panels.set(key, panel);
    this.focusedPanel = panel;
    this.lastFocused = panel;
    // A new panel opens active; no view-state event tells so.
    this.deps.onFocus(uri);
    const p = panel;
    p.onDidDispose(() => {
      this.panels.delete(key);
      if (this.focusedPanel === p) this.focusedPanel = null;
      if (this.lastFocused === p) this.lastFocused = null;
    });
    return panel;
  }

  dispose(): void {
    for (const p of [...this.panels.values()]) p.dispose();
  }
}
