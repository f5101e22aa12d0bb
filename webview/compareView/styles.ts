/**
 * The compare view's stylesheet (a constructable stylesheet: allowed by a strict content security policy
 * without 'unsafe-inline'). Colours come from VS Code's theme variables.
 */
export const COMPARE_VIEW_CSS = `
:root { color-scheme: light dark; }
[hidden] { display: none !important; }
body { margin: 0; padding: 0; background: var(--vscode-editor-background); color: var(--vscode-foreground);
  font-family: var(--vscode-font-family, system-ui, sans-serif); font-size: var(--vscode-font-size, 13px); }
.cv-root { display: flex; flex-direction: column; min-height: 100vh; box-sizing: border-box; padding: 8px 12px; gap: 8px; }
.cv-bar { display: flex; flex-wrap: wrap; align-items: center; gap: 6px 14px; }
.cv-title { font-size: 1.1em; font-weight: 600; margin: 0; }
.cv-summary { color: var(--vscode-descriptionForeground); font-variant-numeric: tabular-nums; }
.cv-bar label { display: inline-flex; align-items: center; gap: 6px; color: var(--vscode-descriptionForeground); }
.cv-cautions { margin: 0; padding: 4px 8px 4px 24px; border-left: 3px solid var(--vscode-editorWarning-foreground, #cca700);
  background: var(--vscode-textBlockQuote-background, transparent); font-size: 0.92em; }
.cv-cautions li { margin: 1px 0; }
.cv-events { margin: 0; font-size: 0.95em; }
.cv-events h2, .cv-section h2 { font-size: 1em; margin: 2px 0 4px; }
.cv-events ul { margin: 0; padding-left: 20px; }
.cv-event-edge-moved { color: var(--vscode-editorWarning-foreground, inherit); }
.cv-table-wrap { overflow: auto; max-height: 46vh; border: 1px solid var(--vscode-panel-border, var(--vscode-contrastBorder, rgba(128,128,128,0.35))); }
.cv-table { border-collapse: separate; border-spacing: 0; font-variant-numeric: tabular-nums; white-space: nowrap; }
.cv-table th, .cv-table td { padding: 3px 8px; border-bottom: 1px solid var(--vscode-editorIndentGuide-background1, rgba(128,128,128,0.25)); text-align: left; }
.cv-table thead th { position: sticky; top: 0; z-index: 1; background: var(--vscode-editor-background); vertical-align: bottom;
  border-bottom: 1px solid var(--vscode-foreground); }
.cv-table td.cv-num { text-align: right; }
.cv-table tbody tr:hover { background: var(--vscode-list-hoverBackground, rgba(128,128,128,0.12)); }
.cv-table tbody tr.cv-selected { background: var(--vscode-list-inactiveSelectionBackground, rgba(128,128,128,0.2)); }
.cv-table tbody tr.cv-reference td.cv-run { font-weight: 600; }
.cv-table tbody tr.cv-failed td { color: var(--vscode-descriptionForeground); }
.cv-sort { all: unset; cursor: pointer; display: inline-flex; flex-direction: column; gap: 1px; white-space: normal; max-width: 11em; }
.cv-sort:focus-visible, .cv-open:focus-visible, .cv-file:focus-visible, .cv-point:focus-visible { outline: 2px solid var(--vscode-focusBorder); outline-offset: 1px; }
.cv-sort .cv-unit { color: var(--vscode-descriptionForeground); font-weight: normal; font-size: 0.9em; }
th[aria-sort="ascending"] .cv-sort-mark::after { content: ' ▲'; }
th[aria-sort="descending"] .cv-sort-mark::after { content: ' ▼'; }
.cv-open { all: unset; cursor: pointer; color: var(--vscode-textLink-foreground); }
.cv-open:hover { text-decoration: underline; }
.cv-file { all: unset; cursor: pointer; margin-left: 6px; color: var(--vscode-descriptionForeground); font-size: 0.88em; }
.cv-tag { display: inline-block; margin-left: 6px; padding: 0 5px; border-radius: 7px; font-size: 0.82em;
  border: 1px solid var(--vscode-descriptionForeground); color: var(--vscode-descriptionForeground); }
.cv-stale { color: var(--vscode-editorWarning-foreground, #cca700); font-weight: 600; }
.cv-current { color: var(--vscode-descriptionForeground); }
.cv-moved { color: var(--vscode-editorWarning-foreground, #cca700); }
.cv-user { width: 6em; background: var(--vscode-input-background); color: var(--vscode-input-foreground);
  border: 1px solid var(--vscode-input-border, rgba(128,128,128,0.5)); padding: 1px 4px; font: inherit; }
.cv-user:focus { outline: 1px solid var(--vscode-focusBorder); }
.cv-plots { display: grid; grid-template-columns: minmax(0, 3fr) minmax(0, 2fr); gap: 14px; min-height: 360px; }
.cv-section { display: flex; flex-direction: column; min-width: 0; }
.cv-note { color: var(--vscode-descriptionForeground); font-size: 0.92em; margin: 0 0 4px; }
.cv-overlay-plot, .cv-trend-plot { position: relative; flex: 1 1 auto; min-height: 320px; }
.cv-overlay-plot canvas { position: absolute; pointer-events: none; }
.cv-overlay-plot svg, .cv-trend-plot svg { position: absolute; left: 0; top: 0; width: 100%; height: 100%; }
.cv-axis path, .cv-axis line { stroke: var(--vscode-foreground); }
.cv-axis text { fill: var(--vscode-foreground); font-size: 11px; }
.cv-axis-title { fill: var(--vscode-foreground); font-size: 12px; }
.cv-frame { fill: none; stroke: var(--vscode-foreground); stroke-opacity: 0.5; }
.cv-sym-line { stroke: var(--vscode-editorIndentGuide-background1, var(--vscode-descriptionForeground)); stroke-dasharray: 3 3; }
.cv-separator { stroke: var(--vscode-foreground); stroke-width: 1.5; }
.cv-zero { stroke: var(--vscode-descriptionForeground); stroke-dasharray: 6 3; }
.cv-span-title { fill: var(--vscode-foreground); font-size: 11px; font-weight: 600; }
.cv-legend { display: flex; flex-wrap: wrap; gap: 4px 14px; font-size: 0.92em; margin-top: 4px; }
.cv-legend-item { display: inline-flex; align-items: center; gap: 6px; }
.cv-legend-item svg { width: 28px; height: 8px; }
.cv-controls { display: flex; flex-wrap: wrap; gap: 6px 12px; align-items: center; margin-bottom: 4px; }
.cv-controls label { display: inline-flex; align-items: center; gap: 6px; color: var(--vscode-descriptionForeground); }
.cv-trend-line { fill: none; stroke: var(--vscode-charts-blue, #3794ff); stroke-width: 1.5; stroke-opacity: 0.6; }
.cv-point { fill: var(--vscode-charts-blue, #3794ff); stroke: var(--vscode-editor-background); stroke-width: 1.5; cursor: pointer; outline: none; }
.cv-point:hover, .cv-point:focus { stroke: var(--vscode-focusBorder); stroke-width: 3; }
.cv-point.cv-point-ref { fill: var(--vscode-charts-orange, #d18616); }
.cv-point.cv-point-stale { fill: none; stroke: var(--vscode-editorWarning-foreground, #cca700); stroke-width: 2; }
body.vscode-high-contrast .cv-point, body.vscode-high-contrast-light .cv-point { stroke: var(--vscode-contrastBorder); stroke-width: 2; }
.cv-trend-legend { display: flex; flex-wrap: wrap; gap: 4px 14px; font-size: 0.92em; margin-top: 4px; }
.cv-series-item::before { content: ''; display: inline-block; width: 14px; height: 3px; margin-right: 5px; vertical-align: middle; background: var(--cv-swatch, var(--vscode-descriptionForeground)); }
.cv-more-columns { margin: 2px 0; }
.cv-point-label { fill: var(--vscode-descriptionForeground); font-size: 10px; pointer-events: none; }
.cv-message { position: absolute; inset: 0; display: flex; align-items: center; justify-content: center; text-align: center; padding: 16px; color: var(--vscode-descriptionForeground); }
.cv-status { min-height: 1.3em; color: var(--vscode-descriptionForeground); }
`;
