/** Command ids (stable: the editor tests and keybindings use them; see test/editor/HOOKS.md). */
export const COMMANDS = {
  openBandView: 'valleyscope.openBandView',
  saveAnnotations: 'valleyscope.saveAnnotations',
  exportPlot: 'valleyscope.exportPlot',
  reload: 'valleyscope.reload',
  showSummary: 'valleyscope.showSummary',
} as const;

/** Webview panel type of the band view. */
export const BAND_VIEW_TYPE = 'valleyscope.bandView';
