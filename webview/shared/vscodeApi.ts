/**
 * The one handle a webview has on VS Code: posting messages to the extension host and keeping a small state
 * object across reloads of the view. VS Code provides `acquireVsCodeApi` once per page.
 */
export interface VsCodeApi {
  postMessage(message: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): VsCodeApi;

let api: VsCodeApi | null = null;

/** The page's VS Code API (acquired on first use; VS Code allows acquiring it only once per page). */
export function vscodeApi(): VsCodeApi {
  api ??= acquireVsCodeApi();
  return api;
}
